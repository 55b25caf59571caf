import type { CompiledChain, CompiledTest } from './compile-chain.js';

/** One stretch of the mission between test times, cut into equal steps. */
export interface Segment {
  readonly start: number;
  readonly end: number;
  readonly steps: number;
}

/**
 * The common time grid of every chain of a model: segments between the test times of any chain, each cut
 * into equal steps (so every test time is a grid point and equal segments share their step), and for each
 * chain the tests it applies at the start of each segment, in the model's order.
 */
export interface Schedule {
  readonly segments: readonly Segment[];
  /** testsAtStart[chain][segment]: the tests of that chain applied at the start of that segment. */
  readonly testsAtStart: readonly (readonly CompiledTest[])[][];
  /** Number of grid points: each segment's start and end, so a test time appears twice (before, after). */
  readonly pointCount: number;
}

/**
 * Builds the grid. `timePoints` sets the density: a segment of length L gets round(timePoints L / T)
 * steps (at least one), times `substeps` (2 when the solver needs midpoints).
 */
export function buildSchedule(chains: readonly CompiledChain[], missionHours: number, timePoints: number, substeps: number): Schedule {
  const tolerance = missionHours * 1e-12;
  const raw = chains.flatMap((chain) => chain.tests.flatMap((test) => test.times)).sort((a, b) => a - b);
  const boundaries: number[] = [0];
  for (const time of raw) {
    if (time - boundaries[boundaries.length - 1] > tolerance && missionHours - time > tolerance) boundaries.push(time);
  }
  boundaries.push(missionHours);
  const segments: Segment[] = [];
  for (let index = 0; index + 1 < boundaries.length; index += 1) {
    const start = boundaries[index];
    const end = boundaries[index + 1];
    const steps = Math.max(1, Math.round((timePoints * (end - start)) / missionHours)) * substeps;
    segments.push({ start, end, steps });
  }
  const testsAtStart = chains.map((chain) => {
    const perSegment: CompiledTest[][] = segments.map(() => []);
    for (const test of chain.tests) {
      for (const time of test.times) {
        const segment = findSegmentStartingAt(boundaries, time, tolerance);
        if (segment > 0) perSegment[segment].push(test);
      }
    }
    return perSegment;
  });
  const pointCount = segments.reduce((sum, segment) => sum + segment.steps + 1, 0);
  return { segments, testsAtStart, pointCount };
}

function findSegmentStartingAt(boundaries: readonly number[], time: number, tolerance: number): number {
  let low = 0;
  let high = boundaries.length - 1;
  while (low < high) {
    const middle = (low + high) >> 1;
    if (boundaries[middle] < time - tolerance) low = middle + 1;
    else high = middle;
  }
  return Math.abs(boundaries[low] - time) <= tolerance ? low : -1;
}

/** The grid's hours, point by point (segment start, its steps, segment end; next segment...). */
export function scheduleHours(schedule: Schedule): Float64Array {
  const hours = new Float64Array(schedule.pointCount);
  let point = 0;
  for (const segment of schedule.segments) {
    const step = (segment.end - segment.start) / segment.steps;
    for (let index = 0; index <= segment.steps; index += 1) {
      hours[point] = index === segment.steps ? segment.end : segment.start + index * step;
      point += 1;
    }
  }
  return hours;
}
