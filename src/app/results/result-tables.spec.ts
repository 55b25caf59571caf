import type { FaultTreeModel } from '../../../shared/model-file.js';
import type { SolveResult } from '../../../shared/solve-result.js';
import { solveModel } from '../../../solver/index.js';
import { contributionRows, cutSetRows, importanceRows, itemLabels } from './result-tables';

/** Two valves 1oo2 with a beta group, in series with one transmitter; invented figures. */
const MODEL: FaultTreeModel = {
  format: 'proofline/model',
  version: 1,
  name: 'tables',
  mission: { hours: 87_600, demand: 'low' },
  kind: 'fault-tree',
  events: [
    { id: 'PT', label: 'Transmitter', lambdaDU: 2e-7, proofTest: { intervalHours: 8760 } },
    { id: 'XV-A', label: 'Valve A', lambdaDU: 2e-6, proofTest: { intervalHours: 8760 } },
    { id: 'XV-B', label: 'Valve B', lambdaDU: 2e-6, proofTest: { intervalHours: 8760 } },
  ],
  gates: [
    { id: 'TOP', type: 'or', inputs: ['PT', 'VALVES'] },
    { id: 'VALVES', label: 'Valves 1oo2', type: 'and', inputs: ['XV-A', 'XV-B'] },
  ],
  ccf: [{ id: 'CCF-XV', members: ['XV-A', 'XV-B'], beta: 0.2, model: 'beta' }],
  top: 'TOP',
};

describe('result tables', () => {
  const result: SolveResult = solveModel(MODEL, { timePoints: 200 });
  const labels = itemLabels(MODEL);

  it('cut sets are ranked by probability; the single-order sets come first here (rare event: lambda T / 2 vs (lambda T)^2 / 3, IEC 61508-6 B.3.2.2)', () => {
    const rows = cutSetRows(result);
    expect(rows.map((row) => row.rank)).toEqual(rows.map((_, index) => index + 1));
    for (let index = 1; index < rows.length; index++) expect(rows[index - 1].probability).toBeGreaterThanOrEqual(rows[index].probability);
    expect(rows.map((row) => [...row.events].sort().join(' '))).toEqual(['CCF-XV', 'PT', 'XV-A XV-B']);
    expect(cutSetRows(result, 1)).toHaveLength(1);
  });

  it('contributions list subsystems first, then events and groups, each by share; subsystem shares are their gates\' Fussell-Vesely', () => {
    const rows = contributionRows(result, [{ id: 'PT', label: 'Transmitter' }, { id: 'VALVES', label: 'Valves 1oo2' }], labels);
    const subsystems = rows.filter((row) => row.kind === 'subsystem');
    expect(subsystems.map((row) => row.id)).toEqual(['VALVES', 'PT']);
    const gate = result.importance.find((item) => item.id === 'VALVES');
    expect(subsystems[0].share).toBe(gate?.fussellVesely);
    expect(subsystems[0].pfdAvg).toBeCloseTo((gate?.fussellVesely ?? 0) * result.pfdAvg, 15);
    expect(rows.filter((row) => row.kind !== 'subsystem').map((row) => row.id)[0]).toBe('CCF-XV');
    expect(rows.find((row) => row.id === 'XV-A')?.label).toBe('Valve A');
  });

  it('importance sorts by the chosen measure, largest first', () => {
    for (const key of ['birnbaum', 'fussellVesely', 'riskAchievementWorth', 'riskReductionWorth'] as const) {
      const rows = importanceRows(result, labels, key);
      for (let index = 1; index < rows.length; index++) expect(rows[index - 1][key]).toBeGreaterThanOrEqual(rows[index][key]);
    }
    expect(importanceRows(result, labels).find((row) => row.id === 'VALVES')?.label).toBe('Valves 1oo2');
  });
});
