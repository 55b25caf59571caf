import { expm, matrix, type Matrix } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { solveModel } from '../index.js';
import { FaultTreeEngine } from './engine.js';
import { channel, faultTree, votedGroup } from './test-models.js';

/** |actual - expected| <= tolerance * |expected|. */
function expectRelative(actual: number, expected: number, tolerance: number): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(tolerance * Math.abs(expected));
}

function binomial(n: number, k: number): number {
  let value = 1;
  for (let i = 1; i <= k; i++) value = (value * (n - k + i)) / i;
  return value;
}

/**
 * Rausand & Hoyland, System Reliability Theory (2nd ed.), periodically tested k-out-of-n structures:
 * PFDavg = (1/tau) integral over [0, tau] of P(at least k of n channels failed), p(t) = 1 - e^{-lambda t}.
 * Expanding p^j (1-p)^(n-j) into exponentials e^{-m lambda t} gives the integral in closed form:
 * (1/tau) int e^{-m lambda t} dt = (1 - e^{-m lambda tau}) / (m lambda tau), 1 for m = 0.
 */
function kOutOfNAverage(n: number, k: number, lambda: number, tau: number): number {
  const meanExp = (m: number) => (m === 0 ? 1 : -Math.expm1(-m * lambda * tau) / (m * lambda * tau));
  let sum = 0;
  for (let j = k; j <= n; j++) {
    for (let i = 0; i <= j; i++) sum += binomial(n, j) * binomial(j, i) * (-1) ** i * meanExp(n - j + i);
  }
  return sum;
}

describe('exact engine against closed forms (tolerance 1e-6 relative unless stated)', () => {
  it('1oo1 periodically tested: PFDavg = 1 - (1 - e^{-lambda tau}) / (lambda tau) (Rausand & Hoyland)', () => {
    for (const lambdaTau of [1e-3, 0.0876, 0.5, 2]) {
      const tau = 8760;
      const lambda = lambdaTau / tau;
      const model = faultTree({ missionHours: 5 * tau, events: [channel('PT', { lambdaDU: lambda, intervalHours: tau })], top: 'PT' });
      const result = solveModel(model);
      expectRelative(result.pfdAvg, 1 - -Math.expm1(-lambdaTau) / lambdaTau, 1e-6);
      expect(result.errorBound).toBeLessThan(1e-6);
    }
  });

  it.each([
    [2, 2, 0.1],
    [3, 2, 0.05],
    [3, 3, 0.3],
    [4, 2, 0.2],
    [4, 3, 0.15],
    [5, 3, 0.4],
  ])('%i channels failing when %i fail, lambda tau %f: the binomial tail integral (Rausand & Hoyland)', (n, k, lambdaTau) => {
    const tau = 4380;
    const model = votedGroup(n, k, { lambdaDU: lambdaTau / tau, intervalHours: tau, missionHours: 3 * tau });
    expectRelative(solveModel(model).pfdAvg, kOutOfNAverage(n, k, lambdaTau / tau, tau), 1e-6);
  });

  it('imperfect proof test: the unrevealed share renews only at the mission end (closed form, R&H imperfect testing)', () => {
    const tau = 8760;
    const periods = 10;
    const lambda = 2e-6;
    const coverage = 0.7;
    const model = faultTree({ missionHours: periods * tau, events: [channel('XV', { lambdaDU: lambda, intervalHours: tau, coverage })], top: 'XV' });
    // Survival in proof period k at s: e^{-c lambda s} e^{-(1-c) lambda (k tau + s)}; its integral over the
    // period is e^{-(1-c) lambda k tau} (1 - e^{-lambda tau}) / lambda.
    let survival = 0;
    for (let k = 0; k < periods; k++) survival += (Math.exp(-(1 - coverage) * lambda * k * tau) * -Math.expm1(-lambda * tau)) / lambda;
    expectRelative(solveModel(model).pfdAvg, 1 - survival / (periods * tau), 1e-6);
  });

  it('partial test inside the proof test interval: closed form per partial period', () => {
    const tau = 8760;
    const partialEvery = 730;
    const lambda = 3e-6;
    const partialCoverage = 0.6;
    const model = faultTree({
      missionHours: 4 * tau,
      events: [channel('XV', { lambdaDU: lambda, intervalHours: tau, partial: { intervalHours: partialEvery, coverage: partialCoverage } })],
      top: 'XV',
    });
    let survival = 0;
    for (let i = 0; i < tau / partialEvery; i++) {
      survival += (Math.exp(-(1 - partialCoverage) * lambda * i * partialEvery) * -Math.expm1(-lambda * partialEvery)) / lambda;
    }
    expectRelative(solveModel(model).pfdAvg, 1 - survival / tau, 1e-6);
  });

  it('staggered 1oo2: exact piecewise integral, and about 5/8 of the simultaneous value (common practice: 5/24 vs 1/3 lambda^2 tau^2)', () => {
    const tau = 8760;
    const lambda = 1e-6;
    const mission = 40 * tau;
    const staggered = votedGroup(2, 2, { lambdaDU: lambda, intervalHours: tau, missionHours: mission, stagger: true });
    // Channel 2 is tested at tau/2, 3tau/2, ...; channel 1 at tau, 2tau, ... On [a, b], with channel i last
    // renewed at s_i: int (1 - e^{-l(t-s1)})(1 - e^{-l(t-s2)}) dt in closed form.
    const segment = (a: number, b: number, s1: number, s2: number) =>
      b - a - ((Math.exp(lambda * s1) + Math.exp(lambda * s2)) * (Math.exp(-lambda * a) - Math.exp(-lambda * b))) / lambda +
      (Math.exp(lambda * (s1 + s2)) * (Math.exp(-2 * lambda * a) - Math.exp(-2 * lambda * b))) / (2 * lambda);
    const edges = [0];
    for (let t = tau / 2; t < mission; t += tau / 2) edges.push(t);
    edges.push(mission);
    let integral = 0;
    for (let i = 0; i + 1 < edges.length; i++) {
      const a = edges[i];
      const s1 = Math.floor(a / tau) * tau;
      const s2 = a < tau / 2 ? 0 : Math.floor((a - tau / 2) / tau) * tau + tau / 2;
      integral += segment(a, edges[i + 1], s1, s2);
    }
    const exact = solveModel(staggered).pfdAvg;
    expectRelative(exact, integral / mission, 1e-6);
    const together = solveModel(votedGroup(2, 2, { lambdaDU: lambda, intervalHours: tau, missionHours: mission })).pfdAvg;
    // The first half period of channel 2 is not staggered yet (about 0.5 % over 40 periods) and lambda tau
    // is 0.009: tolerance 1 %.
    expectRelative(exact / together, 5 / 8, 0.01);
  });

  it('time out of service for a test counts as failed: closed form with the test window', () => {
    const tau = 1000;
    const duration = 10;
    const lambda = 1e-4;
    const periods = 5;
    const model = faultTree({ missionHours: periods * tau, events: [channel('PT', { lambdaDU: lambda, intervalHours: tau, durationHours: duration })], top: 'PT' });
    const first = tau + Math.expm1(-lambda * tau) / lambda;
    const later = duration + (tau - duration) - (Math.exp(-lambda * duration) - Math.exp(-lambda * tau)) / lambda;
    expectRelative(solveModel(model).pfdAvg, (first + (periods - 1) * later) / (periods * tau), 1e-6);
  });

  it('repair after a test and DD repair: q(t) and PFDavg against the Markov chain solved with mathjs expm', () => {
    const lambdaDU = 1e-4;
    const lambdaDD = 5e-4;
    const mttr = 100;
    const mu = 1 / mttr;
    const tau = 1000;
    const mission = 3 * tau;
    const model = faultTree({ missionHours: mission, events: [channel('PT', { lambdaDU, lambdaDD, mttrHours: mttr, intervalHours: tau })], top: 'PT' });
    // The DU chain (working, hidden, repair) and the DD chain (working, repair) are independent; a test
    // moves hidden to repair. Integrals of e^{Qs} come from the block matrix [[Q, I], [0, 0]] (Van Loan 1978).
    const du = [
      [-lambdaDU, lambdaDU, 0],
      [0, 0, 0],
      [mu, 0, -mu],
    ];
    const dd = [
      [-lambdaDD, lambdaDD],
      [mu, -mu],
    ];
    const rowTimes = (row: number[], m: number[][]) => m[0].map((_, c) => row.reduce((sum, value, r) => sum + value * m[r][c], 0));
    const exp = (q: number[][], h: number) => (expm(matrix(q.map((row) => row.map((value) => value * h)))) as Matrix).toArray() as number[][];
    const integralOfExp = (q: number[][], h: number) => {
      const n = q.length;
      const block = Array.from({ length: 2 * n }, (_, r) => Array.from({ length: 2 * n }, (_, c) => (r < n && c < n ? q[r][c] * h : r < n && c === r + n ? h : 0)));
      const full = (expm(matrix(block)) as Matrix).toArray() as number[][];
      return full.slice(0, n).map((row) => row.slice(n));
    };
    // The joint chain of the two independent chains has the Kronecker-sum generator; state (du, dd) is at
    // index 2 du + dd, and the event works only in (working, working) = index 0.
    const joint = Array.from({ length: 6 }, (_, r) =>
      Array.from({ length: 6 }, (_, c) => {
        const [duR, ddR, duC, ddC] = [r >> 1, r & 1, c >> 1, c & 1];
        return (ddR === ddC ? du[duR][duC] : 0) + (duR === duC ? dd[ddR][ddC] : 0);
      }),
    );
    const atTest = (state: number[]) => [state[0], state[1], 0, 0, state[4] + state[2], state[5] + state[3]];
    const engine = new FaultTreeEngine(model);
    const probe = new Float64Array([500, 1000, 1000.5, 1050, 1999, 2400]);
    const q = engine.topProbability(probe);
    probe.forEach((t, index) => {
      let state = [1, 0, 0, 0, 0, 0];
      let at = 0;
      for (const testTime of [tau, 2 * tau]) {
        if (testTime > t) break;
        state = atTest(rowTimes(state, exp(joint, testTime - at)));
        at = testTime;
      }
      const expected = 1 - rowTimes(state, exp(joint, t - at))[0];
      expect(Math.abs(q[index] - expected)).toBeLessThan(1e-12);
    });
    let state = [1, 0, 0, 0, 0, 0];
    let integral = 0;
    for (let period = 0; period < 3; period++) {
      integral += tau - rowTimes(state, integralOfExp(joint, tau))[0];
      state = atTest(rowTimes(state, exp(joint, tau)));
    }
    expectRelative(solveModel(model).pfdAvg, integral / mission, 1e-6);
  });
});

describe('combine at each time point, then integrate (never average the events first)', () => {
  it('1oo2 and 1oo3: averaging q first understates PFDavg by 25 % and 50 % (issue note; lambda tau small)', () => {
    const tau = 8760;
    const lambda = 1e-8;
    const average = (lambda * tau) / 2;
    const oneOutOfTwo = solveModel(votedGroup(2, 2, { lambdaDU: lambda, intervalHours: tau, missionHours: tau * 2 })).pfdAvg;
    const oneOutOfThree = solveModel(votedGroup(3, 3, { lambdaDU: lambda, intervalHours: tau, missionHours: tau * 2 })).pfdAvg;
    // (lambda tau)^2 / 3 against (lambda tau / 2)^2 and (lambda tau)^3 / 4 against (lambda tau / 2)^3; tolerance 1e-3.
    expectRelative(average ** 2 / oneOutOfTwo, 0.75, 1e-3);
    expectRelative(average ** 3 / oneOutOfThree, 0.5, 1e-3);
  });
});

describe('PFH against closed forms (tolerance 1e-6 relative)', () => {
  it('1oo1 never tested: PFH = (1 - e^{-lambda T}) / T, the failure density averaged over the mission', () => {
    const lambda = 2e-6;
    const mission = 87600;
    const result = solveModel(faultTree({ missionHours: mission, demand: 'high', events: [channel('PT', { lambdaDU: lambda })], top: 'PT' }));
    expectRelative(result.pfh, -Math.expm1(-lambda * mission) / mission, 1e-6);
  });

  it('1oo2 tested together: w(t) = 2 lambda e^{-lambda s} (1 - e^{-lambda s}), so PFH = (1 - e^{-lambda tau})^2 / tau', () => {
    const lambda = 5e-6;
    const tau = 2190;
    const result = solveModel(votedGroup(2, 2, { lambdaDU: lambda, intervalHours: tau, missionHours: 4 * tau, demand: 'high' }));
    expectRelative(result.pfh, Math.expm1(-lambda * tau) ** 2 / tau, 1e-6);
  });
});
