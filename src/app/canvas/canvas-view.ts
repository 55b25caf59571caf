import type { ValidationIssue } from '../../../shared/api/errors.js';
import { itemKey, transitionId } from '../../../shared/model-diff.js';
import { formatInterval, formatRate } from '../units/units';
import { gateLogicInWords, votingLabel } from './gate-logic';
import {
  connectionId,
  inputConnector,
  layoutKey,
  nodeId,
  outputConnector,
  type DraftStateChain,
  type EditableModel,
  type NodeRef,
  type Position,
} from './model-graph';

/** One card on the canvas, with what it shows. */
export interface CanvasNode {
  readonly id: string;
  readonly ref: NodeRef;
  readonly position: Position;
  /** Whether the model's layout holds a position for it (otherwise it is placed on a grid until laid out). */
  readonly placed: boolean;
  readonly title: string;
  readonly subtitle: string;
  /** The key figures, e.g. ["λDU 2.0e-7 /h", "τ 1 y"]. */
  readonly figures: readonly string[];
  readonly variant: 'gate' | 'top' | 'rate' | 'probability' | 'ccf' | 'up' | 'down';
  readonly hasInput: boolean;
  /** The common-cause group the event belongs to, with its tint index. */
  readonly band?: { readonly group: string; readonly tint: number };
  readonly tint?: number;
  readonly issues: readonly string[];
}

export interface CanvasConnection {
  readonly id: string;
  readonly source: string;
  readonly target: string;
  readonly variant: 'input' | 'member' | 'transition';
  readonly label?: string;
  readonly tint?: number;
  readonly issues: readonly string[];
  /** A transition's item key as review annotations name it (shared/model-diff), for its pin marker. */
  readonly pinKey?: string;
}

export interface CanvasView {
  readonly nodes: readonly CanvasNode[];
  readonly connections: readonly CanvasConnection[];
  /** Issues that belong to no single item (the mission, the top, the initial distribution...). */
  readonly modelIssues: readonly string[];
  /** Whether some node has no stored position (the model wants an automatic layout). */
  readonly needsLayout: boolean;
}

/** Number of distinct band tints in the stylesheet. */
export const TINT_COUNT = 6;

const GRID_COLUMNS = 8;
const GRID_STEP = { x: 240, y: 170 };

/** Builds what the canvas draws from the model and the draft's issues (paths like "events[2].lambdaDU"). */
export function canvasView(model: EditableModel, issues: readonly ValidationIssue[]): CanvasView {
  const byItem = new Map<string, string[]>();
  const modelIssues: string[] = [];
  const note = (key: string | undefined, message: string): void => {
    if (key === undefined) {
      modelIssues.push(message);
      return;
    }
    byItem.set(key, [...(byItem.get(key) ?? []), message]);
  };
  for (const issue of issues) note(issueTarget(model, issue.path), issue.message);

  let gridIndex = 0;
  const positionOf = (ref: NodeRef): { position: Position; placed: boolean } => {
    const stored = model.layout?.[layoutKey(ref)];
    if (stored) return { position: stored, placed: true };
    const index = gridIndex++;
    return { position: { x: (index % GRID_COLUMNS) * GRID_STEP.x, y: Math.floor(index / GRID_COLUMNS) * GRID_STEP.y }, placed: false };
  };

  const nodes: CanvasNode[] = [];
  const connections: CanvasConnection[] = [];
  if (model.kind === 'fault-tree') {
    const tintOf = new Map<string, { group: string; tint: number }>();
    (model.ccf ?? []).forEach((group, index) => group.members.forEach((member) => tintOf.set(member, { group: group.id, tint: index % TINT_COUNT })));
    for (const gate of model.gates) {
      const ref: NodeRef = { kind: 'gate', id: gate.id };
      const voting = gate.type === 'atLeast' ? votingLabel(gate.k, gate.inputs.length) : null;
      nodes.push({
        id: nodeId(ref),
        ref,
        ...positionOf(ref),
        title: gate.label || gate.id,
        subtitle: gate.label ? gate.id : gate.type === 'atLeast' ? 'voting gate' : `${gate.type.toUpperCase()} gate`,
        figures: [gateLogicInWords(gate.type, gate.inputs.length, gate.k), ...(voting ? [voting] : [])],
        variant: model.top === gate.id ? 'top' : 'gate',
        hasInput: true,
        issues: byItem.get(nodeId(ref)) ?? [],
      });
      for (const input of gate.inputs) {
        const isGate = model.gates.some((item) => item.id === input);
        const source = nodeId({ kind: isGate ? 'gate' : 'event', id: input });
        const id = connectionId({ kind: 'input', gate: gate.id, input });
        connections.push({ id, source: outputConnector(source), target: inputConnector(nodeId(ref)), variant: 'input', issues: byItem.get(id) ?? [] });
      }
    }
    for (const event of model.events) {
      const ref: NodeRef = { kind: 'event', id: event.id };
      const band = tintOf.get(event.id);
      const figures =
        'probability' in event
          ? [`P ${event.probability}`]
          : [
              `λDU ${formatRate(event.lambdaDU)}`,
              ...(event.lambdaDD ? [`λDD ${formatRate(event.lambdaDD)}`] : []),
              event.proofTest ? `τ ${formatInterval(event.proofTest.intervalHours)}${coverageText(event.proofTest.coverage)}` : 'no proof test',
              ...(event.partialTest ? [`partial ${formatInterval(event.partialTest.intervalHours)}, ${Math.round(event.partialTest.coverage * 100)} %`] : []),
            ];
      nodes.push({
        id: nodeId(ref),
        ref,
        ...positionOf(ref),
        title: event.label || event.id,
        subtitle: event.label ? event.id : 'probability' in event ? 'fixed probability' : 'rate event',
        figures,
        variant: model.top === event.id ? 'top' : 'probability' in event ? 'probability' : 'rate',
        hasInput: false,
        ...(band ? { band } : {}),
        issues: byItem.get(nodeId(ref)) ?? [],
      });
    }
    (model.ccf ?? []).forEach((group, index) => {
      const ref: NodeRef = { kind: 'ccf', id: group.id };
      const tint = index % TINT_COUNT;
      nodes.push({
        id: nodeId(ref),
        ref,
        ...positionOf(ref),
        title: group.label || group.id,
        subtitle: `common cause · ${group.model === 'pds' ? 'PDS' : 'beta factor'}`,
        figures: [`β ${group.beta}${group.betaD !== undefined ? ` · βD ${group.betaD}` : ''}`, `${group.members.length} member${group.members.length === 1 ? '' : 's'}`],
        variant: 'ccf',
        hasInput: true,
        tint,
        issues: byItem.get(nodeId(ref)) ?? [],
      });
      for (const member of group.members) {
        const id = connectionId({ kind: 'member', group: group.id, member });
        connections.push({
          id,
          source: outputConnector(nodeId({ kind: 'event', id: member })),
          target: inputConnector(nodeId(ref)),
          variant: 'member',
          tint,
          issues: byItem.get(id) ?? [],
        });
      }
    });
  } else {
    const chains: { part?: string; chain: DraftStateChain }[] = [{ chain: model }, ...(model.parts ?? []).map((part) => ({ part: part.id, chain: part }))];
    for (const { part, chain } of chains) {
      for (const state of chain.states) {
        const ref: NodeRef = { kind: 'state', id: state.id, ...(part ? { part } : {}) };
        nodes.push({
          id: nodeId(ref),
          ref,
          ...positionOf(ref),
          title: state.label || state.id,
          subtitle: `${state.label ? `${state.id} · ` : ''}${part ? `part ${part} · ` : ''}${state.down ? 'function down' : 'function up'}`,
          figures: state.initial ? [`starts with P ${state.initial}`] : [],
          variant: state.down ? 'down' : 'up',
          hasInput: true,
          issues: byItem.get(nodeId(ref)) ?? [],
        });
      }
      chain.transitions.forEach((transition, index) => {
        const id = connectionId({ kind: 'transition', index, ...(part ? { part } : {}) });
        connections.push({
          id,
          source: outputConnector(nodeId({ kind: 'state', id: transition.from, ...(part ? { part } : {}) })),
          target: inputConnector(nodeId({ kind: 'state', id: transition.to, ...(part ? { part } : {}) })),
          variant: 'transition',
          label: `${transition.label ? `${transition.label} ` : ''}${formatRate(transition.rate)}`,
          issues: byItem.get(id) ?? [],
          pinKey: itemKey('transition', transitionId(transition.from, transition.to, part)),
        });
      });
    }
  }
  const known = new Set([...nodes.map((node) => node.id), ...connections.map((connection) => connection.id)]);
  for (const [key, messages] of byItem) if (!known.has(key)) modelIssues.push(...messages);
  return { nodes, connections, modelIssues, needsLayout: nodes.some((node) => !node.placed) };
}

function coverageText(coverage: number | undefined): string {
  return coverage === undefined || coverage === 1 ? '' : `, ${Math.round(coverage * 1000) / 10} % covered`;
}

/**
 * The canvas id (node or connection) an issue path points into, or undefined for model-level issues.
 * "events[2].lambdaDU" is the event at index 2; "gates[0].inputs[1]" the gate; "transitions[3]" that
 * transition; "parts[1].states[0]" the state of part 1.
 */
export function issueTarget(model: EditableModel, path: string): string | undefined {
  const steps = [...path.matchAll(/([A-Za-z]+)(?:\[(\d+)\])?/g)].map((match) => ({ name: match[1], index: match[2] === undefined ? undefined : Number(match[2]) }));
  const [first, second] = steps;
  if (!first || first.index === undefined) return undefined;
  if (model.kind === 'fault-tree') {
    const id =
      first.name === 'events' ? model.events[first.index]?.id : first.name === 'gates' ? model.gates[first.index]?.id : first.name === 'ccf' ? model.ccf?.[first.index]?.id : undefined;
    if (id === undefined) return undefined;
    return nodeId({ kind: first.name === 'events' ? 'event' : first.name === 'gates' ? 'gate' : 'ccf', id });
  }
  let chain: DraftStateChain = model;
  let part: string | undefined;
  let step = first;
  let index = first.index;
  if (first.name === 'parts') {
    const found = model.parts?.[first.index];
    if (!found || !second || second.index === undefined) return undefined;
    chain = found;
    part = found.id;
    step = second;
    index = second.index;
  }
  if (step.name === 'states') {
    const id = chain.states[index]?.id;
    return id === undefined ? undefined : nodeId({ kind: 'state', id, ...(part ? { part } : {}) });
  }
  if (step.name === 'transitions' && chain.transitions[index]) return connectionId({ kind: 'transition', index, ...(part ? { part } : {}) });
  return undefined;
}
