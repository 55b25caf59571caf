import { inv, matrix, multiply, ones, subset, index as mathIndex, type Matrix } from 'mathjs';
import { describe, expect, it } from 'vitest';
import type { FaultTreeModel } from '../../shared/model-file.js';
import { spuriousTripRate, votedTripRate } from './spurious-trip.js';

/** |actual - expected| <= tolerance * |expected|. */
function expectRelative(actual: number, expected: number, tolerance: number): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(tolerance * Math.abs(expected));
}

/**
 * Mean time to M of n identical repairable channels being tripped at once, from the birth-death chain of
 * the number tripped (rate (n - j) lambda up, j mu down, M absorbing): MTTF = row sums of (-Q)^-1 from
 * state 0 (Rausand & Hoyland, System Reliability Theory 2nd ed., Markov MTTF, from memory; matrix
 * inverse by mathjs).
 */
function birthDeathMttf(n: number, m: number, lambda: number, mttr: number): number {
  const mu = 1 / mttr;
  const size = m;
  const q: number[][] = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  for (let j = 0; j < size; j++) {
    const up = (n - j) * lambda;
    const down = j * mu;
    q[j][j] = -(up + down);
    if (j + 1 < size) q[j][j + 1] = up;
    if (j > 0) q[j][j - 1] = down;
  }
  const negative = matrix(q.map((row) => row.map((value) => -value)));
  const times = multiply(inv(negative), ones(size, 1) as Matrix) as Matrix;
  return subset(times, mathIndex(0, 0)) as unknown as number;
}

function voted(n: number, k: number, lambdaS: number, mttrHours: number, beta = 0): FaultTreeModel {
  const ids = Array.from({ length: n }, (_, index) => `CH-${index + 1}`);
  return {
    format: 'proofline/model',
    version: 1,
    name: 'spurious test',
    mission: { hours: 87_600, demand: 'low' },
    kind: 'fault-tree',
    events: ids.map((id) => ({ id, lambdaDU: 1e-7, lambdaS, mttrHours })),
    gates: [{ id: 'G', type: 'atLeast', k, inputs: ids }],
    ccf: beta > 0 ? [{ id: 'CCF', members: ids, beta, model: 'beta' }] : [],
    top: 'G',
  };
}

describe('spurious trip rate', () => {
  const lambda = 2e-6;
  const mttr = 8;

  it('closed forms: 1oo2 = 2 lambda, 2oo2 = 2 lambda^2 MTTR, 2oo3 = 6 lambda^2 MTTR (PDS method, from memory; 1e-12 relative)', () => {
    const channel = { rate: lambda, restorationHours: mttr };
    expectRelative(votedTripRate([channel, channel], 1), 2 * lambda, 1e-12);
    expectRelative(votedTripRate([channel, channel], 2), 2 * lambda * lambda * mttr, 1e-12);
    expectRelative(votedTripRate([channel, channel, channel], 2), 6 * lambda * lambda * mttr, 1e-12);
  });

  it.each([
    [2, 1, 2],
    [3, 2, 2],
    [4, 2, 3],
  ])('%i channels failing dangerously at %i (M = %i to act): 1 / rate matches the Markov MTTF within 0.1 %% (lambda MTTR = 1.6e-5)', (n, k, m) => {
    const result = spuriousTripRate(voted(n, k, lambda, mttr));
    expect(result.subsystems[0].voting).toBe(`${m}oo${n}`);
    expectRelative(result.mttfSpuriousHours as number, birthDeathMttf(n, m, lambda, mttr), 1e-3);
  });

  it('subsystems in series add, and a beta group adds beta lambdaS (beta model, IEC 61508-6:2010 Annex D applied to safe failures)', () => {
    const single = voted(2, 1, lambda, mttr);
    const withBeta = spuriousTripRate(voted(2, 1, lambda, mttr, 0.1));
    const independent = 2 * (0.9 * lambda) ** 2 * mttr;
    expectRelative(withBeta.ratePerHour, independent + 0.1 * lambda, 1e-12);
    const series: FaultTreeModel = {
      ...single,
      events: [...single.events, { id: 'XV', lambdaDU: 1e-6, lambdaS: 3e-6, mttrHours: 24 }],
      gates: [...single.gates, { id: 'TOP', type: 'or', inputs: ['G', 'XV'] }],
      top: 'TOP',
    };
    const result = spuriousTripRate(series);
    expectRelative(result.ratePerHour, 2 * lambda * lambda * mttr + 3e-6, 1e-12);
    expect(result.subsystems.map((item) => item.id)).toEqual(['G', 'XV']);
  });

  it('missing safe rates and repair times are reported, not silently taken', () => {
    const model = voted(2, 2, lambda, mttr);
    const bare: FaultTreeModel = { ...model, events: model.events.map((event) => ({ id: event.id, lambdaDU: 1e-7 })) };
    const result = spuriousTripRate(bare);
    expect(result.ratePerHour).toBe(0);
    expect(result.mttfSpuriousHours).toBeNull();
    expect(result.notes.join(' ')).toMatch(/no safe failure rate/);
  });
});
