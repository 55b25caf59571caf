import { FormArray, FormControl, FormGroup, Validators } from '@angular/forms';
import type { DeviceVersion } from '../../../shared/api/devices.js';
import type { Architecture, ArchitectureGroup } from '../../../shared/architecture.js';
import type { DemandMode, LinkedEventField } from '../../../shared/model-file.js';
import { ITEM_ID_PATTERN, numberControl, readControl } from '../canvas/properties/typed-number';
import { formatTyped, intervalToHours, rateFromPerHour, rateToPerHour, type IntervalUnit, type RateUnit } from '../units/units';

/** The part of the function a subsystem is; it names the group and orders the wizard's defaults. */
export type SubsystemRole = 'sensors' | 'logic' | 'finalElements';
export const SUBSYSTEM_ROLE_LABELS: Record<SubsystemRole, string> = { sensors: 'Sensors', logic: 'Logic solver', finalElements: 'Final elements' };

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
    /** The library version the device is linked to (null: typed in); its events are linked to it. */
    device: new FormControl<DeviceVersion | null>(null),
    /** Why linked figures typed here differ from the library version (required when any does). */
    overrideReason: new FormControl('', { nonNullable: true, validators: Validators.maxLength(500) }),
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

function inUnit(perHour: number, unit: RateUnit): string {
  return formatTyped(rateFromPerHour(perHour, unit));
}

// Library links --------------------------------------------------------------------------------------

/** The linked fields (shared/model-file.ts LINKED_EVENT_FIELDS) the wizard shows; the others come with the link. */
export type WizardLinkedField = Extract<LinkedEventField, 'lambdaDU' | 'lambdaDD' | 'proofTest.coverage'>;
const WIZARD_LINKED_FIELDS: readonly WizardLinkedField[] = ['lambdaDU', 'lambdaDD', 'proofTest.coverage'];
const WIZARD_FIELD_LABELS: Record<WizardLinkedField, string> = { lambdaDU: 'λDU', lambdaDD: 'λDD', 'proofTest.coverage': 'Proof-test coverage' };

/**
 * Typed and library values agree when they differ by at most this share: the fields show six significant
 * digits (formatTyped), so a value filled in from the library and left alone always agrees.
 */
const SAME_AS_SHOWN = 1e-5;

function agrees(typed: number, library: number): boolean {
  return Math.abs(typed - library) <= SAME_AS_SHOWN * Math.max(Math.abs(typed), Math.abs(library));
}

/**
 * Links the subsystem's device to a library version: the label, λDU, λDD and (with a proof test) the
 * suggested proof-test coverage are filled in from it; the repair time stays as typed.
 */
export function linkDevice(form: SubsystemForm, version: DeviceVersion): void {
  form.patchValue({ device: version, overrideReason: '', deviceLabel: `${version.maker} ${version.model}`.slice(0, 200) });
  restoreLibraryValues(form);
}

/** Puts the linked version's values back into the linked fields (in the subsystem's rate unit). */
export function restoreLibraryValues(form: SubsystemForm): void {
  const version = form.controls.device.value;
  if (!version) return;
  const unit = form.controls.rateUnit.value;
  form.patchValue({ lambdaDU: inUnit(version.lambdaDU, unit), lambdaDD: inUnit(version.lambdaDD, unit), overrideReason: '' });
  if (form.controls.proofTested.value) form.patchValue({ proofCoverage: formatTyped((version.proofTestCoverage ?? 1) * 100) });
}

/** Ends the link; the typed values stay, now the subsystem's own. */
export function unlinkDevice(form: SubsystemForm): void {
  form.patchValue({ device: null, overrideReason: '' });
}

/** One linked field whose typed value differs from the linked version. */
export interface LinkedDifference {
  readonly field: WizardLinkedField;
  readonly label: string;
  /** The library value as the field would show it, with its unit. */
  readonly libraryText: string;
}

/** The values the wizard's fields stand for (per hour; coverage 0 to 1, null without a proof test). */
function typedFigures(form: SubsystemForm): Record<WizardLinkedField, number | null> {
  const unit = form.controls.rateUnit.value;
  const rate = (control: FormControl<string>): number | null => {
    const typed = readControl(control);
    return typed === null || Number.isNaN(typed) ? null : rateToPerHour(typed, unit);
  };
  const coverage = readControl(form.controls.proofCoverage);
  return {
    lambdaDU: rate(form.controls.lambdaDU),
    lambdaDD: rate(form.controls.lambdaDD) ?? 0,
    'proofTest.coverage': form.controls.proofTested.value && coverage !== null && !Number.isNaN(coverage) ? coverage / 100 : null,
  };
}

/**
 * The library values of the wizard's linked fields. A version without a suggested coverage leaves the
 * event's coverage out, which the engine reads as 1 (docs/model-format.md, proofTest.coverage default).
 */
function libraryFigures(version: DeviceVersion): Record<WizardLinkedField, number> {
  return { lambdaDU: version.lambdaDU, lambdaDD: version.lambdaDD, 'proofTest.coverage': version.proofTestCoverage ?? 1 };
}

/** The linked fields whose typed value differs from the linked version (none when not linked). */
export function linkedDifferences(form: SubsystemForm): LinkedDifference[] {
  const version = form.controls.device.value;
  if (!version) return [];
  const typed = typedFigures(form);
  const library = libraryFigures(version);
  const unit = form.controls.rateUnit.value;
  return WIZARD_LINKED_FIELDS.filter((field) => typed[field] !== null && !agrees(typed[field], library[field])).map((field) => ({
    field,
    label: WIZARD_FIELD_LABELS[field],
    libraryText: field === 'proofTest.coverage' ? `${formatTyped(library[field] * 100)} %` : `${inUnit(library[field], unit)} ${unitLabel(unit)}`,
  }));
}

function unitLabel(unit: RateUnit): string {
  return unit === 'fit' ? 'FIT' : unit === 'perHour' ? '/h' : '/year';
}

/** What the generated events of a linked subsystem link to, and the overrides with their reason. */
export interface SubsystemLink {
  readonly version: DeviceVersion;
  readonly overrides: readonly { readonly field: WizardLinkedField; readonly reason: string }[];
}

/**
 * The library links of the wizard's subsystems, by group id, or the problems that stop them: a linked
 * figure typed differently needs the reason for the override (as on the canvas).
 */
export function subsystemLinks(form: WizardForm): { links: Map<string, SubsystemLink>; problems: string[] } {
  const links = new Map<string, SubsystemLink>();
  const problems: string[] = [];
  form.controls.subsystems.controls.forEach((subsystem, index) => {
    const version = subsystem.controls.device.value;
    if (!version) return;
    const differences = linkedDifferences(subsystem);
    const reason = subsystem.controls.overrideReason.value.trim();
    if (differences.length > 0 && reason === '') {
      const named = differences.map((difference) => `${difference.label} (library ${difference.libraryText})`).join(', ');
      problems.push(`Subsystem ${index + 1}: ${named} differ${differences.length === 1 ? 's' : ''} from ${version.maker} ${version.model} version ${version.version}; give the reason for the override or restore the library values.`);
      return;
    }
    links.set(subsystem.controls.id.value, { version, overrides: differences.map((difference) => ({ field: difference.field, reason })) });
  });
  return { links, problems };
}

/** The figures a subsystem's channels get: the linked version's exact values where the typed ones agree. */
function channelFigures(subsystem: SubsystemForm): { lambdaDU: number; lambdaDD: number | null; coverage: number } {
  const unit = subsystem.controls.rateUnit.value;
  const typedDD = readControl(subsystem.controls.lambdaDD);
  const typed = {
    lambdaDU: rateToPerHour(readControl(subsystem.controls.lambdaDU) ?? 0, unit),
    lambdaDD: typedDD === null ? null : rateToPerHour(typedDD, unit),
    coverage: (readControl(subsystem.controls.proofCoverage) ?? 100) / 100,
  };
  const version = subsystem.controls.device.value;
  if (!version) return typed;
  const differing = new Set(linkedDifferences(subsystem).map((difference) => difference.field));
  const library = libraryFigures(version);
  return {
    lambdaDU: differing.has('lambdaDU') ? typed.lambdaDU : library.lambdaDU,
    lambdaDD: differing.has('lambdaDD') ? typed.lambdaDD : library.lambdaDD,
    coverage: differing.has('proofTest.coverage') ? typed.coverage : library['proofTest.coverage'],
  };
}

/** The architecture the wizard's answers describe (shared/architecture.ts), checked by its schema afterwards. */
export function architectureFromForm(form: WizardForm): Architecture {
  const value = form.getRawValue();
  const groups: ArchitectureGroup[] = form.controls.subsystems.controls.map((subsystem) => {
    const controls = subsystem.controls;
    const m = readControl(controls.m) ?? 1;
    const n = readControl(controls.n) ?? 1;
    const figures = channelFigures(subsystem);
    const lambdaDD = figures.lambdaDD;
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
          lambdaDU: figures.lambdaDU,
          ...(lambdaDD !== null && lambdaDD > 0 ? { lambdaDD } : {}),
          mttrHours: readControl(controls.mttrHours) ?? 0,
          ...(controls.proofTested.value
            ? {
                proofTest: {
                  intervalHours: intervalToHours(readControl(controls.proofInterval) ?? 0, controls.intervalUnit.value),
                  coverage: figures.coverage,
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
