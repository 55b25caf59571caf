import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, output } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatError, MatFormField, MatHint, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import { formatTyped } from '../../units/units';
import type { DraftCommonCauseGroup } from '../model-graph';
import { ITEM_ID_PATTERN, numberControl, numberMessage, readControl, uniqueId, formValueSignal } from './typed-number';

/**
 * A common-cause group: the beta factor of DU failures and, optionally, of DD failures (IEC 61508-6
 * Annex D), entered in percent; the beta-factor model or the PDS method with an optional explicit C_MooN.
 */
@Component({
  selector: 'pl-ccf-properties',
  imports: [ReactiveFormsModule, MatFormField, MatLabel, MatError, MatHint, MatSuffix, MatInput, MatSelect, MatOption],
  template: `
    <form [formGroup]="form" class="properties" novalidate>
      <div class="row">
        <mat-form-field>
          <mat-label>Id</mat-label>
          <input matInput formControlName="id" />
          <mat-error>{{ message('Id', form.controls.id) }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Label</mat-label>
          <input matInput formControlName="label" />
          <mat-error>Label: at most 200 characters.</mat-error>
        </mat-form-field>
      </div>
      <mat-form-field>
        <mat-label>Model</mat-label>
        <mat-select formControlName="model">
          <mat-option value="beta">Beta factor</mat-option>
          <mat-option value="pds">PDS method (C_MooN)</mat-option>
        </mat-select>
      </mat-form-field>
      <div class="row">
        <mat-form-field floatLabel="always">
          <mat-label>β (DU failures)</mat-label>
          <input matInput formControlName="beta" inputmode="decimal" />
          <span matTextSuffix>%</span>
          <mat-error>{{ message('β', form.controls.beta) }}</mat-error>
        </mat-form-field>
        <mat-form-field floatLabel="always">
          <mat-label>βD (DD failures)</mat-label>
          <input matInput formControlName="betaD" inputmode="decimal" />
          <span matTextSuffix>%</span>
          <mat-hint>β when empty</mat-hint>
          <mat-error>{{ message('βD', form.controls.betaD) }}</mat-error>
        </mat-form-field>
      </div>
      @if (isPds()) {
        <mat-form-field>
          <mat-label>C_MooN (optional)</mat-label>
          <input matInput formControlName="factor" inputmode="decimal" />
          <mat-hint>from the PDS table when empty</mat-hint>
          <mat-error>{{ message('C_MooN', form.controls.factor) }}</mat-error>
        </mat-form-field>
      }
      <p class="muted">
        Members: {{ members() }}. Connect an event's output to this group to add it; remove one with its Remove
        button under Connections.
      </p>
    </form>
  `,
  styleUrl: './properties.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CcfProperties {
  private readonly destroyRef = inject(DestroyRef);

  readonly group = input.required<DraftCommonCauseGroup>();
  readonly takenIds = input.required<ReadonlySet<string>>();
  readonly readOnly = input(false);
  readonly changed = output<DraftCommonCauseGroup>();

  protected readonly message = numberMessage;
  protected readonly form = new FormGroup({
    id: new FormControl('', {
      nonNullable: true,
      validators: [Validators.required, Validators.pattern(ITEM_ID_PATTERN), uniqueId(() => this.takenIds(), () => this.group().id)],
    }),
    label: new FormControl('', { nonNullable: true, validators: Validators.maxLength(200) }),
    model: new FormControl<'beta' | 'pds'>('beta', { nonNullable: true }),
    beta: numberControl(undefined, { required: true, min: 0, max: 100 }),
    betaD: numberControl(undefined, { min: 0, max: 100 }),
    factor: numberControl(undefined, { min: 0 }),
  });
  private readonly value = formValueSignal(this.form, inject(DestroyRef));
  private lastEmitted: DraftCommonCauseGroup | null = null;
  protected readonly isPds = computed(() => this.value().model === 'pds');
  protected readonly members = computed(() => (this.group().members.length === 0 ? 'none yet' : this.group().members.join(', ')));

  constructor() {
    effect(() => {
      const group = this.group();
      if (group === this.lastEmitted) return;
      this.form.patchValue(
        {
          id: group.id,
          label: group.label ?? '',
          model: group.model,
          beta: formatTyped(group.beta * 100),
          betaD: group.betaD === undefined ? '' : formatTyped(group.betaD * 100),
          factor: group.factor === undefined ? '' : formatTyped(group.factor),
        },
        { emitEvent: false },
      );
      this.value.set(this.form.getRawValue());
    });
    effect(() => (this.readOnly() ? this.form.disable({ emitEvent: false }) : this.form.enable({ emitEvent: false })));
    this.form.valueChanges.pipe(takeUntilDestroyed(this.destroyRef)).subscribe(() => this.emitIfValid());
  }

  private emitIfValid(): void {
    if (this.readOnly() || this.form.invalid) return;
    const controls = this.form.controls;
    const betaD = readControl(controls.betaD);
    const factor = readControl(controls.factor);
    const label = controls.label.value.trim();
    const group: DraftCommonCauseGroup = {
      id: controls.id.value,
      ...(label ? { label } : {}),
      members: this.group().members,
      beta: (readControl(controls.beta) ?? 0) / 100,
      ...(betaD !== null ? { betaD: betaD / 100 } : {}),
      model: controls.model.value,
      ...(controls.model.value === 'pds' && factor !== null ? { factor } : {}),
    };
    this.lastEmitted = group;
    this.changed.emit(group);
  }
}
