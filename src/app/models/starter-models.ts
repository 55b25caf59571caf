import type { DemandMode } from '../../../shared/model-file.js';
import type { EditableModel } from '../canvas/model-graph';

/**
 * The smallest valid model of each kind, to create a new model from (the server stores only valid files
 * as new models): a fault tree whose top is one device event, and a state model with one up state.
 */
export function starterModel(kind: EditableModel['kind'], name: string, missionHours: number, demand: DemandMode): EditableModel {
  const header = { format: 'proofline/model', version: 1, name, mission: { hours: missionHours, demand } } as const;
  if (kind === 'fault-tree') {
    return {
      ...header,
      kind,
      events: [{ id: 'E1', label: 'First device', lambdaDU: 1e-6, proofTest: { intervalHours: Math.min(8760, missionHours) } }],
      gates: [],
      ccf: [],
      top: 'E1',
      layout: { E1: { x: 0, y: 0 } },
    };
  }
  return { ...header, kind, states: [{ id: 'OK', label: 'All working', initial: 1 }], transitions: [], layout: { OK: { x: 0, y: 0 } } };
}
