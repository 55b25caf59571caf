import { FormArray, FormControl, FormGroup, Validators } from '@angular/forms';
import type { Architecture, ArchitectureGroup } from '../../../shared/architecture.js';
import type { DemandMode } from '../../../shared/model-file.js';
import { ITEM_ID_PATTERN, numberControl, readControl } from '../canvas/properties/typed-number';
import { intervalToHours, rateToPerHour, type IntervalUnit, type RateUnit } from '../units/units';

/** The part of the function a subsystem is; it names the group and orders the wizard's defaults. */
export type SubsystemRole = 'sensors' | 'logic' | 'finalElements';
export const SUBSYSTEM_ROLE_LABELS: Record<SubsystemRole, string> = { sensors: 'Sensors', logic: 'Logic solver', finalElements: 'Final elements' };

/**
 * A device's failure data as the wizard uses it. Today the user types it in; a device-data library picker
 * fills the same fields through `applyDevice`, so the wizard does not change when the library arrives.
 */
export interface DeviceData {
  readonly label: string;
  /** Per hour. */
  readonly lambdaDU: number;
  /** Per hour. */
  readonly lambdaDD: number;
  readonly mttrHours: number;
}

export function buildSubsystemForm(role: SubsystemRole, id: string) {
  return new FormGroup({
    role: new FormControl<SubsystemRole>(role, { nonNullable: true }),
    id: new FormControl(id, { nonNullable: true, validators: [Validators.required, Validators.pattern(ITEM_ID_PATTERN)] }),
    m: numberControl(1, { required: true, min: 1, max: 8, integer: true }),
    n: numberControl(role === 'logic' ? 1 : 2, { required: true, min: 1, max: 8, integer: true }),
    diagnosed: new FormControl(false, { nonNullable: true }),
    deviceLabel: new FormControl('', { nonNullable: true, validators: Validators.maxLength(200) }),
    rateUnit: new FormControl<RateUnit>('fit', { nonNullable: true }),
    lambdaDU: numberControl(undefined, { required: true, min: 0 }),
    lambdaDD: numberControl(undefined, { min: 0 }),
    mttrHours: numberControl(8, { required: true, min: 0 }),
    proofTested: new FormControl(true, { nonNullable: true }),
    proofInterval: numberControl(12, { required: true, min: 0, exclusiveMin: true }),
    intervalUnit: new FormControl<IntervalUnit>('months', { nonNullable: true }),
    proofCoverage: numberControl(100, { required: true, min: 0, max: 100 }),
    betaPercent: numberControl(5, { min: 0, max: 100 }),
    betaDPercent: numberControl(undefined, { min: 0, max: 100 }),
  });
}
export type SubsystemForm = ReturnType<typeof buildSubsystemForm>;

export function buildWizardForm(name: string, missionHours: number, demand: DemandMode) {
  return new FormGroup({
    name: new FormControl(name, { nonNullable: true, validators: [Validators.required, Validators.maxLength(200)] }),
    missionYears: numberControl(missionHours / 8760, { required: true, min: 0, exclusiveMin: true }),
    demand: new FormControl<DemandMode>(demand, { nonNullable: true }),
    staggeredTests: new FormControl(false, { nonNullable: true }),
    writeStateModel: new FormControl(false, { nonNullable: true }),
    sharedRepairCrew: new FormControl(false, { nonNullable: true }),
    subsystems: new FormArray<SubsystemForm>([
      buildSubsystemForm('sensors', 'PT'),
      buildSubsystemForm('logic', 'LS'),
      buildSubsystemForm('finalElements', 'XV'),
    ]),
  });
}
export type WizardForm = ReturnType<typeof buildWizardForm>;

/** Fills a subsystem's device fields from device data (typed in, or later picked from the library). */
export function applyDevice(form: SubsystemForm, device: DeviceData): void {
  const unit = form.controls.rateUnit.value;
  const inUnit = (perHour: number): string => String(Number((perHour / rateToPerHour(1, unit)).toPrecision(6)));
  form.patchValue({ deviceLabel: device.label, lambdaDU: inUnit(device.lambdaDU), lambdaDD: inUnit(device.lambdaDD), mttrHours: String(device.mttrHours) });
}

/** The architecture the wizard's answers describe (shared/architecture.ts), checked by its schema afterwards. */
export function architectureFromForm(form: WizardForm): Architecture {
  const value = form.getRawValue();
  const groups: ArchitectureGroup[] = form.controls.subsystems.controls.map((subsystem) => {
    const controls = subsystem.controls;
    const unit = controls.rateUnit.value;
    const m = readControl(controls.m) ?? 1;
    const n = readControl(controls.n) ?? 1;
    const lambdaDD = readControl(controls.lambdaDD);
    const beta = readControl(controls.betaPercent);
    const betaD = readControl(controls.betaDPercent);
    const label = controls.deviceLabel.value.trim();
    return {
      id: controls.id.value,
      label: label ? `${SUBSYSTEM_ROLE_LABELS[controls.role.value]}: ${label}` : SUBSYSTEM_ROLE_LABELS[controls.role.value],
      voting: `${m}oo${n}${controls.diagnosed.value ? 'D' : ''}`,
      channels: {
        identical: {
          ...(label ? { label } : {}),
          lambdaDU: rateToPerHour(readControl(controls.lambdaDU) ?? 0, unit),
          ...(lambdaDD !== null && lambdaDD > 0 ? { lambdaDD: rateToPerHour(lambdaDD, unit) } : {}),
          mttrHours: readControl(controls.mttrHours) ?? 0,
          ...(controls.proofTested.value
            ? {
                proofTest: {
                  intervalHours: intervalToHours(readControl(controls.proofInterval) ?? 0, controls.intervalUnit.value),
                  coverage: (readControl(controls.proofCoverage) ?? 100) / 100,
                },
              }
            : {}),
        },
        count: n,
      },
      ...(n > 1 && beta !== null ? { beta: beta / 100 } : {}),
      ...(n > 1 && betaD !== null ? { betaD: betaD / 100 } : {}),
    };
  });
  return {
    name: value.name.trim(),
    mission: { hours: intervalToHours(readControl(form.controls.missionYears) ?? 0, 'years'), demand: value.demand },
    groups,
    ...(value.staggeredTests ? { staggeredTests: true } : {}),
    ...(value.writeStateModel && value.sharedRepairCrew ? { sharedRepairCrew: true } : {}),
  };
}
