import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, output } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, Validators, type AbstractControl, type ValidationErrors } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatError, MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import type { GateType } from '../../../../shared/model-file.js';
import { gateLogicInWords, kFromMooN, mFromK } from '../gate-logic';
import type { DraftGate } from '../model-graph';
import { ITEM_ID_PATTERN, numberControl, numberMessage, readControl, uniqueId, formValueSignal } from './typed-number';

export const GATE_TYPE_LABELS: Record<GateType, string> = { or: 'OR: any input', and: 'AND: all inputs', atLeast: 'Voting: M out of N to trip' };

/**
 * The properties of a gate. A voting gate is entered as "M out of N to trip" (N is the number of
 * connected inputs); the file stores k = N - M + 1, the failed inputs that fail the gate, shown read-only.
 */
@Component({
  selector: 'pl-gate-properties',
  imports: [ReactiveFormsModule, MatFormField, MatLabel, MatError, MatHint, MatInput, MatSelect, MatOption, MatButton],
  template: `
    <form [formGroup]="form" class="properties" novalidate>
      <div class="row">
        <mat-form-field>
          <mat-label>Id</mat-label>
          <input matInput formControlName="id" />
          <mat-error>{{ message('Id', form.controls.id) }}</mat-error>
        </mat-form-field>
        <mat-form-field class="grow">
          <mat-label>Label</mat-label>
          <input matInput formControlName="label" />
          <mat-error>Label: at most 200 characters.</mat-error>
        </mat-form-field>
      </div>
      <mat-form-field>
        <mat-label>Logic</mat-label>
        <mat-select formControlName="type">
          @for (type of gateTypes; track type) {
            <mat-option [value]="type">{{ gateTypeLabels[type] }}</mat-option>
          }
        </mat-select>
      </mat-form-field>
      @if (isVoting()) {
        <div class="row">
          <mat-form-field>
            <mat-label>M to trip</mat-label>
            <input matInput formControlName="m" inputmode="numeric" />
            <mat-hint>out of N = {{ inputCount() }} inputs</mat-hint>
            <mat-error>{{ message('M', form.controls.m) }}</mat-error>
          </mat-form-field>
        </div>
        <dl class="derived" aria-label="Derived values">
          <dt>Voting</dt>
          <dd data-derived="voting">{{ votingText() }}</dd>
          <dt>Stored k</dt>
          <dd data-derived="k">{{ storedK() ?? '—' }}</dd>
        </dl>
      }
      <p class="muted logic" data-derived="logic">{{ logic() }}</p>
      <div class="actions">
        <button matButton="outlined" type="button" [disabled]="isTop() || readOnly()" (click)="makeTop.emit()">
          {{ isTop() ? 'This is the top event' : 'Make this the top event' }}
        </button>
      </div>
    </form>
  `,
  styleUrl: './properties.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class GateProperties {
  private readonly destroyRef = inject(DestroyRef);

  readonly gate = input.required<DraftGate>();
  readonly takenIds = input.required<ReadonlySet<string>>();
  readonly isTop = input(false);
  readonly readOnly = input(false);
  readonly changed = output<DraftGate>();
  readonly makeTop = output<void>();

  protected readonly gateTypes: readonly GateType[] = ['or', 'and', 'atLeast'];
  protected readonly gateTypeLabels = GATE_TYPE_LABELS;
  protected readonly message = numberMessage;
  protected readonly form = new FormGroup({
    id: new FormControl('', {
      nonNullable: true,
      validators: [Validators.required, Validators.pattern(ITEM_ID_PATTERN), uniqueId(() => this.takenIds(), () => this.gate().id)],
    }),
    label: new FormControl('', { nonNullable: true, validators: Validators.maxLength(200) }),
    type: new FormControl<GateType>('or', { nonNullable: true }),
    m: numberControl(undefined, { required: true, min: 1, integer: true }),
  });
  private readonly value = formValueSignal(this.form, inject(DestroyRef));
  private lastEmitted: DraftGate | null = null;

  protected readonly inputCount = computed(() => this.gate().inputs.length);
  protected readonly isVoting = computed(() => this.value().type === 'atLeast');
  protected readonly storedK = computed(() => this.gate().k);
  protected readonly votingText = computed(() => {
    const k = this.gate().k;
    const n = this.inputCount();
    return k === undefined || n === 0 ? '—' : `${mFromK(k, n)}oo${n} to trip`;
  });
  protected readonly logic = computed(() => {
    const gate = this.gate();
    return gateLogicInWords(gate.type, gate.inputs.length, gate.k);
  });

  constructor() {
    this.form.controls.m.addValidators((control: AbstractControl): ValidationErrors | null => {
      const m = Number(control.value);
      const n = this.inputCount();
      return n > 0 && Number.isInteger(m) && m > n ? { max: { max: n } } : null;
    });
    effect(() => {
      const gate = this.gate();
      if (gate === this.lastEmitted) return;
      const n = gate.inputs.length;
      this.form.patchValue(
        { id: gate.id, label: gate.label ?? '', type: gate.type, m: gate.k !== undefined && n > 0 ? String(mFromK(gate.k, n)) : '1' },
        { emitEvent: false },
      );
      this.applyType();
      this.form.controls.m.updateValueAndValidity({ emitEvent: false });
      this.value.set(this.form.getRawValue());
    });
    effect(() => {
      if (this.readOnly()) this.form.disable({ emitEvent: false });
      else {
        this.form.enable({ emitEvent: false });
        this.applyType();
      }
    });
    this.form.controls.type.valueChanges.pipe(takeUntilDestroyed(this.destroyRef)).subscribe(() => this.applyType());
    this.form.valueChanges.pipe(takeUntilDestroyed(this.destroyRef)).subscribe(() => this.emitIfValid());
  }

  private applyType(): void {
    const m = this.form.controls.m;
    if (this.form.controls.type.value === 'atLeast' && !this.readOnly()) m.enable({ emitEvent: false });
    else m.disable({ emitEvent: false });
  }

  private emitIfValid(): void {
    if (this.readOnly() || this.form.invalid) return;
    const { id, label, type } = this.form.getRawValue();
    const current = this.gate();
    const n = current.inputs.length;
    const m = readControl(this.form.controls.m);
    const k = type !== 'atLeast' ? undefined : n > 0 && m !== null ? kFromMooN(m, n) : (current.k ?? 1);
    const gate: DraftGate = { id, type, inputs: current.inputs, ...(label.trim() ? { label: label.trim() } : {}), ...(k !== undefined ? { k } : {}) };
    this.lastEmitted = gate;
    this.changed.emit(gate);
  }
}
