import {
  ChangeDetectionStrategy,
  Component,
  ErrorHandler,
  computed,
  DestroyRef,
  effect,
  inject,
  input,
  output,
  signal,
  untracked,
  viewChild,
} from '@angular/core';
import {
  EFMarkerType,
  FCanvasComponent,
  FFlowComponent,
  FFlowModule,
  FZoomDirective,
  type FCreateConnectionEvent,
  type FCreateNodeEvent,
  type FMoveNodesEvent,
  type FSelectionChangeEvent,
} from '@foblex/flow';
import { MatIconButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTooltip } from '@angular/material/tooltip';
import type { ValidationIssue } from '../../../shared/api/errors.js';
import { AutoLayout } from './auto-layout';
import { CanvasFocus } from './canvas-focus';
import { CardSizeWatch, CardSizes } from './card-sizes';
import { commonCauseBands } from './common-cause-bands';
import { canvasView, type CanvasNode } from './canvas-view';
import { layoutFromElk, layoutGraph } from './layout-graph';
import {
  addItem,
  connect,
  copyItems,
  deleteItems,
  inputConnector,
  moveNodes,
  outputConnector,
  pasteItems,
  withLayout,
  type Clipboard,
  type EditableModel,
  type PaletteKind,
} from './model-graph';
import { OutdatedDevicesNotice } from '../devices/outdated-devices-notice';
import { PinMarker } from '../review/pin-marker';
import { Palette } from './palette';
import { PropertiesPanel, type PanelEdit } from './properties/properties-panel';

/** How far the arrow keys move the selected cards, in canvas pixels (Shift: ten times as far). */
const NUDGE = 10;
const PASTE_OFFSET = { x: 40, y: 40 };

/**
 * The model canvas: palette, the drawing (cards, connections, minimap) and the properties panel. It owns
 * the selection and the clipboard; every change to the model goes out through `edit` (the editor page
 * keeps the history and saves), and undo/redo requests through `undo` and `redo`.
 */
@Component({
  selector: 'pl-model-canvas',
  imports: [FFlowModule, Palette, PinMarker, PropertiesPanel, CardSizeWatch, OutdatedDevicesNotice, MatIconButton, MatIcon, MatTooltip],
  providers: [CardSizes],
  templateUrl: './model-canvas.html',
  styleUrl: './model-canvas.scss',
  host: { '(document:keydown)': 'onKeydown($event)' },
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ModelCanvas {
  private readonly autoLayout = inject(AutoLayout);
  private readonly focus = inject(CanvasFocus);
  private readonly snackBar = inject(MatSnackBar);
  private readonly errorHandler = inject(ErrorHandler);
  private readonly cardSizes = inject(CardSizes);

  readonly model = input.required<EditableModel>();
  readonly issues = input<readonly ValidationIssue[]>([]);
  readonly readOnly = input(false);
  readonly canUndo = input(false);
  readonly canRedo = input(false);
  readonly edit = output<EditableModel>();
  readonly undo = output<void>();
  readonly redo = output<void>();

  private readonly flow = viewChild(FFlowComponent);
  private readonly canvas = viewChild(FCanvasComponent);
  private readonly zoom = viewChild(FZoomDirective);

  protected readonly markerEnd = EFMarkerType.END_ALL_STATES;
  protected readonly view = computed(() => canvasView(this.model(), this.issues()));
  /**
   * The connections drawn: gate inputs and transitions. A common-cause membership is drawn by its band
   * (and listed, removable, in the group's and the event's properties); a line per member under the band
   * would only catch the pointer where the background should be.
   */
  protected readonly drawnConnections = computed(() => this.view().connections.filter((connection) => connection.variant !== 'member'));
  /** Recomputed when the model or a wrapped card's size changes, never while the view pans. */
  protected readonly bands = computed(() => (this.model().kind === 'fault-tree' ? commonCauseBands(this.view().nodes, this.cardSizes.measured()) : []));
  protected readonly issuesById = computed(() => {
    const byId = new Map<string, readonly string[]>();
    for (const item of [...this.view().nodes, ...this.view().connections]) if (item.issues.length > 0) byId.set(item.id, item.issues);
    return byId;
  });
  protected readonly selectedNodes = signal<readonly string[]>([]);
  protected readonly selectedConnections = signal<readonly string[]>([]);
  /** The output a keyboard connection starts from ("c" on a selected card), until Enter on the target. */
  protected readonly connectingFrom = signal<string | null>(null);
  protected readonly laying = signal(false);
  protected readonly highlighted = computed(() => new Set(this.focus.highlighted()));
  protected readonly status = signal('');
  private clipboard: Clipboard | null = null;
  /** The automatic layout running now, if any, until its positions are in the model. */
  private layoutRun: Promise<void> | null = null;
  private rendered = false;
  private autoLaidOut = false;
  private destroyed = false;

  constructor() {
    inject(DestroyRef).onDestroy(() => (this.destroyed = true));
    // A model without stored positions (imported, generated) is laid out once, as soon as it is shown;
    // once every card has a position, a later import without positions is laid out again.
    effect(() => {
      if (!this.view().needsLayout) this.autoLaidOut = false;
      else if (!this.readOnly() && !this.autoLaidOut && this.view().nodes.length > 0) {
        this.autoLaidOut = true;
        untracked(() => void this.layout(true));
      }
    });
    effect(() => {
      const first = this.focus.highlighted()[0];
      if (first === undefined || !this.rendered) return;
      const node = this.view().nodes.find((candidate) => candidate.ref.id === first);
      if (node) untracked(() => this.canvas()?.centerGroupOrNode(node.id, true));
    });
  }

  protected onRendered(): void {
    this.rendered = true;
    // A nearly empty model stays at scale 1 (fitting one card would blow it up); others fit the view.
    if (this.view().nodes.length < 3) this.canvas()?.resetScaleAndCenter(false);
    else this.canvas()?.fitToScreen({ x: 80, y: 80 }, false);
  }

  protected onCreateNode(event: FCreateNodeEvent<PaletteKind>): void {
    this.add(event.data, { x: event.externalItemRect.x, y: event.externalItemRect.y });
  }

  /** Adds an item in the middle of the visible canvas (the palette's buttons and keyboard). */
  protected addAtCenter(kind: PaletteKind): void {
    const host = this.flow()?.hostElement as HTMLElement | undefined;
    const rect = host?.getBoundingClientRect();
    const center = rect && this.flow() ? this.flow()!.getPositionInFlow({ x: rect.left + rect.width / 2, y: rect.top + rect.height / 2 }) : { x: 0, y: 0 };
    this.add(kind, { x: center.x - 100, y: center.y - 50 });
  }

  private add(kind: PaletteKind, position: { x: number; y: number }): void {
    if (this.readOnly()) return;
    const result = addItem(this.model(), kind, position);
    if ('error' in result) {
      this.tell(result.error);
      return;
    }
    this.edit.emit(result.model);
    this.selectLater([`${result.node.kind}:${result.node.id}`], []);
  }

  protected onCreateConnection(event: FCreateConnectionEvent): void {
    if (this.readOnly() || event.targetId === undefined) return;
    this.connectPorts(event.sourceId, event.targetId);
  }

  private connectPorts(source: string, target: string): void {
    const result = connect(this.model(), source, target);
    if ('error' in result) this.tell(result.error);
    else this.edit.emit(result.model);
  }

  protected onMoveNodes(event: FMoveNodesEvent): void {
    if (this.readOnly()) return;
    const next = moveNodes(this.model(), event.nodes);
    if (next !== this.model()) this.edit.emit(next);
  }

  protected onSelectionChange(event: FSelectionChangeEvent): void {
    this.selectedNodes.set(event.nodeIds);
    this.selectedConnections.set(event.connectionIds);
  }

  protected onPanelEdit(change: PanelEdit): void {
    if (change.model !== this.model()) this.edit.emit(change.model);
    if (change.select) this.selectLater([change.select], []);
    if (change.selectConnection) this.selectLater([], [change.selectConnection]);
  }

  /** A card got keyboard focus: it becomes the selection, as a click would make it. */
  protected onCardFocus(node: CanvasNode): void {
    if (this.selectedNodes().length === 1 && this.selectedNodes()[0] === node.id) return;
    this.flow()?.select([node.id], []);
    this.selectedNodes.set([node.id]);
    this.selectedConnections.set([]);
  }

  protected onCardKeydown(event: KeyboardEvent, node: CanvasNode): void {
    if (event.key !== 'Enter') return;
    const from = this.connectingFrom();
    if (from === null) return;
    event.preventDefault();
    this.connectingFrom.set(null);
    this.status.set('');
    this.connectPorts(outputConnector(from), inputConnector(node.id));
  }

  protected onKeydown(event: KeyboardEvent): void {
    // Shortcuts work wherever the focus is on the page, except while typing or in a dialog or menu.
    const target = event.target as HTMLElement;
    if (event.defaultPrevented || target.closest('input, textarea, select, mat-select, [contenteditable], pl-properties-panel, .cdk-overlay-container')) return;
    const command = event.ctrlKey || event.metaKey;
    const key = event.key.toLowerCase();
    const handled = (action: () => void): void => {
      event.preventDefault();
      action();
    };
    if (command && key === 'z') return handled(() => (event.shiftKey ? this.redo.emit() : this.undo.emit()));
    if (command && key === 'y') return handled(() => this.redo.emit());
    if (command && key === 'c') return handled(() => this.copy());
    if (command && key === 'v') return handled(() => this.paste());
    if (command && key === 'a') return handled(() => this.selectAll());
    if (command) return;
    if (key === 'delete' || key === 'backspace') return handled(() => this.deleteSelection());
    if (key === 'escape') return handled(() => this.cancelConnecting());
    if (key === '+' || key === '=') return handled(() => this.zoomIn());
    if (key === '-') return handled(() => this.zoomOut());
    if (key === 'f') return handled(() => this.fit());
    if (key === '0') return handled(() => this.actualSize());
    if (key === 'l') return handled(() => void this.layout(false));
    if (key === 'c') return handled(() => this.startConnecting());
    const arrows: Record<string, { x: number; y: number }> = { arrowleft: { x: -1, y: 0 }, arrowright: { x: 1, y: 0 }, arrowup: { x: 0, y: -1 }, arrowdown: { x: 0, y: 1 } };
    const direction = arrows[key];
    if (direction && this.selectedNodes().length > 0) handled(() => this.nudge(direction, event.shiftKey ? NUDGE * 10 : NUDGE));
  }

  protected zoomIn(): void {
    this.zoom()?.zoomIn();
  }

  protected zoomOut(): void {
    this.zoom()?.zoomOut();
  }

  protected fit(): void {
    this.canvas()?.fitToScreen({ x: 80, y: 80 }, true);
  }

  /** Shows the drawing at 100 %, centred on what it holds. */
  protected actualSize(): void {
    this.canvas()?.resetScaleAndCenter(true);
  }

  protected deleteSelection(): void {
    if (this.readOnly()) return;
    const nodes = this.selectedNodes();
    const connections = this.selectedConnections();
    if (nodes.length === 0 && connections.length === 0) {
      this.tell('Nothing is selected: select cards or connections first.');
      return;
    }
    this.edit.emit(deleteItems(this.model(), nodes, connections));
    this.selectedNodes.set([]);
    this.selectedConnections.set([]);
  }

  protected copy(): void {
    if (this.selectedNodes().length === 0) {
      this.tell('Select the cards to copy first.');
      return;
    }
    this.clipboard = copyItems(this.model(), this.selectedNodes());
    this.tell(`Copied ${this.selectedNodes().length} item${this.selectedNodes().length === 1 ? '' : 's'}.`);
  }

  protected paste(): void {
    if (this.readOnly() || !this.clipboard) return;
    const result = pasteItems(this.model(), this.clipboard, PASTE_OFFSET);
    if ('error' in result) {
      this.tell(result.error);
      return;
    }
    this.edit.emit(result.model);
    this.selectLater(result.nodeIds, []);
  }

  protected selectAll(): void {
    this.flow()?.selectAll();
    this.selectedNodes.set(this.view().nodes.map((node) => node.id));
    this.selectedConnections.set(this.drawnConnections().map((connection) => connection.id));
  }

  protected startConnecting(): void {
    if (this.readOnly()) return;
    const [only, ...others] = this.selectedNodes();
    if (only === undefined || others.length > 0) {
      this.tell('Select one card to connect from, then press C.');
      return;
    }
    this.connectingFrom.set(only);
    this.status.set(`Connecting from ${only.slice(only.indexOf(':') + 1)}: move to the target card with Tab and press Enter (Escape cancels).`);
  }

  private cancelConnecting(): void {
    this.connectingFrom.set(null);
    this.status.set('');
  }

  private nudge(direction: { x: number; y: number }, distance: number): void {
    if (this.readOnly()) return;
    const positions = new Map(this.view().nodes.map((node) => [node.id, node.position]));
    const moves = this.selectedNodes().flatMap((id) => {
      const position = positions.get(id);
      return position ? [{ id, position: { x: position.x + direction.x * distance, y: position.y + direction.y * distance } }] : [];
    });
    this.edit.emit(moveNodes(this.model(), moves));
  }

  /**
   * Resolves once a layout in progress has put its positions into the model (at once when none runs), so
   * that an action reading the saved draft (a solve) includes them instead of racing with them.
   */
  settled(): Promise<void> {
    return this.layoutRun ?? Promise.resolve();
  }

  /** Lays the model out with ELK (in the worker) and stores the positions in its layout. */
  protected layout(automatic: boolean): Promise<void> {
    if (this.readOnly() || this.laying()) return this.settled();
    const run = this.runLayout(automatic).finally(() => {
      if (this.layoutRun === run) this.layoutRun = null;
    });
    this.layoutRun = run;
    return run;
  }

  private async runLayout(automatic: boolean): Promise<void> {
    const model = this.model();
    const view = this.view();
    this.laying.set(true);
    try {
      const laidOut = await this.autoLayout.layout(layoutGraph(model, view));
      // Edits made while the worker ran win: only positions of nodes that still have none are replaced.
      const current = this.model();
      const positions = layoutFromElk(view, laidOut);
      this.edit.emit(withLayout(current, automatic ? { ...positions, ...(current.layout ?? {}) } : { ...(current.layout ?? {}), ...positions }));
      this.afterFrame(() => this.fit());
    } catch (error) {
      this.errorHandler.handleError(error);
    } finally {
      this.laying.set(false);
    }
  }

  /** Runs after the next frame unless the canvas is gone by then (reading its view children would throw). */
  private afterFrame(action: () => void): void {
    requestAnimationFrame(() => {
      if (!this.destroyed) action();
    });
  }

  private selectLater(nodes: readonly string[], connections: readonly string[]): void {
    this.selectedNodes.set(nodes);
    this.selectedConnections.set(connections);
    this.afterFrame(() => this.flow()?.select([...nodes], [...connections]));
  }

  private tell(message: string): void {
    this.status.set(message);
    this.snackBar.open(message, 'Dismiss', { duration: 5000 });
  }
}
