import { expm as mathjsExpm, matrix } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { createRandomStream } from '../random/index.js';
import { expm, propagatorWithIntegral } from './dense-exponential.js';

function randomGenerator(n: number, seed: number, scale: number): Float64Array {
  const random = createRandomStream(seed);
  const q = new Float64Array(n * n);
  for (let i = 0; i < n; i += 1) {
    let exit = 0;
    for (let j = 0; j < n; j += 1) {
      if (i === j || random.next() < 0.4) continue;
      const rate = scale * random.next() ** 3;
      q[i * n + j] = rate;
      exit += rate;
    }
    q[i * n + i] = -exit;
  }
  return q;
}

function toRows(values: Float64Array, n: number): number[][] {
  return Array.from({ length: n }, (_, i) => Array.from(values.subarray(i * n, i * n + n)));
}

describe('Pade-13 matrix exponential', () => {
  it('agrees with mathjs expm to 1e-9 on generators from mild to stiff (q h from 0.01 to 500)', () => {
    // Reference: mathjs (npm, a general-purpose library) expm. Tolerance 1e-9 absolute on entries in [0, 1].
    for (const [n, scale, seed] of [[3, 0.01, 1], [5, 1, 2], [8, 20, 3], [12, 500, 4], [6, 1e-6, 5]] as const) {
      const q = randomGenerator(n, seed, scale);
      const ours = toRows(expm(q, n), n);
      const reference = (mathjsExpm(matrix(toRows(q, n))).toArray() as number[][]);
      for (let i = 0; i < n; i += 1) for (let j = 0; j < n; j += 1) expect(Math.abs(ours[i][j] - reference[i][j])).toBeLessThan(1e-9);
    }
  });

  it('agrees with mathjs on a matrix that is not a generator (negative and positive entries)', () => {
    // Reference: mathjs expm; tolerance 1e-9 relative to the largest entry.
    const random = createRandomStream(9);
    const n = 7;
    const a = Float64Array.from({ length: n * n }, () => 4 * (random.next() - 0.5));
    const ours = toRows(expm(a, n), n);
    const reference = (mathjsExpm(matrix(toRows(a, n))).toArray() as number[][]);
    const largest = Math.max(...reference.flat().map(Math.abs));
    for (let i = 0; i < n; i += 1) for (let j = 0; j < n; j += 1) expect(Math.abs(ours[i][j] - reference[i][j])).toBeLessThan(1e-9 * largest);
  });

  it('gives the integral of a two-state chain over a step in closed form (Van Loan block)', () => {
    // Exact closed form: for OK -> DU at rate lambda, the integral over [0, h] of P(DU at s | OK at 0) is
    // h - (1 - e^(-lambda h)) / lambda. Tolerance 1e-12 relative (1e-14 absolute on exp(-lambda h)).
    const lambda = 3e-3;
    const hours = 500;
    const q = Float64Array.of(-lambda, lambda, 0, 0);
    const { propagator, integrals } = propagatorWithIntegral(q, 2, hours, [Float64Array.of(0, 1)]);
    const expected = hours - -Math.expm1(-lambda * hours) / lambda;
    expect(Math.abs(integrals[0][0] - expected) / expected).toBeLessThan(1e-12);
    expect(integrals[0][1]).toBeCloseTo(hours, 9);
    expect(Math.abs(propagator[0] - Math.exp(-lambda * hours))).toBeLessThan(1e-14);
  });
});
