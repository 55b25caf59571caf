import { erf } from 'mathjs';
import { describe, expect, it } from 'vitest';
import type { FaultTreeModel, MarkovModel } from '../../shared/model-file.js';
import { evaluateMeasure } from './evaluate-measure.js';
import { intervalSweep, tornado, withProofTestInterval } from './sensitivity.js';
import { lognormalSigma, quantile, rateUncertainty } from './uncertainty.js';

/** |actual - expected| <= tolerance * |expected|. */
function expectRelative(actual: number, expected: number, tolerance: number): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(tolerance * Math.abs(expected));
}

const MISSION = 87_600;

function single(lambdaDU: number, intervalHours: number): FaultTreeModel {
  return {
    format: 'proofline/model',
    version: 1,
    name: 'single channel',
    mission: { hours: MISSION, demand: 'low' },
    kind: 'fault-tree',
    events: [{ id: 'XV', lambdaDU, proofTest: { intervalHours } }],
    gates: [],
    top: 'XV',
  };
}

/**
 * PFDavg over the mission of one channel with perfect proof tests every tau and no repair time: whole
 * periods average 1 - (1 - e^{-lambda tau}) / (lambda tau) and the last part period its own share
 * (Rausand & Hoyland, System Reliability Theory 2nd ed., periodically tested item).
 */
function singleAverage(lambda: number, tau: number): number {
  const periods = Math.floor(MISSION / tau);
  const rest = MISSION - periods * tau;
  const integral = (length: number) => length - -Math.expm1(-lambda * length) / lambda;
  return (periods * integral(tau) + integral(rest)) / MISSION;
}

describe('proof test interval sweep', () => {
  it('every point matches the closed form (1e-6 relative), and the interval that just meets the target is where the closed form crosses it (0.5 %)', async () => {
    const lambda = 2e-6;
    const target = { limit: 1e-2, inclusive: true };
    const sweep = await intervalSweep(single(lambda, 8760), { target, points: 12 });
    expect(sweep.referenceHours).toBe(8760);
    for (const point of sweep.points) expectRelative(point.value, singleAverage(lambda, point.intervalHours), 1e-6);
    let low = 100;
    let high = MISSION;
    for (let iteration = 0; iteration < 60; iteration++) {
      const middle = Math.sqrt(low * high);
      if (singleAverage(lambda, middle) <= target.limit) low = middle;
      else high = middle;
    }
    expectRelative(sweep.longestMeetingHours as number, low, 5e-3);
  });

  it('reports the mission when every interval meets the target, and null when none does', async () => {
    const always = await intervalSweep(single(1e-9, 8760), { target: { limit: 1e-2, inclusive: true }, points: 5 });
    expect(always.longestMeetingHours).toBe(MISSION);
    const never = await intervalSweep(single(1e-4, 8760), { target: { limit: 1e-4, inclusive: true }, points: 5 });
    expect(never.longestMeetingHours).toBeNull();
  });

  it('scales every interval by one factor and caps them at the mission', () => {
    const model = single(1e-6, 8760);
    const both: FaultTreeModel = { ...model, events: [...model.events, { id: 'PT', lambdaDU: 1e-6, proofTest: { intervalHours: 4380 } }] };
    const scaled = withProofTestInterval(both, 17_520) as FaultTreeModel;
    expect(scaled.events.map((event) => ('proofTest' in event ? event.proofTest?.intervalHours : undefined))).toEqual([17_520, 8760]);
    const capped = withProofTestInterval(both, 10 * MISSION) as FaultTreeModel;
    expect(capped.events.map((event) => ('proofTest' in event ? event.proofTest?.intervalHours : undefined))).toEqual([MISSION, MISSION]);
  });
});

describe('tornado', () => {
  it('on one channel, lambdaDU and the interval both scale PFDavg as the closed form says (1e-6 relative); bars sorted by swing', async () => {
    const lambda = 1e-6;
    const result = await tornado(single(lambda, 8760), { factor: 2 });
    expectRelative(result.base, singleAverage(lambda, 8760), 1e-6);
    const rate = result.bars.find((bar) => bar.parameter === 'lambdaDU of XV');
    expectRelative(rate?.highValue as number, singleAverage(2 * lambda, 8760), 1e-6);
    expectRelative(rate?.lowValue as number, singleAverage(lambda / 2, 8760), 1e-6);
    const interval = result.bars.find((bar) => bar.itemId === null);
    expectRelative(interval?.highValue as number, singleAverage(lambda, 17_520), 1e-6);
    const swings = result.bars.map((bar) => Math.abs(bar.highValue - bar.lowValue));
    expect([...swings].sort((a, b) => b - a)).toEqual(swings);
  });

  it('a beta factor bar appears for a common-cause group and raises PFDavg when multiplied', async () => {
    const model = single(1e-6, 8760);
    const pair: FaultTreeModel = {
      ...model,
      events: [{ id: 'A', lambdaDU: 1e-6, proofTest: { intervalHours: 8760 } }, { id: 'B', lambdaDU: 1e-6, proofTest: { intervalHours: 8760 } }],
      gates: [{ id: 'G', type: 'and', inputs: ['A', 'B'] }],
      ccf: [{ id: 'CCF', members: ['A', 'B'], beta: 0.1, model: 'beta' }],
      top: 'G',
    };
    const result = await tornado(pair, { factor: 2 });
    const beta = result.bars.find((bar) => bar.itemId === 'CCF');
    expect(beta).toBeDefined();
    expect(beta?.highValue).toBeGreaterThan(result.base);
    expect(beta?.lowValue).toBeLessThan(result.base);
  });

  it('refuses a factor of 1 or less', async () => {
    await expect(tornado(single(1e-6, 8760), { factor: 1 })).rejects.toThrow(/above 1/);
  });
});

describe('failure-rate uncertainty', () => {
  const lambda = 1e-6;
  const errorFactor = 3;
  const model: FaultTreeModel = { ...single(lambda, 8760), events: [{ id: 'XV', lambdaDU: lambda, errorFactor, proofTest: { intervalHours: 8760 } }] };

  it('for one channel, PFDavg rises with lambda, so its 5/50/95 % are the closed form at the lognormal quantiles lambda EF^(-1, 0, 1) (8 %, 2000 seeded samples)', async () => {
    const result = await rateUncertainty(model, { target: { limit: 5e-3, inclusive: true }, samples: 2000, seed: 7 });
    expectRelative(result.p50, singleAverage(lambda, 8760), 0.08);
    expectRelative(result.p95, singleAverage(lambda * errorFactor, 8760), 0.08);
    expectRelative(result.p05, singleAverage(lambda / errorFactor, 8760), 0.08);
    expect(result.p05).toBeLessThan(result.p50);
    expect(result.p50).toBeLessThan(result.p95);
  });

  it('the probability of meeting the target is the lognormal CDF at the rate that just meets it (Phi by mathjs erf; 0.03 absolute, 2000 samples)', async () => {
    const limit = 5e-3;
    let low = 1e-8;
    let high = 1e-4;
    for (let iteration = 0; iteration < 80; iteration++) {
      const middle = Math.sqrt(low * high);
      if (singleAverage(middle, 8760) <= limit) low = middle;
      else high = middle;
    }
    const z = Math.log(low / lambda) / lognormalSigma(errorFactor);
    const expected = 0.5 * (1 + (erf(z / Math.SQRT2) as number));
    const result = await rateUncertainty(model, { target: { limit, inclusive: true }, samples: 2000, seed: 11 });
    expect(Math.abs(result.probabilityMeetingTarget - expected)).toBeLessThanOrEqual(0.03);
  });

  it('the same seed gives the same numbers, another seed others', async () => {
    const options = { target: { limit: 5e-3, inclusive: true }, samples: 50 };
    const first = await rateUncertainty(model, { ...options, seed: 3 });
    const again = await rateUncertainty(model, { ...options, seed: 3 });
    const other = await rateUncertainty(model, { ...options, seed: 4 });
    expect(Array.from(again.values)).toEqual(Array.from(first.values));
    expect(Array.from(other.values)).not.toEqual(Array.from(first.values));
  });

  it('type 7 quantiles: the median of 1..5 is 3, the 0.1 quantile of 1..11 is 2 (Hyndman and Fan 1996)', () => {
    expect(quantile([1, 2, 3, 4, 5], 0.5)).toBe(3);
    expect(quantile([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11], 0.1)).toBeCloseTo(2, 12);
  });
});

/** One channel as a state model: OK -> DU at lambda, each proof test (perfect) takes DU back to OK. */
function singleChain(lambda: number, intervalHours: number): MarkovModel {
  return {
    format: 'proofline/model',
    version: 1,
    name: 'single channel, state model',
    mission: { hours: MISSION, demand: 'low' },
    kind: 'markov',
    states: [{ id: 'OK', initial: 1 }, { id: 'DU', down: true }],
    transitions: [{ from: 'OK', to: 'DU', rate: lambda, label: 'DU failure' }],
    tests: [{ intervalHours, moves: [{ from: 'DU', to: 'OK', probability: 1 }] }],
  };
}

/** Two identical channels voted 1oo2 as a state model: down only when both failed; one label for the DU failure mode. */
function pairChain(lambda: number, intervalHours: number): MarkovModel {
  return {
    ...singleChain(lambda, intervalHours),
    name: '1oo2, state model',
    states: [{ id: 'OK', initial: 1 }, { id: 'ONE' }, { id: 'BOTH', down: true }],
    transitions: [
      { from: 'OK', to: 'ONE', rate: 2 * lambda, label: 'DU failure' },
      { from: 'ONE', to: 'BOTH', rate: lambda, label: 'DU failure' },
    ],
    tests: [{ intervalHours, moves: [{ from: 'ONE', to: 'OK', probability: 1 }, { from: 'BOTH', to: 'OK', probability: 1 }] }],
  };
}

describe('sensitivity and uncertainty of a state model', () => {
  it('the interval sweep scales the tests and matches the closed form of the periodically tested channel (1e-6 relative)', async () => {
    const lambda = 2e-6;
    const target = { limit: 1e-2, inclusive: true };
    const sweep = await intervalSweep(singleChain(lambda, 8760), { target, points: 8 });
    expect(sweep.referenceHours).toBe(8760);
    for (const point of sweep.points) expectRelative(point.value, singleAverage(lambda, point.intervalHours), 1e-6);
    // The same function drawn as a fault tree meets the target up to the same interval.
    const tree = await intervalSweep(single(lambda, 8760), { target, points: 8 });
    expectRelative(sweep.longestMeetingHours as number, tree.longestMeetingHours as number, 1e-3);
  });

  it('scales every test of the main chain and of each part together, capped at the mission', () => {
    const chain = singleChain(1e-6, 8760);
    const valve = { id: 'VALVE', states: chain.states, transitions: chain.transitions, tests: [{ intervalHours: 4380, firstHours: 2190, moves: [{ from: 'DU', to: 'OK', probability: 1 }] }] };
    const model: MarkovModel = { ...chain, parts: [valve] };
    const scaled = withProofTestInterval(model, 17_520) as MarkovModel;
    expect(scaled.tests?.[0].intervalHours).toBe(17_520);
    expect(scaled.parts?.[0].tests?.[0]).toMatchObject({ intervalHours: 8760, firstHours: 4380 });
    const capped = withProofTestInterval(model, 10 * MISSION) as MarkovModel;
    expect([capped.tests?.[0].intervalHours, capped.parts?.[0].tests?.[0].intervalHours]).toEqual([MISSION, MISSION]);
  });

  it('the tornado varies each transition rate and the test interval: the closed form at lambda x/÷ 2 and at twice the interval (1e-6 relative)', async () => {
    const lambda = 1e-6;
    const result = await tornado(singleChain(lambda, 8760), { factor: 2 });
    expect(result.bars.map((bar) => bar.parameter).sort()).toEqual(['proof test interval (all tests)', 'rate OK -> DU (DU failure)']);
    expectRelative(result.base, singleAverage(lambda, 8760), 1e-6);
    const rate = result.bars.find((bar) => bar.parameter.startsWith('rate'));
    expectRelative(rate?.highValue as number, singleAverage(2 * lambda, 8760), 1e-6);
    expectRelative(rate?.lowValue as number, singleAverage(lambda / 2, 8760), 1e-6);
    const interval = result.bars.find((bar) => bar.parameter.startsWith('proof test'));
    expectRelative(interval?.highValue as number, singleAverage(lambda, 17_520), 1e-6);
  });

  it('the uncertainty of one transition equals that of the same channel as a fault tree with error factor 3 and the same seed (1e-6 relative)', async () => {
    const options = { target: { limit: 5e-3, inclusive: true }, samples: 200, seed: 5 };
    const chain = await rateUncertainty(singleChain(1e-6, 8760), options);
    const tree = await rateUncertainty(single(1e-6, 8760), options);
    expect(chain.errorFactors).toEqual({ 'DU failure': 3 });
    for (const key of ['p05', 'p50', 'p95', 'mean'] as const) expectRelative(chain[key], tree[key], 1e-6);
    expect(chain.probabilityMeetingTarget).toBe(tree.probabilityMeetingTarget);
  });

  it('transitions with one label share one factor: the 1oo2 chain at the 95 % point is the chain at lambda x 3 (8 %, 2000 samples); independent factors would give about half', async () => {
    const lambda = 2e-6;
    const result = await rateUncertainty(pairChain(lambda, 8760), { target: { limit: 1e-3, inclusive: true }, samples: 2000, seed: 7 });
    expect(Object.keys(result.errorFactors)).toEqual(['DU failure']);
    // PFDavg of the chain rises with the shared factor, so its 95 % quantile is the chain at the factor's, EF = 3.
    expectRelative(result.p95, evaluateMeasure(pairChain(3 * lambda, 8760)), 0.08);
    expectRelative(result.p50, evaluateMeasure(pairChain(lambda, 8760)), 0.08);
  });
});
