import type { SolveResult } from '../../../../shared/solve-result.js';

/**
 * An invented 1oo1 channel over 10 years for the chart benchmark: lambdaDU = 2e-6 per hour, a partial
 * stroke test every 3 months finding 60 % of the failures, a proof test every year finding the rest,
 * sampled at `points` evenly spaced times. PFD(t) is the sum of the exponential parts left since each one's
 * last test (1 - exp(-lambda c t) per covered part c), w(t) the failure density of the part still up; no
 * solve, so the page needs no server.
 */
export function syntheticResult(points: number): SolveResult {
  const lambda = 2e-6;
  const mission = 87_600;
  const partial = 2190;
  const proof = 8760;
  const covered = 0.6;
  const hours: number[] = [];
  const pfd: number[] = [];
  const frequency: number[] = [];
  for (let index = 0; index < points; index++) {
    const t = (index / (points - 1)) * mission;
    const sincePartial = t % partial;
    const sinceProof = t % proof;
    const partialDown = -Math.expm1(-lambda * covered * sincePartial);
    const proofDown = -Math.expm1(-lambda * (1 - covered) * sinceProof);
    hours.push(t);
    pfd.push(1 - (1 - partialDown) * (1 - proofDown));
    frequency.push(lambda * (1 - partialDown) * (1 - proofDown));
  }
  const average = (values: readonly number[]) => values.reduce((sum, value) => sum + value, 0) / values.length;
  const pfdAvg = average(pfd);
  return {
    method: 'fault-tree',
    algorithm: 'synthetic benchmark curve',
    solverVersion: 'bench',
    demand: 'low',
    missionHours: mission,
    pfdAvg,
    pfdMax: Math.max(...pfd),
    pfh: average(frequency),
    rrf: 1 / pfdAvg,
    sil: 2,
    curve: { hours, pfd, frequency },
    simplified: [],
    cutSets: [],
    importance: [],
    warnings: [],
  };
}
