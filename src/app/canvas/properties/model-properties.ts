import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, output } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatError, MatFormField, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import type { DemandMode } from '../../../../shared/model-file.js';
import { INTERVAL_UNITS, INTERVAL_UNIT_LABELS, formatTyped, intervalFromHours, intervalToHours, type IntervalUnit } from '../../units/units';
import type { EditableModel } from '../model-graph';
import { numberControl, numberMessage, readControl, formValueSignal } from './typed-number';

export interface ModelHeader {
  readonly name: string;
  readonly description?: string;
  readonly mission: { readonly hours: number; readonly demand: DemandMode };
}

/** The model as a whole, shown when nothing is selected: name, mission time and demand mode. */
@Component({
  selector: 'pl-model-properties',
  imports: [ReactiveFormsModule, MatFormField, MatLabel, MatError, MatSuffix, MatInput, MatSelect, MatOption],
  template: `
    <form [formGroup]="form" class="properties" novalidate>
      <mat-form-field>
        <mat-label>Model name</mat-label>
        <input matInput formControlName="name" />
        <mat-error>The name is required (at most 200 characters).</mat-error>
      </mat-form-field>
      <div class="row">
        <mat-form-field floatLabel="always">
          <mat-label>Mission time</mat-label>
          <input matInput formControlName="missionTime" inputmode="decimal" />
          <span matTextSuffix>{{ unitLabel() }}</span>
          <mat-error>{{ message('Mission time', form.controls.missionTime) }}</mat-error>
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
        <mat-label>Demand mode</mat-label>
        <mat-select formControlName="demand">
          <mat-option value="low">Low demand (PFD)</mat-option>
          <mat-option value="high">High demand (PFH)</mat-option>
          <mat-option value="continuous">Continuous (PFH)</mat-option>
        </mat-select>
      </mat-form-field>
      <mat-form-field>
        <mat-label>Description (optional)</mat-label>
        <textarea matInput formControlName="description" rows="3"></textarea>
        <mat-error>At most 5000 characters.</mat-error>
      </mat-form-field>
    </form>
  `,
  styleUrl: './properties.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ModelProperties {
  private readonly destroyRef = inject(DestroyRef);

  readonly model = input.required<EditableModel>();
  readonly readOnly = input(false);
  readonly changed = output<ModelHeader>();

  protected readonly units = INTERVAL_UNITS;
  protected readonly unitLabels = INTERVAL_UNIT_LABELS;
  protected readonly message = numberMessage;
  protected readonly form = new FormGroup({
    name: new FormControl('', { nonNullable: true, validators: [Validators.required, Validators.maxLength(200)] }),
    missionTime: numberControl(undefined, { required: true, min: 0, exclusiveMin: true }),
    unit: new FormControl<IntervalUnit>('years', { nonNullable: true }),
    demand: new FormControl<DemandMode>('low', { nonNullable: true }),
    description: new FormControl('', { nonNullable: true, validators: Validators.maxLength(5000) }),
  });
  private readonly value = formValueSignal(this.form, inject(DestroyRef));
  protected readonly unitLabel = computed(() => INTERVAL_UNIT_LABELS[this.value().unit ?? 'years']);
  private lastEmitted: ModelHeader | null = null;

  constructor() {
    effect(() => {
      const model = this.model();
      const last = this.lastEmitted;
      if (last && last.name === model.name && last.mission.hours === model.mission.hours && last.mission.demand === model.mission.demand && (last.description ?? '') === (model.description ?? '')) return;
      this.form.patchValue(
        {
          name: model.name,
          missionTime: formatTyped(intervalFromHours(model.mission.hours, this.form.controls.unit.value)),
          demand: model.mission.demand,
          description: model.description ?? '',
        },
        { emitEvent: false },
      );
      this.value.set(this.form.getRawValue());
    });
    effect(() => (this.readOnly() ? this.form.disable({ emitEvent: false }) : this.form.enable({ emitEvent: false })));
    this.form.controls.unit.valueChanges.pipe(takeUntilDestroyed(this.destroyRef)).subscribe((unit) => {
      this.form.controls.missionTime.setValue(formatTyped(intervalFromHours(this.model().mission.hours, unit)), { emitEvent: false });
    });
    this.form.valueChanges.pipe(takeUntilDestroyed(this.destroyRef)).subscribe(() => {
      if (this.readOnly() || this.form.invalid) return;
      const { name, unit, demand, description } = this.form.getRawValue();
      const header: ModelHeader = {
        name: name.trim(),
        mission: { hours: intervalToHours(readControl(this.form.controls.missionTime) ?? 0, unit), demand },
        ...(description.trim() ? { description } : {}),
      };
      this.lastEmitted = header;
      this.changed.emit(header);
    });
  }
}
