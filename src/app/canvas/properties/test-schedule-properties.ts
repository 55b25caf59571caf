import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, output, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormArray, FormControl, FormGroup, ReactiveFormsModule, Validators, type AbstractControl, type ValidationErrors, type ValidatorFn } from '@angular/forms';
import { MatIconButton, MatButton } from '@angular/material/button';
import { MatError, MatFormField, MatHint, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import { sameJsonContent } from '../../../../shared/canonical-json.js';
import type { MarkovTest } from '../../../../shared/model-file.js';
import { INTERVAL_UNITS, INTERVAL_UNIT_LABELS, formatInterval, formatTyped, intervalFromHours, intervalToHours, readTypedNumber, type IntervalUnit } from '../../units/units';
import { numberMessage, typedNumber } from './typed-number';

type MoveForm = FormGroup<{ from: FormControl<string>; to: FormControl<string>; probability: FormControl<string> }>;

/** Tolerance of a row sum, as the model file check uses it (shared/model-file.ts). */
const SUM_TOLERANCE = 1e-9;

/** One problem of the moves, naming the rows it is about (1-based, as shown). */
export interface MoveProblem {
  readonly rows: readonly number[];
  readonly message: string;
}

/**
 * The problems of a test's moves that no single field shows: rows out of one state that do not sum to
 * 1 (each state's row is a probability distribution, docs/model-format.md) and rows naming a state the
 * chain does not have. Rows whose probability is not a number yet are left out of the sums.
 */
export function moveProblems(moves: readonly { from: string; to: string; probability: string }[], states: readonly string[]): MoveProblem[] {
  const problems: MoveProblem[] = [];
  const known = new Set(states);
  const sums = new Map<string, { sum: number; rows: number[] }>();
  moves.forEach((move, index) => {
    const row = index + 1;
    for (const end of ['from', 'to'] as const) {
      if (move[end] !== '' && !known.has(move[end])) problems.push({ rows: [row], message: `Row ${row}: the state "${move[end]}" is not in this chain; pick one of its states.` });
    }
    const probability = readTypedNumber(move.probability);
    if (move.from === '' || probability === null || Number.isNaN(probability)) return;
    const entry = sums.get(move.from) ?? { sum: 0, rows: [] };
    entry.sum += probability;
    entry.rows.push(row);
    sums.set(move.from, entry);
  });
  for (const [from, { sum, rows }] of sums) {
    if (Math.abs(sum - 1) > SUM_TOLERANCE) {
      const rowText = rows.length === 1 ? `row ${rows[0]}` : `rows ${rows.join(', ')}`;
      problems.push({ rows, message: `The moves out of ${from} (${rowText}) sum to ${Number(sum.toPrecision(12))}, not 1: a test sends each state's probability somewhere, all of it.` });
    }
  }
  return problems;
}

/** Refuses a time (typed in the form's unit) that lies after the mission end. */
function withinMission(missionHours: () => number, unit: () => IntervalUnit): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const value = readTypedNumber(String(control.value ?? ''));
    if (value === null || Number.isNaN(value)) return null;
    const mission = missionHours();
    return mission > 0 && intervalToHours(value, unit()) > mission ? { afterMission: { missionHours: mission } } : null;
  };
}

/**
 * One test schedule of a state model's chain: when it happens (interval and first test, typed in hours,
 * months or years, stored in hours) and the moves it applies, a table of rows "from state, to state,
 * probability" whose rows out of each state sum to 1. Checked as the user types, each message naming
 * its row. Every change goes out at once with what is valid (an invalid field keeps the stored value, an
 * unfinished row is left out), and the form keeps what was typed, so nothing typed is lost.
 */
@Component({
  selector: 'pl-test-schedule-properties',
  imports: [ReactiveFormsModule, MatFormField, MatLabel, MatError, MatHint, MatSuffix, MatInput, MatSelect, MatOption, MatButton, MatIconButton, MatIcon],
  template: `
    <form [formGroup]="form" class="properties" novalidate>
      <mat-form-field>
        <mat-label>Label (optional)</mat-label>
        <input matInput formControlName="label" />
        <mat-error>Label: at most 200 characters.</mat-error>
      </mat-form-field>
      <mat-form-field>
        <mat-label>Intervals in</mat-label>
        <mat-select formControlName="unit">
          @for (unit of units; track unit) {
            <mat-option [value]="unit">{{ unitLabels[unit] }}</mat-option>
          }
        </mat-select>
      </mat-form-field>
      <mat-form-field floatLabel="always">
        <mat-label>Test interval</mat-label>
        <input matInput formControlName="interval" inputmode="decimal" />
        <span matTextSuffix>{{ unitLabel() }}</span>
        <mat-error>{{ timeMessage('Test interval', form.controls.interval) }}</mat-error>
      </mat-form-field>
      <mat-form-field floatLabel="always">
        <mat-label>First test at</mat-label>
        <input matInput formControlName="first" inputmode="decimal" />
        <span matTextSuffix>{{ unitLabel() }}</span>
        <mat-hint>one interval when empty</mat-hint>
        <mat-error>{{ timeMessage('First test', form.controls.first) }}</mat-error>
      </mat-form-field>

      <h4 [id]="headingId()">Moves at each test</h4>
      <table class="moves" [attr.aria-labelledby]="headingId()">
        <thead>
          <tr>
            <th scope="col" aria-label="Row">#</th>
            <th scope="col">From</th>
            <th scope="col">To</th>
            <th scope="col">Probability</th>
            <th scope="col"><span class="visually-hidden">Remove</span></th>
          </tr>
        </thead>
        <tbody formArrayName="moves">
          @for (move of form.controls.moves.controls; track move; let index = $index) {
            <tr [formGroupName]="index" [class.faulty]="faultyRows().has(index + 1)" [attr.data-move-row]="index + 1">
              <th scope="row">{{ index + 1 }}</th>
              <td>
                <mat-form-field subscriptSizing="fixed" class="cell">
                  <mat-select formControlName="from" [aria-label]="'Row ' + (index + 1) + ': from state'">
                    @for (state of stateChoices(); track state) {
                      <mat-option [value]="state">{{ state }}</mat-option>
                    }
                  </mat-select>
                </mat-form-field>
              </td>
              <td>
                <mat-form-field subscriptSizing="fixed" class="cell">
                  <mat-select formControlName="to" [aria-label]="'Row ' + (index + 1) + ': to state'">
                    @for (state of stateChoices(); track state) {
                      <mat-option [value]="state">{{ state }}</mat-option>
                    }
                  </mat-select>
                </mat-form-field>
              </td>
              <td>
                <mat-form-field subscriptSizing="fixed" class="cell">
                  <input matInput formControlName="probability" inputmode="decimal" [attr.aria-label]="'Row ' + (index + 1) + ': probability'" />
                </mat-form-field>
              </td>
              <td>
                <button
                  matIconButton
                  class="remove"
                  type="button"
                  [disabled]="readOnly() || form.controls.moves.length === 1"
                  [attr.aria-label]="'Remove row ' + (index + 1)"
                  (click)="removeMove(index)"
                >
                  <mat-icon>close</mat-icon>
                </button>
              </td>
            </tr>
          }
        </tbody>
      </table>
      @if (problems().length > 0) {
        <ul class="move-problems" role="alert" aria-label="Problems of the moves">
          @for (problem of problems(); track $index) {
            <li>{{ problem }}</li>
          }
        </ul>
      }
      <div class="actions">
        <button matButton type="button" [disabled]="readOnly() || states().length === 0" (click)="addMove()"><mat-icon>add</mat-icon>Add a row</button>
      </div>
      @if (schedule(); as text) {
        <dl class="derived" aria-label="Derived values">
          <dt>Tests</dt>
          <dd data-derived="test-count">{{ text }}</dd>
        </dl>
      }
    </form>
  `,
  styleUrl: './properties.scss',
  styles: `
    h4 {
      font: var(--mat-sys-title-small);
      margin: 8px 0 0;
    }
    .moves {
      border-collapse: collapse;
      width: 100%;
      table-layout: fixed;
      th {
        font: var(--mat-sys-label-medium);
        color: var(--mat-sys-on-surface-variant);
        text-align: left;
      }
      thead th:first-child,
      tbody th {
        width: 22px;
      }
      thead th:nth-child(4) {
        width: 64px;
      }
      thead th:last-child {
        width: 34px;
      }
      td {
        padding: 0 2px;
      }
      tr.faulty th {
        color: var(--mat-sys-error);
      }
      // Compact cells, so that a state's id fits beside its arrow in the narrow panel.
      .cell {
        width: 100%;
        --mat-form-field-container-height: 40px;
        --mat-form-field-container-vertical-padding: 8px;
        --mat-form-field-container-text-size: var(--mat-sys-body-medium-size);
        --mat-select-trigger-text-size: var(--mat-sys-body-medium-size);
      }
      .remove {
        --mat-icon-button-state-layer-size: 32px;
        padding: 4px;
      }
    }
    :host ::ng-deep .moves .cell .mat-mdc-text-field-wrapper {
      padding: 0 6px 0 8px;
    }
    .move-problems {
      margin: 0;
      padding: 6px 12px 6px 28px;
      border-radius: 8px;
      background: var(--mat-sys-error-container);
      color: var(--mat-sys-on-error-container);
      font: var(--mat-sys-body-small);
    }
    .visually-hidden {
      position: absolute;
      width: 1px;
      height: 1px;
      overflow: hidden;
      clip: rect(0 0 0 0);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TestScheduleProperties {
  private readonly destroyRef = inject(DestroyRef);

  readonly test = input.required<MarkovTest>();
  /** Ids of the states of the chain the test belongs to. */
  readonly states = input.required<readonly string[]>();
  readonly missionHours = input.required<number>();
  /** Names the moves table for assistive technology; unique on the page. */
  readonly key = input('test');
  readonly readOnly = input(false);
  readonly changed = output<MarkovTest>();

  protected readonly units = INTERVAL_UNITS;
  protected readonly unitLabels = INTERVAL_UNIT_LABELS;
  private readonly unit = new FormControl<IntervalUnit>('months', { nonNullable: true });
  protected readonly form = new FormGroup({
    label: new FormControl('', { nonNullable: true, validators: Validators.maxLength(200) }),
    unit: this.unit,
    interval: new FormControl('', {
      nonNullable: true,
      validators: [typedNumber({ required: true, min: 0, exclusiveMin: true }), withinMission(() => this.missionHours(), () => this.unit.value)],
    }),
    first: new FormControl('', {
      nonNullable: true,
      validators: [typedNumber({ min: 0, exclusiveMin: true }), withinMission(() => this.missionHours(), () => this.unit.value)],
    }),
    moves: new FormArray<MoveForm>([]),
  });
  private readonly value = signal(this.form.getRawValue());
  private lastEmitted: MarkovTest | null = null;
  /**
   * The test as last loaded or sent. Edits are compared with it, not with the input: the input only
   * catches up at the next change detection, while one keystroke after another may arrive before that.
   */
  private current: MarkovTest | null = null;

  protected readonly headingId = computed(() => `moves-${this.key()}`);
  protected readonly unitLabel = computed(() => INTERVAL_UNIT_LABELS[this.value().unit]);
  /** The chain's states, and any unknown state a row names (so the row shows what it holds). */
  protected readonly stateChoices = computed(() => {
    const states = this.states();
    const extra = this.value().moves.flatMap((move) => [move.from, move.to]).filter((state) => state !== '' && !states.includes(state));
    return [...states, ...new Set(extra)];
  });
  private readonly moveIssues = computed(() => moveProblems(this.value().moves, this.states()));
  /** Every message about the rows: each field's own problem, then the sums and unknown states. */
  protected readonly problems = computed(() => {
    this.value();
    const fieldMessages = this.form.controls.moves.controls.flatMap((move, index) => {
      const messages: string[] = [];
      if (move.controls.from.value === '') messages.push(`Row ${index + 1}: pick the state the move starts from.`);
      if (move.controls.to.value === '') messages.push(`Row ${index + 1}: pick the state the move goes to.`);
      if (move.controls.probability.invalid) messages.push(`Row ${index + 1}: ${numberMessage('Probability', move.controls.probability)}`);
      return messages;
    });
    return [...fieldMessages, ...this.moveIssues().map((problem) => problem.message)];
  });
  protected readonly faultyRows = computed(() => {
    this.value();
    const rows = new Set(this.moveIssues().flatMap((problem) => problem.rows));
    this.form.controls.moves.controls.forEach((move, index) => {
      if (move.invalid) rows.add(index + 1);
    });
    return rows;
  });
  /** When the tests fall in the mission: tests at first, first + interval, ... strictly before the end. */
  protected readonly schedule = computed(() => {
    const test = this.stored();
    const mission = this.missionHours();
    if (!test || mission <= 0) return null;
    const first = test.firstHours ?? test.intervalHours;
    const count = first < mission ? Math.ceil((mission - first) / test.intervalHours - SUM_TOLERANCE) : 0;
    if (count === 0) return 'none within the mission';
    const last = first + (count - 1) * test.intervalHours;
    return `${count} in the mission: at ${formatInterval(first)}${count > 1 ? `, then every ${formatInterval(test.intervalHours)}, the last at ${formatInterval(last)}` : ''}`;
  });
  private readonly stored = signal<MarkovTest | null>(null);

  constructor() {
    effect(() => {
      const test = this.test();
      this.stored.set(test);
      if (test !== this.lastEmitted) this.load(test);
    });
    effect(() => {
      if (this.readOnly()) this.form.disable({ emitEvent: false });
      else this.form.enable({ emitEvent: false });
    });
    // A new mission length can put a typed time after the end (or back within it).
    effect(() => {
      this.missionHours();
      this.form.controls.interval.updateValueAndValidity({ emitEvent: false });
      this.form.controls.first.updateValueAndValidity({ emitEvent: false });
      this.value.set(this.form.getRawValue());
    });
    this.form.controls.unit.valueChanges.pipe(takeUntilDestroyed(this.destroyRef)).subscribe((unit) => this.showTimes(unit, this.current ?? this.test()));
    this.form.valueChanges.pipe(takeUntilDestroyed(this.destroyRef)).subscribe(() => {
      this.value.set(this.form.getRawValue());
      this.emit();
    });
  }

  protected addMove(): void {
    const states = this.states();
    const last = this.form.controls.moves.controls.at(-1)?.controls.from.value;
    this.form.controls.moves.push(moveForm({ from: last ?? states[0] ?? '', to: states[0] ?? '', probability: '' }));
  }

  protected removeMove(index: number): void {
    this.form.controls.moves.removeAt(index);
  }

  protected timeMessage(label: string, control: AbstractControl): string {
    const afterMission = control.errors?.['afterMission'] as { missionHours: number } | undefined;
    if (afterMission) return `${label} is after the mission end (${formatInterval(afterMission.missionHours)}).`;
    return numberMessage(label, control);
  }

  private load(test: MarkovTest): void {
    this.current = test;
    const moves = this.form.controls.moves;
    moves.clear({ emitEvent: false });
    for (const move of test.moves) moves.push(moveForm({ from: move.from, to: move.to, probability: formatTyped(move.probability) }), { emitEvent: false });
    this.form.controls.label.setValue(test.label ?? '', { emitEvent: false });
    this.showTimes(this.form.controls.unit.value, test);
  }

  private showTimes(unit: IntervalUnit, test: MarkovTest): void {
    const text = (hours: number | undefined): string => (hours === undefined ? '' : formatTyped(intervalFromHours(hours, unit)));
    this.form.patchValue({ interval: text(test.intervalHours), first: text(test.firstHours) }, { emitEvent: false });
    this.form.controls.interval.updateValueAndValidity({ emitEvent: false });
    this.form.controls.first.updateValueAndValidity({ emitEvent: false });
    this.value.set(this.form.getRawValue());
  }

  /** Sends the test with every valid field; invalid fields keep the stored value, unfinished rows wait. */
  private emit(): void {
    if (this.readOnly()) return;
    const stored = this.current ?? this.test();
    const controls = this.form.controls;
    const unit = controls.unit.value;
    const hours = (control: FormControl<string>): number | null => {
      const value = readTypedNumber(control.value);
      return control.valid && value !== null ? intervalToHours(value, unit) : null;
    };
    const interval = hours(controls.interval) ?? stored.intervalHours;
    const first = controls.first.valid ? hours(controls.first) : (stored.firstHours ?? null);
    const label = controls.label.valid ? controls.label.value.trim() : (stored.label ?? '');
    const moves = controls.moves.controls
      .filter((move) => move.valid)
      .map((move) => ({ from: move.controls.from.value, to: move.controls.to.value, probability: readTypedNumber(move.controls.probability.value)! }));
    const next: MarkovTest = {
      ...(label ? { label } : {}),
      intervalHours: interval,
      ...(first !== null ? { firstHours: first } : {}),
      moves,
    };
    if (sameJsonContent(next, stored)) return;
    this.lastEmitted = next;
    this.current = next;
    this.changed.emit(next);
  }
}

function moveForm(move: { from: string; to: string; probability: string }): MoveForm {
  return new FormGroup({
    from: new FormControl(move.from, { nonNullable: true, validators: Validators.required }),
    to: new FormControl(move.to, { nonNullable: true, validators: Validators.required }),
    probability: new FormControl(move.probability, { nonNullable: true, validators: typedNumber({ required: true, min: 0, max: 1 }) }),
  });
}
