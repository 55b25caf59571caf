import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { compileEventTimeline, unavailabilityAt, type EventTimeline, type EventTimelineSpec } from './event-timeline.js';
import { evaluateForm, orForms, repairSteps } from './piecewise.js';

// Fixed seed so that a failure can be replayed.
const SEED = 20261205;
// The pieces are a rearrangement of the per-mode closed forms; they agree to rounding. Relative to q,
// with an absolute floor for the repaired share's cancellation right after a test (q drops from the
// repaired mass to almost nothing there): 1e-12 q + 1e-15 (the mass under repair).
const RELATIVE = 1e-12;

const intervals = [730, 2190, 4380, 8760];

/** A random event: DD with repair, DU split over partial test, proof test and never revealed, test windows; MTTR 0 sometimes. */
const specArbitrary: fc.Arbitrary<EventTimelineSpec> = fc
  .record({
    lambdaDU: fc.double({ min: 1e-9, max: 1e-4, noNaN: true }),
    lambdaDD: fc.constantFrom(0, 1e-7, 2e-6, 5e-5),
    mttrHours: fc.constantFrom(0, 4, 8, 72),
    interval: fc.constantFrom(...intervals),
    firstShare: fc.double({ min: 0.05, max: 1, noNaN: true }),
    partialShare: fc.constantFrom(0, 0.4, 0.6),
    proofShare: fc.constantFrom(0.6, 0.9, 1),
    duration: fc.constantFrom(0, 2, 8),
    equalRates: fc.boolean(),
  })
  .map((item) => {
    const mission = 43800;
    const first = Math.max(1, Math.round(item.interval * item.firstShare));
    const proofTimes: number[] = [];
    for (let time = first; time < mission; time += item.interval) proofTimes.push(time);
    const partialTimes: number[] = [];
    for (let time = 365; time < mission; time += 365) partialTimes.push(time);
    const revealed = [];
    const partial = item.partialShare > 0 ? item.partialShare : 0;
    // With equalRates the proof-test mode's rate is 1/MTTR exactly (the repaired share is mu s e^{-mu s}).
    const proofRate = item.equalRates && item.mttrHours > 0 ? 1 / item.mttrHours : item.lambdaDU * (item.proofShare - partial);
    if (partial > 0) revealed.push({ lambda: item.lambdaDU * partial, revealTimes: [...partialTimes, ...proofTimes] });
    revealed.push({ lambda: proofRate, revealTimes: proofTimes });
    return {
      lambdaDD: item.lambdaDD,
      mttrHours: item.mttrHours,
      revealed,
      lambdaNeverRevealed: item.lambdaDU * (1 - item.proofShare),
      downWindows: item.duration > 0 ? proofTimes.map((time): [number, number] => [time, Math.min(time + item.duration, mission)]) : [],
    };
  });

/** Increasing times over the mission: random ones, every test time and window edge twice (left limit, then value), and a few just after tests. */
function timesFor(timelines: readonly EventTimeline[], random: readonly number[]): { times: Float64Array; fromLeft: Uint8Array } {
  const points: [number, number][] = random.map((share) => [share * 43800, 0]);
  for (const timeline of timelines) {
    for (const time of timeline.breakpoints) points.push([time, 1], [time, 0], [time + 0.5, 0], [time + 30, 0]);
  }
  points.sort((a, b) => a[0] - b[0] || b[1] - a[1]);
  return { times: Float64Array.from(points, (point) => point[0]), fromLeft: Uint8Array.from(points, (point) => point[1]) };
}

function expectClose(actual: Float64Array, expected: (j: number) => number, floor: (j: number) => number): void {
  actual.forEach((value, j) => {
    const reference = expected(j);
    // In [0, 1] up to rounding.
    expect(value).toBeGreaterThanOrEqual(-1e-15);
    expect(value).toBeLessThanOrEqual(1 + 1e-15);
    expect(Math.abs(value - reference)).toBeLessThanOrEqual(RELATIVE * reference + floor(j));
  });
}

describe('event forms (pieces of sums of exponentials) against the per-mode closed forms (fast-check, seeded)', () => {
  it('an event: q(t) and its left limits at every test and window edge, with and without shared repair steps', () => {
    fc.assert(
      fc.property(specArbitrary, fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 50, maxLength: 300 }), (spec, random) => {
        const timeline = compileEventTimeline(spec);
        const { times, fromLeft } = timesFor([timeline], random);
        for (const steps of [undefined, repairSteps(times, timeline.mu)]) {
          const q = new Float64Array(times.length);
          const w = new Float64Array(times.length);
          evaluateForm(timeline.form, times, q, 0, timeline.lambdaDU, w, fromLeft, 0, true, timeline.mu === Infinity ? undefined : steps);
          expectClose(q, (j) => unavailabilityAt(timeline, times[j], fromLeft[j] === 1), () => 1e-15);
          w.forEach((value, j) => expect(value).toBeCloseTo(timeline.lambdaDU * (1 - q[j]), 20));
        }
      }),
      { seed: SEED, numRuns: 50 },
    );
  });

  it('times out of order give the same values as in order', () => {
    fc.assert(
      fc.property(specArbitrary, fc.array(fc.double({ min: 0, max: 43800, noNaN: true }), { minLength: 2, maxLength: 100 }), (spec, shuffled) => {
        const timeline = compileEventTimeline(spec);
        const times = Float64Array.from(shuffled);
        const q = new Float64Array(times.length);
        evaluateForm(timeline.form, times, q, 0, timeline.lambdaDU);
        expectClose(q, (j) => unavailabilityAt(timeline, times[j]), () => 1e-15);
      }),
      { seed: SEED, numRuns: 200 },
    );
  });

  it('an OR of two to four events (an OR module) equals 1 - prod(1 - q_i) of the members', () => {
    fc.assert(
      fc.property(fc.array(specArbitrary, { minLength: 2, maxLength: 4 }), fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 50, maxLength: 200 }), (specs, random) => {
        const timelines = specs.map(compileEventTimeline);
        const mu = timelines.find((timeline) => timeline.mu !== Infinity)?.mu ?? Infinity;
        const exactAt = (t: number, left: boolean) =>
          timelines.reduce((q, timeline) => {
            const qi = unavailabilityAt(timeline, t, left);
            return q + qi - q * qi;
          }, 0);
        const form = orForms(
          timelines.map((timeline) => timeline.form),
          mu,
          exactAt,
        );
        const { times, fromLeft } = timesFor(timelines, random);
        const q = new Float64Array(times.length);
        evaluateForm(form, times, q, 0, 0, undefined, fromLeft, 0, true, mu === Infinity ? undefined : repairSteps(times, mu));
        expectClose(q, (j) => exactAt(times[j], fromLeft[j] === 1), () => 1e-15);
      }),
      { seed: SEED, numRuns: 50 },
    );
  });
});
