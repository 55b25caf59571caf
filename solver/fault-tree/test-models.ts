import type { BasicEvent, CommonCauseGroup, FaultTreeModel, Gate } from '../../shared/model-file.js';

/** Small model builders shared by the solver's tests. */
export interface ChannelOptions {
  readonly lambdaDU: number;
  readonly lambdaDD?: number;
  readonly mttrHours?: number;
  readonly intervalHours?: number;
  readonly firstHours?: number;
  readonly coverage?: number;
  readonly durationHours?: number;
  readonly partial?: { intervalHours: number; coverage: number; firstHours?: number };
}

export function channel(id: string, options: ChannelOptions): BasicEvent {
  return {
    id,
    lambdaDU: options.lambdaDU,
    ...(options.lambdaDD !== undefined ? { lambdaDD: options.lambdaDD } : {}),
    ...(options.mttrHours !== undefined ? { mttrHours: options.mttrHours } : {}),
    ...(options.intervalHours !== undefined
      ? {
          proofTest: {
            intervalHours: options.intervalHours,
            ...(options.firstHours !== undefined ? { firstHours: options.firstHours } : {}),
            ...(options.coverage !== undefined ? { coverage: options.coverage } : {}),
            ...(options.durationHours !== undefined ? { durationHours: options.durationHours } : {}),
          },
        }
      : {}),
    ...(options.partial ? { partialTest: options.partial } : {}),
  };
}

export function faultTree(parts: {
  missionHours: number;
  demand?: 'low' | 'high' | 'continuous';
  events: BasicEvent[];
  gates?: Gate[];
  ccf?: CommonCauseGroup[];
  top: string;
}): FaultTreeModel {
  return {
    format: 'proofline/model',
    version: 1,
    name: 'test model',
    kind: 'fault-tree',
    mission: { hours: parts.missionHours, demand: parts.demand ?? 'low' },
    events: parts.events,
    gates: parts.gates ?? [],
    ...(parts.ccf ? { ccf: parts.ccf } : {}),
    top: parts.top,
  };
}

/** n identical channels voted "fails when at least k fail", optionally with a beta-factor group. */
export function votedGroup(n: number, k: number, options: ChannelOptions & { missionHours: number; beta?: number; betaD?: number; stagger?: boolean; demand?: 'low' | 'high' }): FaultTreeModel {
  const ids = Array.from({ length: n }, (_, index) => `CH-${index + 1}`);
  const interval = options.intervalHours;
  const events = ids.map((id, index) =>
    channel(id, { ...options, firstHours: options.stagger && interval !== undefined ? interval * ((index + 1) / n) : options.firstHours }),
  );
  return faultTree({
    missionHours: options.missionHours,
    demand: options.demand,
    events,
    gates: [{ id: 'TOP', type: 'atLeast', k, inputs: ids }],
    ccf: options.beta !== undefined ? [{ id: 'CCF', members: ids, beta: options.beta, ...(options.betaD !== undefined ? { betaD: options.betaD } : {}), model: 'beta' }] : undefined,
    top: 'TOP',
  });
}
