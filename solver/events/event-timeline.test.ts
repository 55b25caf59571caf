import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { compileEventTimeline, evaluateEventTimeline, expm1Small } from './event-timeline.js';

// Fixed seed so that a failure can be replayed.
const SEED = 20261204;

describe('expm1Small (fast-check, seeded)', () => {
  it('equals Math.expm1 (the platform library, within 1 ulp by ECMA-262) to 1e-15 relative on [-1/4, 1/4]', () => {
    fc.assert(
      fc.property(fc.double({ min: -0.25, max: 0.25, noNaN: true }), (y) => {
        const expected = Math.expm1(y);
        expect(Math.abs(expm1Small(y) - expected)).toBeLessThanOrEqual(1e-15 * Math.abs(expected));
      }),
      { seed: SEED, numRuns: 2000 },
    );
  });

  it('is Math.expm1 itself beyond 1/4, and exact at the series switch 1/64 and at 0 (1e-15 relative)', () => {
    for (const y of [-3, -0.26, 0.3, 5]) expect(expm1Small(y)).toBe(Math.expm1(y));
    for (const y of [-0.015625, -0.0156251, 0.015625, 0.0156251]) {
      expect(Math.abs(expm1Small(y) - Math.expm1(y))).toBeLessThanOrEqual(1e-15 * Math.abs(Math.expm1(y)));
    }
    expect(expm1Small(0)).toBe(0);
  });
});

describe('event unavailability with the series exponentials', () => {
  it('a proof-tested DU event with instant repair is 1 - e^{-lambda (t - last test)} (Rausand & Hoyland, System Reliability Theory, 2nd ed., periodically tested item, section from memory; 1e-13 relative)', () => {
    fc.assert(
      fc.property(fc.double({ min: 1e-9, max: 1e-4, noNaN: true }), fc.integer({ min: 100, max: 8760 }), (lambda, interval) => {
        const mission = 10 * interval;
        const timeline = compileEventTimeline({
          lambdaDD: 0,
          mttrHours: 0,
          revealed: [{ lambda, revealTimes: Array.from({ length: 9 }, (_, index) => (index + 1) * interval) }],
          lambdaNeverRevealed: 0,
          downWindows: [],
        });
        const times = Float64Array.from({ length: 257 }, (_, index) => (index * mission) / 256 + 0.37);
        const q = new Float64Array(times.length);
        evaluateEventTimeline(timeline, times, q, 0);
        times.forEach((t, index) => {
          const since = t - Math.min(9, Math.floor(t / interval)) * interval;
          const expected = -Math.expm1(-lambda * since);
          expect(Math.abs(q[index] - expected)).toBeLessThanOrEqual(1e-13 * expected);
        });
      }),
      { seed: SEED, numRuns: 200 },
    );
  });
});
