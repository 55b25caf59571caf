import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, output, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { MatCheckbox } from '@angular/material/checkbox';
import { MatError, MatFormField, MatHint, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import { merge } from 'rxjs';
import type { BasicEvent, PartialTest, ProofTest, RateEvent } from '../../../../shared/model-file.js';
import {
  INTERVAL_UNITS,
  INTERVAL_UNIT_LABELS,
  RATE_UNITS,
  RATE_UNIT_LABELS,
  formatInterval,
  formatTyped,
  intervalFromHours,
  intervalToHours,
  rateFromPerHour,
  rateToPerHour,
  type IntervalUnit,
  type RateUnit,
} from '../../units/units';
import { DeviceLinkPanel } from '../../devices/device-link-panel';
import { derivedFigures, formatPercent } from './derived-figures';
import { ITEM_ID_PATTERN, numberControl, numberMessage, readControl, uniqueId, formValueSignal } from './typed-number';

const PERCENT = { min: 0, max: 100 };

function buildForm(taken: () => ReadonlySet<string>, own: () => string) {
  return new FormGroup({
    id: new FormControl('', { nonNullable: true, validators: [Validators.required, Validators.pattern(ITEM_ID_PATTERN), uniqueId(taken, own)] }),
    label: new FormControl('', { nonNullable: true, validators: Validators.maxLength(200) }),
    kind: new FormControl<'rate' | 'probability'>('rate', { nonNullable: true }),
    rateUnit: new FormControl<RateUnit>('perHour', { nonNullable: true }),
    intervalUnit: new FormControl<IntervalUnit>('months', { nonNullable: true }),
    lambdaDU: numberControl(undefined, { required: true, min: 0 }),
    lambdaDD: numberControl(undefined, { min: 0 }),
    lambdaS: numberControl(undefined, { min: 0 }),
    mttrHours: numberControl(undefined, { min: 0 }),
    hasProofTest: new FormControl(false, { nonNullable: true }),
    proofInterval: numberControl(undefined, { required: true, min: 0, exclusiveMin: true }),
    proofFirst: numberControl(undefined, { min: 0, exclusiveMin: true }),
    proofCoverage: numberControl(undefined, PERCENT),
    proofDurationHours: numberControl(undefined, { min: 0 }),
    downDuringTest: new FormControl(false, { nonNullable: true }),
    hasPartialTest: new FormControl(false, { nonNullable: true }),
    partialInterval: numberControl(undefined, { required: true, min: 0, exclusiveMin: true }),
    partialCoverage: numberControl(undefined, { required: true, ...PERCENT }),
    probability: numberControl(undefined, { required: true, min: 0, max: 1 }),
  });
}
type EventForm = ReturnType<typeof buildForm>;

/**
 * The properties of a basic event: failure rates typed in per hour, FIT or per year, the test plans with
 * intervals in hours, months or years (stored in hours), or a fixed probability. Each valid change is
 * emitted at once; an invalid field keeps what was typed and says what is wrong under it.
 */
@Component({
  selector: 'pl-event-properties',
  imports: [
    ReactiveFormsModule,
    MatFormField,
    MatLabel,
    MatError,
    MatHint,
    MatSuffix,
    MatInput,
    MatSelect,
    MatOption,
    MatCheckbox,
    MatButtonToggleGroup,
    MatButtonToggle,
    DeviceLinkPanel,
  ],
  templateUrl: './event-properties.html',
  styleUrl: './properties.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class EventProperties {
  private readonly destroyRef = inject(DestroyRef);

  readonly event = input.required<BasicEvent>();
  /** Ids used by the other items of the model. */
  readonly takenIds = input.required<ReadonlySet<string>>();
  readonly readOnly = input(false);
  readonly changed = output<BasicEvent>();

  protected readonly form: EventForm = buildForm(
    () => this.takenIds(),
    () => this.event().id,
  );
  protected readonly rateUnits = RATE_UNITS;
  protected readonly rateUnitLabels = RATE_UNIT_LABELS;
  protected readonly intervalUnits = INTERVAL_UNITS;
  protected readonly intervalUnitLabels = INTERVAL_UNIT_LABELS;
  protected readonly message = numberMessage;
  protected readonly formatPercent = formatPercent;
  protected readonly formatInterval = formatInterval;

  private readonly value = formValueSignal(this.form, inject(DestroyRef));
  private lastEmitted: BasicEvent | null = null;
  protected readonly kind = computed(() => this.value().kind);
  protected readonly hasProofTest = computed(() => this.value().hasProofTest);
  protected readonly hasPartialTest = computed(() => this.value().hasPartialTest);
  protected readonly rateUnitLabel = computed(() => RATE_UNIT_LABELS[this.value().rateUnit ?? 'perHour']);
  protected readonly intervalUnitLabel = computed(() => INTERVAL_UNIT_LABELS[this.value().intervalUnit ?? 'months']);
  protected readonly stored = signal<BasicEvent | null>(null);
  /** The stored event when it has rates, for the device-library link. */
  protected readonly rateEvent = computed(() => {
    const event = this.stored();
    return event && !('probability' in event) ? event : null;
  });
  protected readonly derived = computed(() => {
    const event = this.stored();
    if (!event || 'probability' in event) return null;
    return derivedFigures({
      lambdaDU: event.lambdaDU,
      lambdaDD: event.lambdaDD ?? 0,
      lambdaS: event.lambdaS ?? 0,
      mttrHours: event.mttrHours ?? 0,
      proofIntervalHours: event.proofTest?.intervalHours ?? null,
    });
  });

  constructor() {
    effect(() => {
      const event = this.event();
      if (event !== this.lastEmitted) this.load(event);
      this.stored.set(event);
    });
    effect(() => {
      if (this.readOnly()) this.form.disable({ emitEvent: false });
      else this.form.enable({ emitEvent: false });
      this.applyKind();
    });
    const controls = this.form.controls;
    controls.rateUnit.valueChanges.pipe(takeUntilDestroyed(this.destroyRef)).subscribe((unit) => this.showRates(unit));
    controls.intervalUnit.valueChanges.pipe(takeUntilDestroyed(this.destroyRef)).subscribe((unit) => this.showIntervals(unit));
    merge(controls.kind.valueChanges, controls.hasProofTest.valueChanges, controls.hasPartialTest.valueChanges)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe(() => this.applyKind());
    this.form.valueChanges.pipe(takeUntilDestroyed(this.destroyRef)).subscribe(() => this.emitIfValid());
  }

  private load(event: BasicEvent): void {
    const controls = this.form.controls;
    const isProbability = 'probability' in event;
    const rates = isProbability ? null : event;
    this.form.patchValue(
      {
        id: event.id,
        label: event.label ?? '',
        kind: isProbability ? 'probability' : 'rate',
        probability: isProbability ? formatTyped(event.probability) : controls.probability.value || '0.001',
        hasProofTest: Boolean(rates?.proofTest),
        hasPartialTest: Boolean(rates?.partialTest),
        downDuringTest: rates?.proofTest?.downDuringTest ?? false,
        proofCoverage: percentText(rates?.proofTest?.coverage),
        proofDurationHours: rates?.proofTest?.durationHours === undefined ? '' : formatTyped(rates.proofTest.durationHours),
        partialCoverage: percentText(rates?.partialTest?.coverage),
      },
      { emitEvent: false },
    );
    this.showRates(controls.rateUnit.value, event);
    this.showIntervals(controls.intervalUnit.value, event);
    this.applyKind();
    this.value.set(this.form.getRawValue());
  }

  /** Writes the stored rates in the chosen unit. */
  private showRates(unit: RateUnit, event: BasicEvent = this.event()): void {
    if ('probability' in event) return;
    const text = (value: number | undefined): string => (value === undefined ? '' : formatTyped(rateFromPerHour(value, unit)));
    this.form.patchValue({ lambdaDU: text(event.lambdaDU), lambdaDD: text(event.lambdaDD), lambdaS: text(event.lambdaS) }, { emitEvent: false });
  }

  /** Writes the stored test intervals in the chosen unit (the repair time stays in hours). */
  private showIntervals(unit: IntervalUnit, event: BasicEvent = this.event()): void {
    if ('probability' in event) return;
    const text = (hours: number | undefined): string => (hours === undefined ? '' : formatTyped(intervalFromHours(hours, unit)));
    this.form.patchValue(
      {
        mttrHours: event.mttrHours === undefined ? '' : formatTyped(event.mttrHours),
        proofInterval: text(event.proofTest?.intervalHours) || text(intervalToHours(12, 'months')),
        proofFirst: text(event.proofTest?.firstHours),
        partialInterval: text(event.partialTest?.intervalHours) || text(intervalToHours(3, 'months')),
      },
      { emitEvent: false },
    );
  }

  /** Enables the fields of the chosen kind and plans only, so the hidden ones do not block validity. */
  private applyKind(): void {
    if (this.readOnly()) return;
    const controls = this.form.controls;
    const rate = controls.kind.value === 'rate';
    const setEnabled = (control: FormControl<string>, enabled: boolean): void => {
      if (enabled) control.enable({ emitEvent: false });
      else control.disable({ emitEvent: false });
    };
    setEnabled(controls.probability, !rate);
    for (const control of [controls.lambdaDU, controls.lambdaDD, controls.lambdaS, controls.mttrHours]) setEnabled(control, rate);
    const proof = rate && controls.hasProofTest.value;
    for (const control of [controls.proofInterval, controls.proofFirst, controls.proofCoverage, controls.proofDurationHours]) setEnabled(control, proof);
    const partial = rate && controls.hasPartialTest.value;
    for (const control of [controls.partialInterval, controls.partialCoverage]) setEnabled(control, partial);
  }

  private emitIfValid(): void {
    if (this.readOnly() || this.form.invalid) return;
    const event = this.readEvent();
    this.lastEmitted = event;
    this.changed.emit(event);
  }

  private readEvent(): BasicEvent {
    const controls = this.form.controls;
    const base = { id: controls.id.value, ...(controls.label.value.trim() ? { label: controls.label.value.trim() } : {}) };
    if (controls.kind.value === 'probability') return { ...base, probability: readControl(controls.probability) ?? 0 };
    const rateUnit = controls.rateUnit.value;
    const intervalUnit = controls.intervalUnit.value;
    const rate = (control: FormControl<string>): number | undefined => {
      const value = readControl(control);
      return value === null ? undefined : rateToPerHour(value, rateUnit);
    };
    const interval = (control: FormControl<string>): number | undefined => {
      const value = readControl(control);
      return value === null ? undefined : intervalToHours(value, intervalUnit);
    };
    const optional = <K extends string, V>(key: K, value: V | undefined): Partial<Record<K, V>> => (value === undefined ? {} : ({ [key]: value } as Record<K, V>));
    const coverage = (control: FormControl<string>): number | undefined => {
      const value = readControl(control);
      return value === null ? undefined : value / 100;
    };
    const mttr = readControl(controls.mttrHours);
    const proofTest: ProofTest | undefined = controls.hasProofTest.value
      ? {
          intervalHours: interval(controls.proofInterval)!,
          ...optional('firstHours', interval(controls.proofFirst)),
          ...optional('coverage', coverage(controls.proofCoverage)),
          ...optional('durationHours', readControl(controls.proofDurationHours) ?? undefined),
          ...(controls.downDuringTest.value ? { downDuringTest: true } : {}),
        }
      : undefined;
    const partialTest: PartialTest | undefined = controls.hasPartialTest.value
      ? { intervalHours: interval(controls.partialInterval)!, coverage: coverage(controls.partialCoverage)! }
      : undefined;
    const event: RateEvent = {
      ...base,
      lambdaDU: rate(controls.lambdaDU) ?? 0,
      ...optional('lambdaDD', rate(controls.lambdaDD)),
      ...optional('lambdaS', rate(controls.lambdaS)),
      ...optional('mttrHours', mttr ?? undefined),
      ...optional('proofTest', proofTest),
      ...optional('partialTest', partialTest),
      ...keptFields(this.event()),
    };
    return event;
  }
}

/** Fields of a rate event this form does not edit (library link, device type, SC, error factor, source): kept as they are. */
function keptFields(event: BasicEvent): Partial<RateEvent> {
  if ('probability' in event) return {};
  const { deviceType, systematicCapability, errorFactor, source, device } = event;
  return Object.fromEntries(Object.entries({ deviceType, systematicCapability, errorFactor, source, device }).filter(([, value]) => value !== undefined));
}

function percentText(fraction: number | undefined): string {
  return fraction === undefined ? '' : formatTyped(fraction * 100);
}
