import type { ModelFile } from './model-file.js';

/** The kinds of item a model file holds; "model" stands for its header (name, mission, top, tests...). */
export type ModelItemKind = 'model' | 'gate' | 'event' | 'ccf' | 'state' | 'transition';

/** One item of a model with its fields flattened to dotted paths ("proofTest.intervalHours"). */
export interface ModelItem {
  readonly kind: ModelItemKind;
  readonly id: string;
  readonly fields: ReadonlyMap<string, unknown>;
}

export interface FieldChange {
  readonly field: string;
  readonly old: unknown;
  readonly new: unknown;
}

export interface ItemChange {
  readonly kind: ModelItemKind;
  readonly id: string;
  readonly change: 'added' | 'removed' | 'changed';
  /** Every field of an added or removed item (old or new undefined), or each changed field. */
  readonly fields: readonly FieldChange[];
}

/** Item key, e.g. "gate:TOP"; the whole model is "model:". */
export const itemKey = (kind: ModelItemKind, id: string) => `${kind}:${id}`;

/** A transition has no id of its own in the model file: "from->to", prefixed "part/" inside a part. */
export const transitionId = (from: string, to: string, part?: string) => `${part ? `${part}/` : ''}${from}->${to}`;

function flatten(value: unknown, prefix: string, into: Map<string, unknown>): void {
  if (value !== null && typeof value === 'object' && !Array.isArray(value)) {
    for (const [key, inner] of Object.entries(value)) flatten(inner, prefix ? `${prefix}.${key}` : key, into);
  } else if (value !== undefined) {
    into.set(prefix, value);
  }
}

function item(kind: ModelItemKind, id: string, content: object, leaveOut: readonly string[] = []): ModelItem {
  const fields = new Map<string, unknown>();
  for (const [key, value] of Object.entries(content)) if (!leaveOut.includes(key)) flatten(value, key, fields);
  return { kind, id, fields };
}

/**
 * Every item of a model file by key. The layout (drawing positions) is left out: moving a box on the canvas
 * changes nothing the review covers.
 */
export function modelItems(model: ModelFile): Map<string, ModelItem> {
  const items: ModelItem[] = [];
  if (model.kind === 'fault-tree') {
    items.push(item('model', '', model, ['events', 'gates', 'ccf', 'layout', 'format', 'version', 'kind']));
    for (const event of model.events) items.push(item('event', event.id, event, ['id']));
    for (const gate of model.gates) items.push(item('gate', gate.id, gate, ['id']));
    for (const group of model.ccf ?? []) items.push(item('ccf', group.id, group, ['id']));
  } else {
    items.push(item('model', '', model, ['states', 'transitions', 'parts', 'layout', 'format', 'version', 'kind']));
    const chains = [{ part: undefined as string | undefined, states: model.states, transitions: model.transitions }];
    for (const part of model.parts ?? []) {
      items.push(item('model', `part ${part.id}`, part, ['id', 'states', 'transitions']));
      chains.push({ part: part.id, states: part.states, transitions: part.transitions });
    }
    for (const chain of chains) {
      for (const state of chain.states) items.push(item('state', chain.part ? `${chain.part}/${state.id}` : state.id, state, ['id']));
      for (const transition of chain.transitions) {
        items.push(item('transition', transitionId(transition.from, transition.to, chain.part), transition, ['from', 'to']));
      }
    }
  }
  return new Map(items.map((entry) => [itemKey(entry.kind, entry.id), entry]));
}

const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);

/** The changed fields between two versions of one item, in the order of the old then the new fields. */
export function fieldChanges(before: ModelItem | undefined, after: ModelItem | undefined): FieldChange[] {
  const names = new Set([...(before?.fields.keys() ?? []), ...(after?.fields.keys() ?? [])]);
  const changes: FieldChange[] = [];
  for (const field of names) {
    const old = before?.fields.get(field);
    const now = after?.fields.get(field);
    if (!same(old, now)) changes.push({ field, old, new: now });
  }
  return changes;
}

/**
 * What changed from one model file to another: items added, removed, and changed with each field old -> new.
 * Items are matched by kind and id, so a renamed id reads as one removed and one added item.
 */
export function diffModels(before: ModelFile, after: ModelFile): ItemChange[] {
  const old = modelItems(before);
  const now = modelItems(after);
  const changes: ItemChange[] = [];
  for (const [key, entry] of old) {
    const next = now.get(key);
    if (!next) changes.push({ kind: entry.kind, id: entry.id, change: 'removed', fields: fieldChanges(entry, undefined) });
    else {
      const fields = fieldChanges(entry, next);
      if (fields.length > 0) changes.push({ kind: entry.kind, id: entry.id, change: 'changed', fields });
    }
  }
  for (const [key, entry] of now) {
    if (!old.has(key)) changes.push({ kind: entry.kind, id: entry.id, change: 'added', fields: fieldChanges(undefined, entry) });
  }
  return changes;
}

/** Whether an item differs between two model files (also when it is missing from either). */
export function itemChanged(before: ModelFile, after: ModelFile, kind: ModelItemKind, id: string): boolean {
  const key = itemKey(kind, id);
  const old = modelItems(before).get(key);
  const now = modelItems(after).get(key);
  if (!old || !now) return true;
  return fieldChanges(old, now).length > 0;
}
