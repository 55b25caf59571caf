import { ChangeDetectionStrategy, Component, computed, input, output } from '@angular/core';
import { FFlowModule } from '@foblex/flow';
import type { EditableModel, PaletteKind } from './model-graph';

interface PaletteEntry {
  readonly kind: PaletteKind;
  readonly title: string;
  readonly hint: string;
  readonly shape: 'gate' | 'vote' | 'event' | 'fixed' | 'ccf' | 'up' | 'down';
}

const FAULT_TREE_ENTRIES: readonly PaletteEntry[] = [
  { kind: 'or', title: 'OR gate', hint: 'fails when any input fails', shape: 'gate' },
  { kind: 'and', title: 'AND gate', hint: 'fails when all inputs fail', shape: 'gate' },
  { kind: 'atLeast', title: 'Voting gate', hint: 'M out of N to trip', shape: 'vote' },
  { kind: 'rateEvent', title: 'Device event', hint: 'failure rates and test plan', shape: 'event' },
  { kind: 'probabilityEvent', title: 'Fixed probability', hint: 'probability on demand', shape: 'fixed' },
  { kind: 'ccf', title: 'Common cause', hint: 'beta factor over members', shape: 'ccf' },
];

const STATE_MODEL_ENTRIES: readonly PaletteEntry[] = [
  { kind: 'upState', title: 'Up state', hint: 'the function can act', shape: 'up' },
  { kind: 'downState', title: 'Down state', hint: 'the function cannot act', shape: 'down' },
];

/** The items to drag onto the canvas; each is also a button that adds the item in the middle of the view. */
@Component({
  selector: 'pl-palette',
  imports: [FFlowModule],
  template: `
    <h2 class="heading">Add</h2>
    <ul role="list">
      @for (entry of entries(); track entry.kind) {
        <li>
          <button
            type="button"
            class="entry"
            fExternalItem
            [fData]="entry.kind"
            [disabled]="disabled()"
            [attr.data-palette]="entry.kind"
            (click)="add.emit(entry.kind)"
          >
            <span class="entry-inner">
              <span [class]="'shape shape-' + entry.shape" aria-hidden="true"></span>
              <span class="text">
                <span class="title">{{ entry.title }}</span>
                <span class="hint">{{ entry.hint }}</span>
              </span>
            </span>
          </button>
        </li>
      }
    </ul>
    <p class="help">Drag onto the canvas, or press Enter to add in the middle.</p>
  `,
  styleUrl: './palette.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Palette {
  readonly kind = input.required<EditableModel['kind']>();
  readonly disabled = input(false);
  readonly add = output<PaletteKind>();

  protected readonly entries = computed(() => (this.kind() === 'fault-tree' ? FAULT_TREE_ENTRIES : STATE_MODEL_ENTRIES));
}
