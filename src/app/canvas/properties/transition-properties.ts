import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, output } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatError, MatFormField, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import type { MarkovTransition } from '../../../../shared/model-file.js';
import { RATE_UNITS, RATE_UNIT_LABELS, formatTyped, rateFromPerHour, rateToPerHour, type RateUnit } from '../../units/units';
import { numberControl, numberMessage, readControl, formValueSignal } from './typed-number';

/** A transition of a state model: its rate (typed per hour, FIT or per year, stored per hour) and label. */
@Component({
  selector: 'pl-transition-properties',
  imports: [ReactiveFormsModule, MatFormField, MatLabel, MatError, MatSuffix, MatInput, MatSelect, MatOption],
  template: `
    <form [formGroup]="form" class="properties" novalidate>
      <p class="muted">From {{ transition().from }} to {{ transition().to }}</p>
      <div class="row">
        <mat-form-field floatLabel="always">
          <mat-label>Rate</mat-label>
          <input matInput formControlName="rate" inputmode="decimal" />
          <span matTextSuffix>{{ unitLabel() }}</span>
          <mat-error>{{ message('Rate', form.controls.rate) }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Unit</mat-label>
          <mat-select formControlName="unit">
            @for (unit of units; track unit) {
              <mat-option [value]="unit">{{ unitLabels[unit] }}</mat-option>
            }
          </mat-select>
        </mat-form-field>
      </div>
      <mat-form-field>
        <mat-label>Label (optional)</mat-label>
        <input matInput formControlName="label" />
        <mat-error>Label: at most 200 characters.</mat-error>
      </mat-form-field>
    </form>
  `,
  styleUrl: './properties.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TransitionProperties {
  private readonly destroyRef = inject(DestroyRef);

  readonly transition = input.required<MarkovTransition>();
  readonly readOnly = input(false);
  readonly changed = output<MarkovTransition>();

  protected readonly units = RATE_UNITS;
  protected readonly unitLabels = RATE_UNIT_LABELS;
  protected readonly message = numberMessage;
  protected readonly form = new FormGroup({
    rate: numberControl(undefined, { required: true, min: 0 }),
    unit: new FormControl<RateUnit>('perHour', { nonNullable: true }),
    label: new FormControl('', { nonNullable: true, validators: Validators.maxLength(200) }),
  });
  private readonly value = formValueSignal(this.form, inject(DestroyRef));
  protected readonly unitLabel = computed(() => RATE_UNIT_LABELS[this.value().unit ?? 'perHour']);
  private lastEmitted: MarkovTransition | null = null;

  constructor() {
    effect(() => {
      const transition = this.transition();
      if (transition === this.lastEmitted) return;
      this.form.patchValue(
        { rate: formatTyped(rateFromPerHour(transition.rate, this.form.controls.unit.value)), label: transition.label ?? '' },
        { emitEvent: false },
      );
      this.value.set(this.form.getRawValue());
    });
    effect(() => (this.readOnly() ? this.form.disable({ emitEvent: false }) : this.form.enable({ emitEvent: false })));
    this.form.controls.unit.valueChanges.pipe(takeUntilDestroyed(this.destroyRef)).subscribe((unit) => {
      this.form.controls.rate.setValue(formatTyped(rateFromPerHour(this.transition().rate, unit)), { emitEvent: false });
    });
    this.form.valueChanges.pipe(takeUntilDestroyed(this.destroyRef)).subscribe(() => {
      if (this.readOnly() || this.form.invalid) return;
      const { unit, label } = this.form.getRawValue();
      const { from, to } = this.transition();
      const transition: MarkovTransition = {
        from,
        to,
        rate: rateToPerHour(readControl(this.form.controls.rate) ?? 0, unit),
        ...(label.trim() ? { label: label.trim() } : {}),
      };
      this.lastEmitted = transition;
      this.changed.emit(transition);
    });
  }
}
