import { ChangeDetectionStrategy, Component, computed, input, output } from '@angular/core';
import type { BasicEvent, MarkovState, MarkovTransition } from '../../../../shared/model-file.js';
import {
  connectionId,
  deleteItems,
  nodeId,
  parseConnectionId,
  parseNodeId,
  setTop,
  updateCommonCauseGroup,
  updateEvent,
  updateGate,
  updateState,
  updateTransition,
  type DraftCommonCauseGroup,
  type DraftGate,
  type EditableModel,
  type NodeRef,
} from '../model-graph';
import { CcfProperties } from './ccf-properties';
import { EventProperties } from './event-properties';
import { GateProperties } from './gate-properties';
import { ModelProperties, type ModelHeader } from './model-properties';
import { StateProperties } from './state-properties';
import { TestSchedules } from './test-schedules';
import { TransitionProperties } from './transition-properties';

/** An edit made in the panel, and the canvas id the selection moves to when an item's id changed. */
export interface PanelEdit {
  readonly model: EditableModel;
  readonly select?: string;
  /** A connection to select instead (a transition picked from a state's list). */
  readonly selectConnection?: string;
}

interface Link {
  readonly id: string;
  readonly text: string;
  /** Transitions are opened for editing; gate inputs and group members are removed. */
  readonly action: 'remove' | 'open';
}

type Selected =
  | { readonly kind: 'model' }
  | { readonly kind: 'many'; readonly count: number }
  | { readonly kind: 'gate'; readonly item: DraftGate }
  | { readonly kind: 'event'; readonly item: BasicEvent }
  | { readonly kind: 'ccf'; readonly item: DraftCommonCauseGroup }
  | { readonly kind: 'state'; readonly item: MarkovState; readonly part?: string }
  | { readonly kind: 'transition'; readonly item: MarkovTransition; readonly part?: string; readonly index: number };

/** The properties of the selected item (or of the model when nothing is selected), with its issues. */
@Component({
  selector: 'pl-properties-panel',
  imports: [GateProperties, EventProperties, CcfProperties, StateProperties, TransitionProperties, ModelProperties, TestSchedules],
  template: `
    <h2>{{ heading() }}</h2>
    @if (issues().length > 0) {
      <ul class="issues" aria-live="assertive" aria-label="Problems of this item">
        @for (issue of issues(); track $index) {
          <li>{{ issue }}</li>
        }
      </ul>
    }
    @switch (selected().kind) {
      @case ('gate') {
        <pl-gate-properties
          [gate]="gateItem()!"
          [takenIds]="takenIds()"
          [isTop]="isTop()"
          [readOnly]="readOnly()"
          (changed)="editGate($event)"
          (makeTop)="makeTop()"
        />
      }
      @case ('event') {
        <pl-event-properties [event]="eventItem()!" [takenIds]="takenIds()" [readOnly]="readOnly()" (changed)="editEvent($event)" />
        @if (!isTop()) {
          <button class="link-button" type="button" [disabled]="readOnly()" (click)="makeTop()">Make this event the top</button>
        }
      }
      @case ('ccf') {
        <pl-ccf-properties [group]="ccfItem()!" [takenIds]="takenIds()" [readOnly]="readOnly()" (changed)="editGroup($event)" />
      }
      @case ('state') {
        <pl-state-properties [state]="stateItem()!" [takenIds]="takenIds()" [readOnly]="readOnly()" (changed)="editState($event)" />
      }
      @case ('transition') {
        <pl-transition-properties [transition]="transitionItem()!" [readOnly]="readOnly()" (changed)="editTransition($event)" />
      }
      @case ('many') {
        <p class="muted">Select one item to see its properties. Delete removes the selection; Ctrl+C copies it.</p>
      }
      @default {
        <pl-model-properties [model]="model()" [readOnly]="readOnly()" (changed)="editHeader($event)" />
        @if (markovModel(); as stateModel) {
          <pl-test-schedules [model]="stateModel" [readOnly]="readOnly()" (changed)="emit($event)" />
        }
      }
    }
    @if (links().length > 0) {
      <h3>Connections</h3>
      <ul class="links">
        @for (link of links(); track link.id) {
          <li>
            <span>{{ link.text }}</span>
            @if (link.action === 'remove') {
              <button class="link-button" type="button" [disabled]="readOnly()" [attr.aria-label]="'Remove ' + link.text" (click)="disconnect(link.id)">Remove</button>
            } @else {
              <button class="link-button" type="button" [attr.aria-label]="'Edit ' + link.text" (click)="openConnection(link.id)">Edit</button>
            }
          </li>
        }
      </ul>
    }
  `,
  styles: `
    :host {
      display: block;
    }
    h2 {
      font: var(--mat-sys-title-medium);
      margin: 0 0 12px;
    }
    .issues {
      margin: 0 0 12px;
      padding: 8px 12px 8px 28px;
      border-radius: 8px;
      background: var(--mat-sys-error-container);
      color: var(--mat-sys-on-error-container);
      font: var(--mat-sys-body-small);
    }
    h3 {
      font: var(--mat-sys-title-small);
      margin: 16px 0 4px;
    }
    .links {
      list-style: none;
      margin: 0;
      padding: 0;
      font: var(--mat-sys-body-medium);
      li {
        display: flex;
        justify-content: space-between;
        align-items: center;
        border-bottom: 1px solid var(--mat-sys-outline-variant);
      }
    }
    .link-button {
      border: 0;
      background: none;
      color: var(--mat-sys-primary);
      font: var(--mat-sys-label-large);
      padding: 8px 0;
      cursor: pointer;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PropertiesPanel {
  readonly model = input.required<EditableModel>();
  readonly nodeIds = input.required<readonly string[]>();
  readonly connectionIds = input.required<readonly string[]>();
  /** Issues by canvas id. */
  readonly issuesById = input.required<ReadonlyMap<string, readonly string[]>>();
  readonly readOnly = input(false);
  readonly edited = output<PanelEdit>();

  protected readonly selected = computed<Selected>(() => {
    const model = this.model();
    const count = this.nodeIds().length + this.connectionIds().length;
    if (count === 0) return { kind: 'model' };
    if (count > 1) return { kind: 'many', count };
    const node = this.nodeIds()[0];
    if (node !== undefined) {
      const ref = parseNodeId(node);
      if (!ref) return { kind: 'model' };
      if (model.kind === 'fault-tree') {
        if (ref.kind === 'gate') {
          const item = model.gates.find((gate) => gate.id === ref.id);
          return item ? { kind: 'gate', item } : { kind: 'model' };
        }
        if (ref.kind === 'event') {
          const item = model.events.find((event) => event.id === ref.id);
          return item ? { kind: 'event', item } : { kind: 'model' };
        }
        if (ref.kind === 'ccf') {
          const item = model.ccf?.find((group) => group.id === ref.id);
          return item ? { kind: 'ccf', item } : { kind: 'model' };
        }
        return { kind: 'model' };
      }
      if (ref.kind !== 'state') return { kind: 'model' };
      const chain = ref.part === undefined ? model : model.parts?.find((part) => part.id === ref.part);
      const item = chain?.states.find((state) => state.id === ref.id);
      return item ? { kind: 'state', item, ...(ref.part ? { part: ref.part } : {}) } : { kind: 'model' };
    }
    const connection = parseConnectionId(this.connectionIds()[0]);
    if (connection?.kind === 'transition' && model.kind === 'markov') {
      const chain = connection.part === undefined ? model : model.parts?.find((part) => part.id === connection.part);
      const item = chain?.transitions[connection.index];
      if (item) return { kind: 'transition', item, index: connection.index, ...(connection.part ? { part: connection.part } : {}) };
    }
    return { kind: 'many', count };
  });

  protected readonly gateItem = computed(() => {
    const selected = this.selected();
    return selected.kind === 'gate' ? selected.item : null;
  });
  protected readonly eventItem = computed(() => {
    const selected = this.selected();
    return selected.kind === 'event' ? selected.item : null;
  });
  protected readonly ccfItem = computed(() => {
    const selected = this.selected();
    return selected.kind === 'ccf' ? selected.item : null;
  });
  protected readonly stateItem = computed(() => {
    const selected = this.selected();
    return selected.kind === 'state' ? selected.item : null;
  });
  protected readonly transitionItem = computed(() => {
    const selected = this.selected();
    return selected.kind === 'transition' ? selected.item : null;
  });

  /** The model when it is a state model, for its test schedules. */
  protected readonly markovModel = computed(() => {
    const model = this.model();
    return model.kind === 'markov' ? model : null;
  });

  protected readonly heading = computed(() => {
    const selected = this.selected();
    switch (selected.kind) {
      case 'model':
        return this.model().kind === 'fault-tree' ? 'Fault tree' : 'State model';
      case 'many':
        return `${selected.count} items selected`;
      case 'gate':
        return `Gate ${selected.item.id}`;
      case 'event':
        return `Event ${selected.item.id}`;
      case 'ccf':
        return `Common-cause group ${selected.item.id}`;
      case 'state':
        return `State ${selected.item.id}`;
      case 'transition':
        return `Transition ${selected.item.from} → ${selected.item.to}`;
    }
  });

  protected readonly issues = computed(() => {
    const id = this.nodeIds()[0] ?? this.connectionIds()[0];
    return id === undefined || this.nodeIds().length + this.connectionIds().length !== 1 ? [] : (this.issuesById().get(id) ?? []);
  });

  /** Ids of the model's other items, which a renamed item may not take. */
  protected readonly takenIds = computed<ReadonlySet<string>>(() => {
    const model = this.model();
    const selected = this.selected();
    if (model.kind === 'fault-tree') {
      if (selected.kind === 'ccf') return new Set((model.ccf ?? []).map((group) => group.id));
      return new Set([...model.events.map((event) => event.id), ...model.gates.map((gate) => gate.id)]);
    }
    const part = selected.kind === 'state' ? selected.part : undefined;
    const chain = part === undefined ? model : model.parts?.find((candidate) => candidate.id === part);
    return new Set(chain?.states.map((state) => state.id) ?? []);
  });

  /** The connections of the selected card, so they can be removed or opened without a pointer. */
  protected readonly links = computed<readonly Link[]>(() => {
    const model = this.model();
    const selected = this.selected();
    if (model.kind === 'fault-tree') {
      if (selected.kind === 'gate') {
        return selected.item.inputs.map((input) => ({ id: connectionId({ kind: 'input', gate: selected.item.id, input }), text: `input ${input}`, action: 'remove' }));
      }
      if (selected.kind === 'ccf') {
        return selected.item.members.map((member) => ({ id: connectionId({ kind: 'member', group: selected.item.id, member }), text: `member ${member}`, action: 'remove' }));
      }
      if (selected.kind === 'event') {
        const id = selected.item.id;
        return [
          ...model.gates.filter((gate) => gate.inputs.includes(id)).map((gate) => ({ id: connectionId({ kind: 'input', gate: gate.id, input: id }), text: `feeds ${gate.id}`, action: 'remove' as const })),
          ...(model.ccf ?? []).filter((group) => group.members.includes(id)).map((group) => ({ id: connectionId({ kind: 'member', group: group.id, member: id }), text: `in ${group.id}`, action: 'remove' as const })),
        ];
      }
      return [];
    }
    if (selected.kind !== 'state') return [];
    const chain = selected.part === undefined ? model : model.parts?.find((part) => part.id === selected.part);
    return (chain?.transitions ?? []).flatMap((transition, index) =>
      transition.from === selected.item.id || transition.to === selected.item.id
        ? [{ id: connectionId({ kind: 'transition', index, ...(selected.part ? { part: selected.part } : {}) }), text: `${transition.from} → ${transition.to}`, action: 'open' as const }]
        : [],
    );
  });

  protected readonly isTop = computed(() => {
    const model = this.model();
    const selected = this.selected();
    return model.kind === 'fault-tree' && (selected.kind === 'gate' || selected.kind === 'event') && model.top === selected.item.id;
  });

  protected editGate(gate: DraftGate): void {
    const model = this.model();
    const selected = this.selected();
    if (model.kind !== 'fault-tree' || selected.kind !== 'gate') return;
    this.emit(updateGate(model, selected.item.id, gate), selected.item.id !== gate.id ? { kind: 'gate', id: gate.id } : undefined);
  }

  protected editEvent(event: BasicEvent): void {
    const model = this.model();
    const selected = this.selected();
    if (model.kind !== 'fault-tree' || selected.kind !== 'event') return;
    this.emit(updateEvent(model, selected.item.id, event), selected.item.id !== event.id ? { kind: 'event', id: event.id } : undefined);
  }

  protected editGroup(group: DraftCommonCauseGroup): void {
    const model = this.model();
    const selected = this.selected();
    if (model.kind !== 'fault-tree' || selected.kind !== 'ccf') return;
    this.emit(updateCommonCauseGroup(model, selected.item.id, group), selected.item.id !== group.id ? { kind: 'ccf', id: group.id } : undefined);
  }

  protected editState(state: MarkovState): void {
    const model = this.model();
    const selected = this.selected();
    if (model.kind !== 'markov' || selected.kind !== 'state') return;
    const renamed = selected.item.id !== state.id ? ({ kind: 'state', id: state.id, ...(selected.part ? { part: selected.part } : {}) } as NodeRef) : undefined;
    this.emit(updateState(model, selected.part, selected.item.id, state), renamed);
  }

  protected editTransition(transition: MarkovTransition): void {
    const model = this.model();
    const selected = this.selected();
    if (model.kind !== 'markov' || selected.kind !== 'transition') return;
    this.emit(updateTransition(model, selected.part, selected.index, transition));
  }

  protected editHeader(header: ModelHeader): void {
    const next: Record<string, unknown> = { ...this.model(), name: header.name, mission: header.mission };
    if (header.description) next['description'] = header.description;
    else delete next['description'];
    this.emit(next as unknown as EditableModel);
  }

  protected makeTop(): void {
    const model = this.model();
    const selected = this.selected();
    if (model.kind !== 'fault-tree' || (selected.kind !== 'gate' && selected.kind !== 'event')) return;
    this.emit(setTop(model, selected.item.id));
  }

  protected disconnect(connection: string): void {
    this.emit(deleteItems(this.model(), [], [connection]));
  }

  protected openConnection(connection: string): void {
    this.edited.emit({ model: this.model(), selectConnection: connection });
  }

  protected emit(model: EditableModel, renamed?: NodeRef): void {
    this.edited.emit(renamed ? { model, select: nodeId(renamed) } : { model });
  }
}
