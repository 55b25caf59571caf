import { loadavg } from 'node:os';
import type { FaultTreeModel, RateEvent } from '../../shared/model-file.js';
import { evaluateMeasure } from './evaluate-measure.js';
import { intervalSweep, tornado } from './sensitivity.js';
import { rateUncertainty } from './uncertainty.js';

// Prints how long the analyses the results page runs in the browser take on a SIF-sized fault tree
// (the same shape as the demo: 2oo3 transmitters, a logic solver, 1oo2 valves with a partial test), and
// on a wider one, so the "cheap enough for the client" decision rests on figures. Run with
// `npx tsx solver/analysis/bench-analysis.ts`.

function channel(id: string, lambdaDU: number, partial: boolean): RateEvent {
  return {
    id,
    lambdaDU,
    lambdaDD: lambdaDU * 3,
    lambdaS: lambdaDU * 3,
    mttrHours: 8,
    proofTest: { intervalHours: 8760, coverage: 0.9 },
    ...(partial ? { partialTest: { intervalHours: 2190, coverage: 0.6 } } : {}),
  };
}

function functionOf(groups: number): FaultTreeModel {
  const events: RateEvent[] = [];
  const gates: FaultTreeModel['gates'] = [];
  const ccf: NonNullable<FaultTreeModel['ccf']> = [];
  for (let group = 0; group < groups; group++) {
    const ids = [0, 1, 2].map((index) => `G${group}-${index}`);
    ids.forEach((id) => events.push(channel(id, 3e-7 * (group + 1), group % 2 === 1)));
    gates.push({ id: `G${group}`, type: 'atLeast', k: 2, inputs: ids });
    ccf.push({ id: `CCF${group}`, members: ids, beta: 0.05, model: 'beta' });
  }
  gates.push({ id: 'TOP', type: 'or', inputs: gates.map((gate) => gate.id) });
  return { format: 'proofline/model', version: 1, name: 'bench', kind: 'fault-tree', mission: { hours: 87_600, demand: 'low' }, events, gates, ccf, top: 'TOP' };
}

async function time(label: string, run: () => Promise<unknown> | unknown): Promise<void> {
  const start = performance.now();
  await run();
  console.log(`${label.padEnd(46)} ${(performance.now() - start).toFixed(0).padStart(7)} ms`);
}

const target = { limit: 1e-2, inclusive: false };
console.log(`machine load (1 min average): ${loadavg()[0].toFixed(1)}; figures grow with it`);
for (const groups of [3, 8]) {
  const model = functionOf(groups);
  console.log(`\n${groups} voted groups, ${model.events.length} events`);
  evaluateMeasure(model);
  await time('one PFDavg (engine build + adaptive integral)', () => evaluateMeasure(model));
  await time('interval sweep (24 points + bisection)', () => intervalSweep(model, { target }));
  await time('tornado (factor 2)', () => tornado(model, { factor: 2 }));
  await time('rate uncertainty, 300 samples', () => rateUncertainty(model, { target, samples: 300 }));
}
