import type { FaultTreeDraft } from '../model-graph';

/**
 * An invented fault tree of about `nodeCount` cards for the canvas benchmark: 2oo3 voting groups of rate
 * events under OR gates, with a common-cause group per voting group.
 */
export function syntheticFaultTree(nodeCount: number): FaultTreeDraft {
  // Each voting group is 1 gate + 3 events + 1 group card; one OR gate per 8 voting groups; one top.
  const groups = Math.max(1, Math.floor((nodeCount - 1) / (5 + 1 / 8)));
  const events: FaultTreeDraft['events'][number][] = [];
  const gates: FaultTreeDraft['gates'][number][] = [];
  const ccf: NonNullable<FaultTreeDraft['ccf']>[number][] = [];
  const branches: string[] = [];
  for (let group = 0; group < groups; group++) {
    const members = [1, 2, 3].map((channel) => `D${group}-${channel}`);
    for (const id of members) events.push({ id, lambdaDU: 1e-7 * (1 + (group % 7)), lambdaDD: 4e-7, mttrHours: 8, proofTest: { intervalHours: 8760 } });
    gates.push({ id: `V${group}`, type: 'atLeast', k: 2, inputs: members });
    ccf.push({ id: `C${group}`, members, beta: 0.05, model: 'beta' });
    if (group % 8 === 0) branches.push(`B${branches.length}`);
  }
  branches.forEach((branch, index) => {
    gates.push({ id: branch, type: 'or', inputs: gates.filter((gate, at) => gate.type === 'atLeast' && Math.floor(at / 8) === index).map((gate) => gate.id) });
  });
  gates.push({ id: 'TOP', type: 'or', inputs: branches });
  return { format: 'proofline/model', version: 1, name: 'Benchmark tree', kind: 'fault-tree', mission: { hours: 87_600, demand: 'low' }, events, gates, ccf, top: 'TOP' };
}
