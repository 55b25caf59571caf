import type {
  BasicEvent,
  CommonCauseGroup,
  DemandMode,
  Gate,
  GateType,
  MarkovState,
  MarkovTest,
  MarkovTransition,
} from '../../../shared/model-file.js';

/**
 * The model being edited on the canvas: the model file (shared/model-file.ts) loosened where a draft may
 * be unfinished (a gate without inputs yet, a group with one member, no top chosen). Every operation here
 * is a pure function returning a new model, so undo/redo keeps snapshots and nothing is mutated in place.
 */
export type Position = { readonly x: number; readonly y: number };
export type Layout = Readonly<Record<string, Position>>;

interface DraftHeader {
  readonly format: 'proofline/model';
  readonly version: 1;
  readonly name: string;
  readonly description?: string;
  readonly mission: { readonly hours: number; readonly demand: DemandMode };
  readonly layout?: Layout;
}

export type DraftGate = Omit<Gate, 'inputs'> & { readonly inputs: readonly string[] };
export type DraftCommonCauseGroup = Omit<CommonCauseGroup, 'members'> & { readonly members: readonly string[] };

export interface FaultTreeDraft extends DraftHeader {
  readonly kind: 'fault-tree';
  readonly events: readonly BasicEvent[];
  readonly gates: readonly DraftGate[];
  readonly ccf?: readonly DraftCommonCauseGroup[];
  readonly top: string;
}

export interface DraftStateChain {
  readonly states: readonly MarkovState[];
  readonly transitions: readonly MarkovTransition[];
  readonly tests?: readonly MarkovTest[];
}

export interface DraftPart extends DraftStateChain {
  readonly id: string;
  readonly label?: string;
}

export interface MarkovDraft extends DraftHeader, DraftStateChain {
  readonly kind: 'markov';
  readonly parts?: readonly DraftPart[];
}

export type EditableModel = FaultTreeDraft | MarkovDraft;

/** What a canvas node stands for. `part` is the id of a state model's independent part, if any. */
export type NodeRef =
  | { readonly kind: 'gate'; readonly id: string }
  | { readonly kind: 'event'; readonly id: string }
  | { readonly kind: 'ccf'; readonly id: string }
  | { readonly kind: 'state'; readonly id: string; readonly part?: string };

/** What a canvas connection stands for. */
export type ConnectionRef =
  | { readonly kind: 'input'; readonly gate: string; readonly input: string }
  | { readonly kind: 'member'; readonly group: string; readonly member: string }
  | { readonly kind: 'transition'; readonly part?: string; readonly index: number };

/** Items the palette offers. */
export type PaletteKind = 'or' | 'and' | 'atLeast' | 'rateEvent' | 'probabilityEvent' | 'ccf' | 'upState' | 'downState';

export function nodeId(ref: NodeRef): string {
  if (ref.kind === 'state' && ref.part) return `state:${ref.part}/${ref.id}`;
  return `${ref.kind}:${ref.id}`;
}

export function parseNodeId(value: string): NodeRef | null {
  const colon = value.indexOf(':');
  const kind = value.slice(0, colon);
  const rest = value.slice(colon + 1);
  if (colon < 0 || rest === '') return null;
  if (kind === 'gate' || kind === 'event' || kind === 'ccf') return { kind, id: rest };
  if (kind === 'state') {
    const slash = rest.indexOf('/');
    return slash < 0 ? { kind, id: rest } : { kind, part: rest.slice(0, slash), id: rest.slice(slash + 1) };
  }
  return null;
}

export function connectionId(ref: ConnectionRef): string {
  switch (ref.kind) {
    case 'input':
      return `input|${ref.gate}|${ref.input}`;
    case 'member':
      return `member|${ref.group}|${ref.member}`;
    case 'transition':
      return `transition|${ref.part ?? ''}|${ref.index}`;
  }
}

export function parseConnectionId(value: string): ConnectionRef | null {
  const [kind, first, second] = value.split('|');
  if (kind === 'input' && first && second) return { kind, gate: first, input: second };
  if (kind === 'member' && first && second) return { kind, group: first, member: second };
  if (kind === 'transition' && second !== undefined && /^\d+$/.test(second)) {
    return first ? { kind, part: first, index: Number(second) } : { kind, index: Number(second) };
  }
  return null;
}

/** Connector ids: every node has an output ("out") and, where it takes connections, an input ("in"). */
export const outputConnector = (node: string): string => `${node}>out`;
export const inputConnector = (node: string): string => `${node}>in`;

function nodeOfConnector(connector: string): string {
  return connector.replace(/>(out|in)$/, '');
}

/** The key of a node's position in the model's `layout` (item ids; "part/state"; "ccf:group"). */
export function layoutKey(ref: NodeRef): string {
  if (ref.kind === 'ccf') return `ccf:${ref.id}`;
  if (ref.kind === 'state' && ref.part) return `${ref.part}/${ref.id}`;
  return ref.id;
}

export function blankModel(kind: EditableModel['kind'], name: string, missionHours: number, demand: DemandMode): EditableModel {
  const header = { format: 'proofline/model', version: 1, name, mission: { hours: missionHours, demand } } as const;
  if (kind === 'fault-tree') return { ...header, kind, events: [], gates: [], ccf: [], top: '' };
  return { ...header, kind, states: [], transitions: [] };
}

/**
 * Reads a stored draft for editing: whatever is missing or of the wrong type becomes empty, so an
 * unfinished or hand-edited draft still opens (its issues are listed beside it, nothing is dropped that
 * has the right shape).
 */
export function toEditable(content: Record<string, unknown>): EditableModel {
  const array = <T>(value: unknown): T[] => (Array.isArray(value) ? (value as T[]) : []);
  const mission = (content['mission'] ?? {}) as { hours?: unknown; demand?: unknown };
  const header = {
    ...content,
    format: 'proofline/model' as const,
    version: 1 as const,
    name: typeof content['name'] === 'string' ? content['name'] : '',
    mission: {
      hours: typeof mission.hours === 'number' ? mission.hours : 0,
      demand: (mission.demand === 'high' || mission.demand === 'continuous' ? mission.demand : 'low') as DemandMode,
    },
    layout: (typeof content['layout'] === 'object' && content['layout'] !== null ? content['layout'] : {}) as Layout,
  };
  if (content['kind'] === 'markov') {
    return {
      ...header,
      kind: 'markov',
      states: array(content['states']),
      transitions: array(content['transitions']),
      ...(content['tests'] !== undefined ? { tests: array<MarkovTest>(content['tests']) } : {}),
      ...(content['parts'] !== undefined ? { parts: array<DraftPart>(content['parts']) } : {}),
    };
  }
  return {
    ...header,
    kind: 'fault-tree',
    events: array(content['events']),
    gates: array<DraftGate>(content['gates']).map((item) => ({ ...item, inputs: array<string>(item.inputs) })),
    ccf: array<DraftCommonCauseGroup>(content['ccf']).map((group) => ({ ...group, members: array<string>(group.members) })),
    top: typeof content['top'] === 'string' ? content['top'] : '',
  };
}

/** A fresh id with the prefix that no item of the model uses yet: G1, G2, ... */
export function freshId(taken: ReadonlySet<string>, prefix: string): string {
  for (let number = 1; ; number++) {
    const candidate = `${prefix}${number}`;
    if (!taken.has(candidate)) return candidate;
  }
}

function faultTreeIds(model: FaultTreeDraft): Set<string> {
  return new Set([...model.events.map((item) => item.id), ...model.gates.map((item) => item.id), ...(model.ccf ?? []).map((item) => item.id)]);
}

function stateIds(chain: DraftStateChain): Set<string> {
  return new Set(chain.states.map((state) => state.id));
}

function withPosition(model: EditableModel, ref: NodeRef, position: Position): Layout {
  return { ...(model.layout ?? {}), [layoutKey(ref)]: { x: Math.round(position.x), y: Math.round(position.y) } };
}

export interface Added {
  readonly model: EditableModel;
  readonly node: NodeRef;
}

/** Adds a palette item at a position; the first gate of an empty tree becomes its top. */
export function addItem(model: EditableModel, kind: PaletteKind, position: Position): Added | { readonly error: string } {
  if (model.kind === 'fault-tree') {
    const taken = faultTreeIds(model);
    if (kind === 'or' || kind === 'and' || kind === 'atLeast') {
      const id = freshId(taken, 'G');
      const gate: DraftGate = { id, type: kind as GateType, inputs: [], ...(kind === 'atLeast' ? { k: 2 } : {}) };
      const ref: NodeRef = { kind: 'gate', id };
      const top = model.top === '' ? id : model.top;
      return { model: { ...model, gates: [...model.gates, gate], top, layout: withPosition(model, ref, position) }, node: ref };
    }
    if (kind === 'rateEvent' || kind === 'probabilityEvent') {
      const id = freshId(taken, 'E');
      const event: BasicEvent =
        kind === 'rateEvent'
          ? { id, lambdaDU: 1e-6, proofTest: { intervalHours: Math.min(8760, model.mission.hours || 8760) } }
          : { id, probability: 0.001 };
      const ref: NodeRef = { kind: 'event', id };
      return { model: { ...model, events: [...model.events, event], layout: withPosition(model, ref, position) }, node: ref };
    }
    if (kind === 'ccf') {
      const id = freshId(taken, 'CCF');
      const group: DraftCommonCauseGroup = { id, members: [], beta: 0.05, model: 'beta' };
      const ref: NodeRef = { kind: 'ccf', id };
      return { model: { ...model, ccf: [...(model.ccf ?? []), group], layout: withPosition(model, ref, position) }, node: ref };
    }
    return { error: 'States belong to state models; this is a fault tree.' };
  }
  if (kind !== 'upState' && kind !== 'downState') return { error: 'Gates, events and common-cause groups belong to fault trees; this is a state model.' };
  const id = freshId(stateIds(model), kind === 'upState' ? 'OK' : 'DOWN');
  const first = model.states.length === 0;
  const state: MarkovState = { id, ...(first ? { initial: 1 } : {}), ...(kind === 'downState' ? { down: true } : {}) };
  const ref: NodeRef = { kind: 'state', id };
  return { model: { ...model, states: [...model.states, state], layout: withPosition(model, ref, position) }, node: ref };
}

function chainOf(model: MarkovDraft, part: string | undefined): DraftStateChain | undefined {
  return part === undefined ? model : model.parts?.find((candidate) => candidate.id === part);
}

/** Puts a chain's states, transitions and tests (exactly these: no tests means none) into the model. */
function withChain(model: MarkovDraft, part: string | undefined, chain: DraftStateChain): MarkovDraft {
  const apply = <T extends DraftStateChain>(target: T): T => {
    const { tests: _replaced, ...others } = target;
    return { ...others, states: chain.states, transitions: chain.transitions, ...(chain.tests !== undefined ? { tests: chain.tests } : {}) } as T;
  };
  if (part === undefined) return apply(model);
  return { ...model, parts: (model.parts ?? []).map((candidate) => (candidate.id === part ? apply(candidate) : candidate)) };
}

/** Whether `target` is `source` or lies below it (so making `source` an input of `target` would loop). */
function reaches(model: FaultTreeDraft, from: string, target: string): boolean {
  const byId = new Map(model.gates.map((item) => [item.id, item]));
  const seen = new Set<string>();
  const stack = [from];
  while (stack.length > 0) {
    const id = stack.pop()!;
    if (id === target) return true;
    if (seen.has(id)) continue;
    seen.add(id);
    stack.push(...(byId.get(id)?.inputs ?? []));
  }
  return false;
}

export type Connected = { readonly model: EditableModel } | { readonly error: string };

/**
 * Connects an output to an input: an event or gate into a gate (it becomes an input), an event into a
 * common-cause group (it becomes a member), a state into another state of the same chain (a transition,
 * rate 0 until the user sets it). Refuses, with the reason, what the model file cannot hold.
 */
export function connect(model: EditableModel, sourceConnector: string, targetConnector: string): Connected {
  const source = parseNodeId(nodeOfConnector(sourceConnector));
  const target = parseNodeId(nodeOfConnector(targetConnector));
  if (!source || !target) return { error: 'Drop the connection on the input of another item.' };
  if (model.kind === 'fault-tree') {
    if (target.kind === 'gate') {
      if (source.kind !== 'gate' && source.kind !== 'event') return { error: 'Only events and gates can be inputs of a gate.' };
      const gate = model.gates.find((item) => item.id === target.id);
      if (!gate) return { error: `There is no gate "${target.id}".` };
      if (gate.inputs.includes(source.id)) return { error: `"${source.id}" is already an input of "${gate.id}".` };
      if (source.kind === 'gate' && reaches(model, source.id, gate.id)) {
        return { error: `"${source.id}" cannot be an input of "${gate.id}": the gates would form a loop.` };
      }
      return { model: { ...model, gates: model.gates.map((item) => (item === gate ? { ...item, inputs: [...item.inputs, source.id] } : item)) } };
    }
    if (target.kind === 'ccf') {
      if (source.kind !== 'event') return { error: 'Only basic events share a common cause; connect events to the group.' };
      const event = model.events.find((item) => item.id === source.id);
      if (event && 'probability' in event) return { error: `"${source.id}" has a fixed probability; common cause needs failure rates.` };
      const groups = model.ccf ?? [];
      const group = groups.find((item) => item.id === target.id);
      if (!group) return { error: `There is no common-cause group "${target.id}".` };
      if (group.members.includes(source.id)) return { error: `"${source.id}" is already in "${group.id}".` };
      const other = groups.find((item) => item !== group && item.members.includes(source.id));
      if (other) return { error: `"${source.id}" is already in common-cause group "${other.id}"; an event can be in one group only.` };
      return { model: { ...model, ccf: groups.map((item) => (item === group ? { ...item, members: [...item.members, source.id] } : item)) } };
    }
    return { error: 'Connect into a gate or a common-cause group.' };
  }
  if (source.kind !== 'state' || target.kind !== 'state') return { error: 'Connect one state to another.' };
  if (source.part !== target.part) return { error: 'Transitions stay inside one independent part of the state model.' };
  if (source.id === target.id) return { error: 'A transition goes to another state.' };
  const chain = chainOf(model, source.part);
  if (!chain) return { error: `There is no part "${source.part}".` };
  if (chain.transitions.some((item) => item.from === source.id && item.to === target.id)) {
    return { error: `There is already a transition from "${source.id}" to "${target.id}".` };
  }
  const transition: MarkovTransition = { from: source.id, to: target.id, rate: 0 };
  return { model: withChain(model, source.part, { ...chain, transitions: [...chain.transitions, transition] }) };
}

/** Removes nodes and connections; references to removed items go with them (inputs, members, transitions). */
export function deleteItems(model: EditableModel, nodeIds: readonly string[], connectionIds: readonly string[]): EditableModel {
  const nodes = nodeIds.map(parseNodeId).filter((ref): ref is NodeRef => ref !== null);
  const connections = connectionIds.map(parseConnectionId).filter((ref): ref is ConnectionRef => ref !== null);
  const layout = { ...(model.layout ?? {}) };
  for (const ref of nodes) delete layout[layoutKey(ref)];
  if (model.kind === 'fault-tree') {
    const gone = new Set(nodes.filter((ref) => ref.kind !== 'ccf' && ref.kind !== 'state').map((ref) => ref.id));
    const goneGroups = new Set(nodes.filter((ref) => ref.kind === 'ccf').map((ref) => ref.id));
    const cutInputs = new Set(connections.flatMap((ref) => (ref.kind === 'input' ? [`${ref.gate}|${ref.input}`] : [])));
    const cutMembers = new Set(connections.flatMap((ref) => (ref.kind === 'member' ? [`${ref.group}|${ref.member}`] : [])));
    return {
      ...model,
      layout,
      events: model.events.filter((item) => !gone.has(item.id)),
      gates: model.gates
        .filter((item) => !gone.has(item.id))
        .map((item) => {
          const inputs = item.inputs.filter((input) => !gone.has(input) && !cutInputs.has(`${item.id}|${input}`));
          return inputs.length === item.inputs.length ? item : { ...item, inputs };
        }),
      ccf: (model.ccf ?? [])
        .filter((group) => !goneGroups.has(group.id))
        .map((group) => {
          const members = group.members.filter((member) => !gone.has(member) && !cutMembers.has(`${group.id}|${member}`));
          return members.length === group.members.length ? group : { ...group, members };
        }),
      top: gone.has(model.top) ? '' : model.top,
    };
  }
  const prune = (chain: DraftStateChain, part: string | undefined): DraftStateChain => {
    const gone = new Set(nodes.filter((ref) => ref.kind === 'state' && ref.part === part).map((ref) => ref.id));
    const cut = new Set(connections.flatMap((ref) => (ref.kind === 'transition' && ref.part === part ? [ref.index] : [])));
    const tests = chain.tests
      ?.map((test) => ({ ...test, moves: test.moves.filter((move) => !gone.has(move.from) && !gone.has(move.to)) }))
      .filter((test) => test.moves.length > 0);
    return {
      states: chain.states.filter((state) => !gone.has(state.id)),
      transitions: chain.transitions.filter((item, index) => !cut.has(index) && !gone.has(item.from) && !gone.has(item.to)),
      ...(tests !== undefined ? { tests } : {}),
    };
  };
  return {
    ...model,
    ...prune(model, undefined),
    layout,
    ...(model.parts ? { parts: model.parts.map((part) => ({ ...part, ...prune(part, part.id) })) } : {}),
  };
}

/** Stores the positions of moved nodes in the model's layout. */
export function moveNodes(model: EditableModel, moves: readonly { readonly id: string; readonly position: Position }[]): EditableModel {
  const layout = { ...(model.layout ?? {}) };
  let changed = false;
  for (const move of moves) {
    const ref = parseNodeId(move.id);
    if (!ref) continue;
    const key = layoutKey(ref);
    const next = { x: Math.round(move.position.x), y: Math.round(move.position.y) };
    if (layout[key]?.x === next.x && layout[key]?.y === next.y) continue;
    layout[key] = next;
    changed = true;
  }
  return changed ? { ...model, layout } : model;
}

/** Replaces the whole layout (after an automatic layout). */
export function withLayout(model: EditableModel, layout: Layout): EditableModel {
  return { ...model, layout };
}

function renameIn(list: readonly string[], from: string, to: string): string[] {
  return list.map((item) => (item === from ? to : item));
}

function renameLayout(layout: Layout | undefined, from: string, to: string): Layout {
  const next = { ...(layout ?? {}) };
  if (next[from]) {
    next[to] = next[from];
    delete next[from];
  }
  return next;
}

/** Replaces a gate; a changed id is carried into every gate that uses it, the top and the layout. */
export function updateGate(model: FaultTreeDraft, id: string, gate: DraftGate): FaultTreeDraft {
  const renamed = gate.id !== id;
  return {
    ...model,
    gates: model.gates.map((item) => (item.id === id ? gate : renamed ? { ...item, inputs: renameIn(item.inputs, id, gate.id) } : item)),
    top: renamed && model.top === id ? gate.id : model.top,
    layout: renamed ? renameLayout(model.layout, id, gate.id) : model.layout,
  };
}

/** Replaces an event; a changed id is carried into gate inputs, common-cause members, the top and the layout. */
export function updateEvent(model: FaultTreeDraft, id: string, event: BasicEvent): FaultTreeDraft {
  const renamed = event.id !== id;
  const isProbability = 'probability' in event;
  return {
    ...model,
    events: model.events.map((item) => (item.id === id ? event : item)),
    gates: renamed ? model.gates.map((item) => ({ ...item, inputs: renameIn(item.inputs, id, event.id) })) : model.gates,
    // A fixed-probability event cannot share a common cause (model-file check): it leaves its group.
    ccf: (model.ccf ?? []).map((group) => ({
      ...group,
      members: isProbability ? group.members.filter((member) => member !== id) : renameIn(group.members, id, event.id),
    })),
    top: renamed && model.top === id ? event.id : model.top,
    layout: renamed ? renameLayout(model.layout, id, event.id) : model.layout,
  };
}

export function updateCommonCauseGroup(model: FaultTreeDraft, id: string, group: DraftCommonCauseGroup): FaultTreeDraft {
  return {
    ...model,
    ccf: (model.ccf ?? []).map((item) => (item.id === id ? group : item)),
    layout: group.id !== id ? renameLayout(model.layout, `ccf:${id}`, `ccf:${group.id}`) : model.layout,
  };
}

/** Replaces a state; a changed id is carried into its transitions, tests and the layout. */
export function updateState(model: MarkovDraft, part: string | undefined, id: string, state: MarkovState): MarkovDraft {
  const chain = chainOf(model, part);
  if (!chain) return model;
  const rename = (value: string): string => (value === id ? state.id : value);
  const renamed = state.id !== id;
  const next: DraftStateChain = {
    states: chain.states.map((item) => (item.id === id ? state : item)),
    transitions: renamed ? chain.transitions.map((item) => ({ ...item, from: rename(item.from), to: rename(item.to) })) : chain.transitions,
    ...(chain.tests
      ? { tests: renamed ? chain.tests.map((test) => ({ ...test, moves: test.moves.map((move) => ({ ...move, from: rename(move.from), to: rename(move.to) })) })) : chain.tests }
      : {}),
  };
  const keyOf = (stateId: string): string => layoutKey({ kind: 'state', id: stateId, part });
  return { ...withChain(model, part, next), layout: renamed ? renameLayout(model.layout, keyOf(id), keyOf(state.id)) : model.layout };
}

export function updateTransition(model: MarkovDraft, part: string | undefined, index: number, transition: MarkovTransition): MarkovDraft {
  const chain = chainOf(model, part);
  if (!chain) return model;
  return withChain(model, part, { ...chain, transitions: chain.transitions.map((item, at) => (at === index ? transition : item)) });
}

/** Replaces the test schedules of the main chain (`part` undefined) or of one part; none leaves the key out. */
export function updateTests(model: MarkovDraft, part: string | undefined, tests: readonly MarkovTest[]): MarkovDraft {
  const chain = chainOf(model, part);
  if (!chain) return model;
  return withChain(model, part, { states: chain.states, transitions: chain.transitions, ...(tests.length > 0 ? { tests } : {}) });
}

/** Makes a gate or event the top of the tree. */
export function setTop(model: FaultTreeDraft, id: string): FaultTreeDraft {
  return { ...model, top: id };
}

/** Items copied from a model, with the links among them, ready to paste into the same kind of model. */
export interface Clipboard {
  readonly kind: EditableModel['kind'];
  readonly events: readonly BasicEvent[];
  readonly gates: readonly DraftGate[];
  readonly ccf: readonly DraftCommonCauseGroup[];
  readonly states: readonly MarkovState[];
  readonly transitions: readonly MarkovTransition[];
  readonly positions: Layout;
}

/** Copies the selected nodes; gate inputs, members and transitions are kept when both ends are copied. */
export function copyItems(model: EditableModel, nodeIds: readonly string[]): Clipboard {
  const refs = nodeIds.map(parseNodeId).filter((ref): ref is NodeRef => ref !== null);
  const positions: Record<string, Position> = {};
  for (const ref of refs) {
    const position = model.layout?.[layoutKey(ref)];
    if (position) positions[layoutKey(ref)] = position;
  }
  if (model.kind === 'fault-tree') {
    const picked = new Set(refs.filter((ref) => ref.kind === 'gate' || ref.kind === 'event').map((ref) => ref.id));
    const groups = new Set(refs.filter((ref) => ref.kind === 'ccf').map((ref) => ref.id));
    return {
      kind: model.kind,
      events: model.events.filter((item) => picked.has(item.id)),
      gates: model.gates.filter((item) => picked.has(item.id)).map((item) => ({ ...item, inputs: item.inputs.filter((input) => picked.has(input)) })),
      ccf: (model.ccf ?? []).filter((group) => groups.has(group.id)).map((group) => ({ ...group, members: group.members.filter((member) => picked.has(member)) })),
      states: [],
      transitions: [],
      positions,
    };
  }
  const picked = new Set(refs.filter((ref) => ref.kind === 'state' && ref.part === undefined).map((ref) => ref.id));
  return {
    kind: model.kind,
    events: [],
    gates: [],
    ccf: [],
    states: model.states.filter((state) => picked.has(state.id)),
    transitions: model.transitions.filter((item) => picked.has(item.from) && picked.has(item.to)),
    positions,
  };
}

export interface Pasted {
  readonly model: EditableModel;
  /** The canvas ids of the pasted nodes, to select them. */
  readonly nodeIds: readonly string[];
}

/** Pastes copied items under fresh ids ("E1" pasted next to an existing "E1" becomes "E1-copy"), shifted by `offset`. */
export function pasteItems(model: EditableModel, clipboard: Clipboard, offset: Position): Pasted | { readonly error: string } {
  if (clipboard.kind !== model.kind) return { error: 'Copied items belong to the other kind of model.' };
  const taken = model.kind === 'fault-tree' ? faultTreeIds(model) : stateIds(model);
  const renames = new Map<string, string>();
  const rename = (id: string): string => {
    const existing = renames.get(id);
    if (existing) return existing;
    let candidate = taken.has(id) ? `${id}-copy` : id;
    for (let number = 2; taken.has(candidate); number++) candidate = `${id}-copy${number}`;
    taken.add(candidate);
    renames.set(id, candidate);
    return candidate;
  };
  const layout: Record<string, Position> = { ...(model.layout ?? {}) };
  const place = (ref: NodeRef, oldKey: string): string => {
    const position = clipboard.positions[oldKey];
    if (position) layout[layoutKey(ref)] = { x: position.x + offset.x, y: position.y + offset.y };
    return nodeId(ref);
  };
  if (model.kind === 'fault-tree') {
    const events = clipboard.events.map((item) => ({ ...item, id: rename(item.id) }));
    const gates = clipboard.gates.map((item) => ({ ...item, id: rename(item.id) }));
    const groups = clipboard.ccf.map((group) => ({ ...group, id: rename(group.id) }));
    const remapped = gates.map((item) => ({ ...item, inputs: item.inputs.map((input) => renames.get(input) ?? input) }));
    const members = groups.map((group) => ({ ...group, members: group.members.map((member) => renames.get(member) ?? member) }));
    const nodeIds = [
      ...clipboard.events.map((item, index) => place({ kind: 'event', id: events[index].id }, item.id)),
      ...clipboard.gates.map((item, index) => place({ kind: 'gate', id: gates[index].id }, item.id)),
      ...clipboard.ccf.map((item, index) => place({ kind: 'ccf', id: groups[index].id }, `ccf:${item.id}`)),
    ];
    return {
      model: { ...model, events: [...model.events, ...events], gates: [...model.gates, ...remapped], ccf: [...(model.ccf ?? []), ...members], layout },
      nodeIds,
    };
  }
  // A pasted state starts with no initial probability: the model's initial values must still sum to 1.
  const states = clipboard.states.map((state) => {
    const copy: { -readonly [key in keyof MarkovState]: MarkovState[key] } = { ...state, id: rename(state.id) };
    delete copy.initial;
    return copy;
  });
  const transitions = clipboard.transitions.map((item) => ({ ...item, from: renames.get(item.from)!, to: renames.get(item.to)! }));
  const nodeIds = clipboard.states.map((state, index) => place({ kind: 'state', id: states[index].id }, state.id));
  return { model: { ...model, states: [...model.states, ...states], transitions: [...model.transitions, ...transitions], layout }, nodeIds };
}
