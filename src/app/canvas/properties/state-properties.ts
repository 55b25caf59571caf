import { ChangeDetectionStrategy, Component, DestroyRef, effect, inject, input, output } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatCheckbox } from '@angular/material/checkbox';
import { MatError, MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import type { MarkovState } from '../../../../shared/model-file.js';
import { formatTyped } from '../../units/units';
import { ITEM_ID_PATTERN, numberControl, numberMessage, readControl, uniqueId } from './typed-number';

/** A state of a state model: whether the function is down in it and its initial probability. */
@Component({
  selector: 'pl-state-properties',
  imports: [ReactiveFormsModule, MatFormField, MatLabel, MatError, MatHint, MatInput, MatCheckbox],
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
      <mat-checkbox formControlName="down">The function cannot act in this state (down)</mat-checkbox>
      <mat-form-field>
        <mat-label>Initial probability (optional)</mat-label>
        <input matInput formControlName="initial" inputmode="decimal" />
        <mat-hint>the initial values of all states sum to 1</mat-hint>
        <mat-error>{{ message('Initial probability', form.controls.initial) }}</mat-error>
      </mat-form-field>
    </form>
  `,
  styleUrl: './properties.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class StateProperties {
  private readonly destroyRef = inject(DestroyRef);

  readonly state = input.required<MarkovState>();
  readonly takenIds = input.required<ReadonlySet<string>>();
  readonly readOnly = input(false);
  readonly changed = output<MarkovState>();

  protected readonly message = numberMessage;
  protected readonly form = new FormGroup({
    id: new FormControl('', {
      nonNullable: true,
      validators: [Validators.required, Validators.pattern(ITEM_ID_PATTERN), uniqueId(() => this.takenIds(), () => this.state().id)],
    }),
    label: new FormControl('', { nonNullable: true, validators: Validators.maxLength(200) }),
    down: new FormControl(false, { nonNullable: true }),
    initial: numberControl(undefined, { min: 0, max: 1 }),
  });
  private lastEmitted: MarkovState | null = null;

  constructor() {
    effect(() => {
      const state = this.state();
      if (state === this.lastEmitted) return;
      this.form.patchValue(
        { id: state.id, label: state.label ?? '', down: state.down ?? false, initial: state.initial === undefined ? '' : formatTyped(state.initial) },
        { emitEvent: false },
      );
    });
    effect(() => (this.readOnly() ? this.form.disable({ emitEvent: false }) : this.form.enable({ emitEvent: false })));
    this.form.valueChanges.pipe(takeUntilDestroyed(this.destroyRef)).subscribe(() => {
      if (this.readOnly() || this.form.invalid) return;
      const controls = this.form.controls;
      const initial = readControl(controls.initial);
      const label = controls.label.value.trim();
      const state: MarkovState = {
        id: controls.id.value,
        ...(label ? { label } : {}),
        ...(initial !== null ? { initial } : {}),
        ...(controls.down.value ? { down: true } : {}),
      };
      this.lastEmitted = state;
      this.changed.emit(state);
    });
  }
}
