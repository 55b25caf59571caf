import { describe, expect, it } from 'vitest';
import { faultTreeModel, markovModel } from '../../../shared/model-file.js';
import { recordEdit, redo, startHistory, undo } from './edit-history';
import {
  addItem,
  blankModel,
  connect,
  copyItems,
  deleteItems,
  inputConnector,
  moveNodes,
  outputConnector,
  pasteItems,
  updateEvent,
  type EditableModel,
  type FaultTreeDraft,
  type MarkovDraft,
} from './model-graph';

function added(model: EditableModel, kind: Parameters<typeof addItem>[1], x = 0): EditableModel {
  const result = addItem(model, kind, { x, y: 0 });
  if ('error' in result) throw new Error(result.error);
  return result.model;
}

function connected(model: EditableModel, source: string, target: string): EditableModel {
  const result = connect(model, outputConnector(source), inputConnector(target));
  if ('error' in result) throw new Error(result.error);
  return result.model;
}

/** A 2oo3 (k = 2 of 3) voting gate over three rate events, built the way the palette builds it. */
function votingTree(): FaultTreeDraft {
  let model = blankModel('fault-tree', 'Test tree', 87600, 'low');
  model = added(model, 'atLeast');
  for (let index = 0; index < 3; index++) model = added(model, 'rateEvent', index * 200);
  for (const event of ['E1', 'E2', 'E3']) model = connected(model, `event:${event}`, 'gate:G1');
  return model as FaultTreeDraft;
}

describe('adding and connecting', () => {
  it('gives fresh ids, makes the first gate the top and turns connections into gate inputs', () => {
    const model = votingTree();
    expect(model.gates.map((gate) => gate.id)).toEqual(['G1']);
    expect(model.top).toBe('G1');
    expect(model.gates[0].inputs).toEqual(['E1', 'E2', 'E3']);
    expect(model.layout?.['E2']).toEqual({ x: 200, y: 0 });
    // The finished tree is a valid model file (the shared schema is the reference).
    expect(faultTreeModel.safeParse(model).success).toBe(true);
  });

  it('refuses a second connection of the same input', () => {
    const result = connect(votingTree(), outputConnector('event:E1'), inputConnector('gate:G1'));
    expect(result).toEqual({ error: '"E1" is already an input of "G1".' });
  });

  it('refuses a connection that would make the gates loop', () => {
    let model: EditableModel = votingTree();
    model = added(model, 'or');
    model = connected(model, 'gate:G1', 'gate:G2');
    const result = connect(model, outputConnector('gate:G2'), inputConnector('gate:G1'));
    expect('error' in result && result.error).toContain('loop');
  });

  it('adds events to a common-cause group and refuses one already in another group', () => {
    let model: EditableModel = added(votingTree(), 'ccf');
    model = connected(model, 'event:E1', 'ccf:CCF1');
    model = connected(model, 'event:E2', 'ccf:CCF1');
    expect((model as FaultTreeDraft).ccf?.[0].members).toEqual(['E1', 'E2']);
    model = added(model, 'ccf');
    const result = connect(model, outputConnector('event:E1'), inputConnector('ccf:CCF2'));
    expect('error' in result && result.error).toContain('one group only');
  });

  it('connects states into transitions and refuses a self transition', () => {
    let model = blankModel('markov', 'Chain', 8760, 'low');
    model = added(model, 'upState');
    model = added(model, 'downState');
    model = connected(model, 'state:OK1', 'state:DOWN1');
    const chain = model as MarkovDraft;
    expect(chain.states[0]).toEqual({ id: 'OK1', initial: 1 });
    expect(chain.transitions).toEqual([{ from: 'OK1', to: 'DOWN1', rate: 0 }]);
    expect(markovModel.safeParse(model).success).toBe(true);
    expect('error' in connect(model, outputConnector('state:OK1'), inputConnector('state:OK1'))).toBe(true);
  });
});

describe('deleting', () => {
  it('removes an event with its gate input, group membership and position', () => {
    let model: EditableModel = added(votingTree(), 'ccf');
    model = connected(model, 'event:E1', 'ccf:CCF1');
    const after = deleteItems(model, ['event:E1'], []) as FaultTreeDraft;
    expect(after.events.map((event) => event.id)).toEqual(['E2', 'E3']);
    expect(after.gates[0].inputs).toEqual(['E2', 'E3']);
    expect(after.ccf?.[0].members).toEqual([]);
    expect(after.layout?.['E1']).toBeUndefined();
  });

  it('removes only the connection when a connection is deleted', () => {
    const after = deleteItems(votingTree(), [], ['input|G1|E2']) as FaultTreeDraft;
    expect(after.gates[0].inputs).toEqual(['E1', 'E3']);
    expect(after.events).toHaveLength(3);
  });

  it('clears the top when the top gate is deleted', () => {
    expect((deleteItems(votingTree(), ['gate:G1'], []) as FaultTreeDraft).top).toBe('');
  });

  it('removes the transitions of a deleted state', () => {
    let model = blankModel('markov', 'Chain', 8760, 'low');
    model = added(added(added(model, 'upState'), 'downState'), 'downState');
    model = connected(connected(model, 'state:OK1', 'state:DOWN1'), 'state:OK1', 'state:DOWN2');
    const after = deleteItems(model, ['state:DOWN1'], []) as MarkovDraft;
    expect(after.transitions).toEqual([{ from: 'OK1', to: 'DOWN2', rate: 0 }]);
  });
});

describe('renaming, moving, copying', () => {
  it('carries a renamed event into the gate inputs and the layout', () => {
    const model = votingTree();
    const after = updateEvent(model, 'E1', { ...model.events[0], id: 'PT-101' });
    expect(after.gates[0].inputs).toEqual(['PT-101', 'E2', 'E3']);
    expect(after.layout?.['PT-101']).toEqual({ x: 0, y: 0 });
    expect(after.layout?.['E1']).toBeUndefined();
  });

  it('stores moved positions rounded, and returns the same model when nothing moved', () => {
    const model = votingTree();
    const moved = moveNodes(model, [{ id: 'event:E1', position: { x: 10.4, y: 20.6 } }]);
    expect(moved.layout?.['E1']).toEqual({ x: 10, y: 21 });
    expect(moveNodes(moved, [{ id: 'event:E1', position: { x: 10, y: 21 } }])).toBe(moved);
  });

  it('pastes a copied gate with its inputs under new ids, keeping the links among the copies', () => {
    const model = votingTree();
    const clipboard = copyItems(model, ['gate:G1', 'event:E1', 'event:E2']);
    const pasted = pasteItems(model, clipboard, { x: 40, y: 40 });
    if ('error' in pasted) throw new Error(pasted.error);
    const tree = pasted.model as FaultTreeDraft;
    expect(tree.gates.map((gate) => gate.id)).toEqual(['G1', 'G1-copy']);
    expect(tree.gates[1].inputs).toEqual(['E1-copy', 'E2-copy']);
    expect(tree.layout?.['E2-copy']).toEqual({ x: 240, y: 40 });
    expect(pasted.nodeIds).toContain('gate:G1-copy');
  });
});

describe('undo and redo', () => {
  it('steps back and forth through edits and drops the redo branch on a new edit', () => {
    const first = votingTree();
    const second = deleteItems(first, ['event:E3'], []);
    const third = deleteItems(second, ['event:E2'], []);
    let history = recordEdit(recordEdit(startHistory<EditableModel>(first), second), third);
    history = undo(history);
    expect(history.present).toBe(second);
    history = undo(history);
    expect(history.present).toBe(first);
    expect(undo(history)).toBe(history);
    history = redo(history);
    expect(history.present).toBe(second);
    const other = moveNodes(second, [{ id: 'gate:G1', position: { x: 5, y: 5 } }]);
    history = recordEdit(history, other);
    expect(history.future).toEqual([]);
    expect(redo(history)).toBe(history);
  });
});
