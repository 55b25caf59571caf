import { ChangeDetectionStrategy, Component, computed, input, output } from '@angular/core';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import type { MarkovState, MarkovTest } from '../../../../shared/model-file.js';
import { formatInterval } from '../../units/units';
import { updateTests, type DraftStateChain, type MarkovDraft } from '../model-graph';
import { TestScheduleProperties } from './test-schedule-properties';

interface ChainTests {
  /** Unique among the chains: "main" or "part-<id>". */
  readonly key: string;
  readonly part?: string;
  /** Shown only when the model has parts. */
  readonly title: string | null;
  readonly states: readonly string[];
  readonly tests: readonly MarkovTest[];
}

/** A year, or the mission when shorter: the interval a new test schedule starts with (common practice). */
const DEFAULT_INTERVAL_HOURS = 8760;

/**
 * A new test schedule for a chain: once a year, each down state restored to the state the chain starts
 * in (the first up state when none starts with a probability), with probability 1. A chain without a
 * down state gets one row that keeps its first state where it is, to be edited.
 */
export function newTestSchedule(chain: DraftStateChain, missionHours: number): MarkovTest | null {
  const states = chain.states;
  if (states.length === 0) return null;
  const up: MarkovState | undefined = states.find((state) => !state.down && (state.initial ?? 0) > 0) ?? states.find((state) => !state.down);
  const down = states.filter((state) => state.down);
  const moves = up && down.length > 0 ? down.map((state) => ({ from: state.id, to: up.id, probability: 1 })) : [{ from: states[0].id, to: states[0].id, probability: 1 }];
  return { intervalHours: missionHours > 0 ? Math.min(DEFAULT_INTERVAL_HOURS, missionHours) : DEFAULT_INTERVAL_HOURS, moves };
}

/**
 * The test schedules of a state model (the `tests` of its main chain and of each part): a form for each,
 * adding and removing them. Shown in the properties panel with the model's own properties.
 */
@Component({
  selector: 'pl-test-schedules',
  imports: [TestScheduleProperties, MatButton, MatIconButton, MatIcon],
  template: `
    <h3>Test schedules</h3>
    <p class="muted">At each test the rows move probability between states at once; the rows out of a state sum to 1.</p>
    @for (chain of chains(); track chain.key) {
      @if (chain.title) {
        <h4>{{ chain.title }}</h4>
      }
      @for (test of chain.tests; track $index; let index = $index) {
        <section class="test" [attr.aria-label]="heading(chain, index)" [attr.data-test-schedule]="chain.key + '-' + index">
          <div class="test-head">
            <span class="test-title">{{ heading(chain, index) }}</span>
            <button matIconButton type="button" [disabled]="readOnly()" [attr.aria-label]="'Remove ' + heading(chain, index)" (click)="remove(chain, index)">
              <mat-icon>delete</mat-icon>
            </button>
          </div>
          <pl-test-schedule-properties
            [test]="test"
            [states]="chain.states"
            [missionHours]="model().mission.hours"
            [key]="chain.key + '-' + index"
            [readOnly]="readOnly()"
            (changed)="edit(chain, index, $event)"
          />
        </section>
      } @empty {
        <p class="muted">No test yet: this chain runs untested for the whole mission.</p>
      }
      <button matButton type="button" [disabled]="readOnly() || chain.states.length === 0" (click)="add(chain)" [attr.data-add-test]="chain.key">
        <mat-icon>add</mat-icon>Add a test schedule{{ chain.title ? ' to ' + chain.title : '' }}
      </button>
    }
  `,
  styles: `
    :host {
      display: block;
    }
    h3 {
      font: var(--mat-sys-title-small);
      margin: 16px 0 4px;
    }
    h4 {
      font: var(--mat-sys-label-large);
      margin: 12px 0 4px;
    }
    .muted {
      color: var(--mat-sys-on-surface-variant);
      font: var(--mat-sys-body-small);
    }
    .test {
      margin: 8px 0;
      padding: 4px 8px 8px;
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: 12px;
    }
    .test-head {
      display: flex;
      align-items: center;
      justify-content: space-between;
    }
    .test-title {
      font: var(--mat-sys-title-small);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TestSchedules {
  readonly model = input.required<MarkovDraft>();
  readonly readOnly = input(false);
  readonly changed = output<MarkovDraft>();

  protected readonly chains = computed<readonly ChainTests[]>(() => {
    const model = this.model();
    const parts = model.parts ?? [];
    const chainOf = (key: string, chain: DraftStateChain, title: string | null, part?: string): ChainTests => ({
      key,
      ...(part !== undefined ? { part } : {}),
      title,
      states: chain.states.map((state) => state.id),
      tests: chain.tests ?? [],
    });
    return [
      chainOf('main', model, parts.length > 0 ? 'Main chain' : null),
      ...parts.map((part) => chainOf(`part-${part.id}`, part, `Part ${part.label || part.id}`, part.id)),
    ];
  });

  protected heading(chain: ChainTests, index: number): string {
    const test = chain.tests[index];
    return `Test ${index + 1}${chain.title ? ` of ${chain.title}` : ''}${test?.label ? `: ${test.label}` : ''} · every ${test ? formatInterval(test.intervalHours) : '?'}`;
  }

  protected add(chain: ChainTests): void {
    const model = this.model();
    const source = chain.part === undefined ? model : model.parts?.find((part) => part.id === chain.part);
    const test = source ? newTestSchedule(source, model.mission.hours) : null;
    if (test) this.changed.emit(updateTests(model, chain.part, [...chain.tests, test]));
  }

  protected remove(chain: ChainTests, index: number): void {
    this.changed.emit(updateTests(this.model(), chain.part, chain.tests.filter((_, at) => at !== index)));
  }

  protected edit(chain: ChainTests, index: number, test: MarkovTest): void {
    this.changed.emit(updateTests(this.model(), chain.part, chain.tests.map((item, at) => (at === index ? test : item))));
  }
}
