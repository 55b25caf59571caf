import { readFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import type { SolveResult } from '../shared/solve-result.js';
import { ModelError, SOLVER_VERSION, SolverUnavailableError, solveModel } from './index.js';

/**
 * `npm run --silent solve -- model.json [--json] [--points N] [--method exact|montecarlo] [--samples N] [--seed S]`
 * Prints the result of one solve: one JSON object with --json, else a readable summary.
 * Exit codes: 0 solved, 2 the file or the model is wrong (each problem named by its path in the file),
 * 1 anything else.
 */
const USAGE = 'usage: npm run --silent solve -- <model.json> [--json] [--points N] [--method exact|montecarlo] [--samples N] [--seed S]';

function fail(lines: string[], code: number): never {
  for (const line of lines) process.stderr.write(`${line}\n`);
  process.exit(code);
}

function summary(path: string, result: SolveResult): string {
  const lines = [
    `${path}: ${result.method} (${result.algorithm}), solver ${result.solverVersion}`,
    `mission ${result.missionHours} h, ${result.demand} demand`,
    `PFDavg ${result.pfdAvg.toExponential(3)}   PFDmax ${result.pfdMax.toExponential(3)}   RRF ${result.rrf.toPrecision(4)}`,
    `PFH    ${result.pfh.toExponential(3)} /h`,
    `SIL    ${result.sil ?? 'below SIL 1'} (by ${result.demand === 'low' ? 'PFDavg' : 'PFH'})`,
  ];
  if (result.interval) {
    lines.push(`99 % interval: PFDavg ${result.interval.pfdAvg.lower.toExponential(3)} to ${result.interval.pfdAvg.upper.toExponential(3)}, PFH ${result.interval.pfh.lower.toExponential(3)} to ${result.interval.pfh.upper.toExponential(3)} (${result.samples} missions)`);
  }
  if (result.errorBound !== undefined) lines.push(`relative error estimate of PFDavg: ${result.errorBound.toExponential(1)}`);
  if (result.simplified.length > 0) {
    lines.push('', 'simplified formulas:');
    for (const value of result.simplified) {
      const deviation = value.deviation === null ? '' : `, exact deviates ${(value.deviation * 100).toFixed(1)} %`;
      lines.push(`  ${value.scope}: PFDavg ${value.pfdAvg?.toExponential(3) ?? '-'}, PFH ${value.pfh?.toExponential(3) ?? '-'} (${value.formula}${deviation})`);
      for (const warning of value.warnings) lines.push(`    note: ${warning}`);
    }
  }
  if (result.cutSets.length > 0) {
    lines.push('', 'most probable minimal cut sets:');
    for (const cutSet of result.cutSets.slice(0, 10)) {
      lines.push(`  ${cutSet.probability.toExponential(3)}  ${(cutSet.share * 100).toFixed(1).padStart(5)} %  {${cutSet.events.join(', ')}}`);
    }
  }
  const ranked = [...result.importance].filter((item) => item.kind !== 'gate').sort((a, b) => b.share - a.share);
  if (ranked.length > 0) {
    lines.push('', 'weakest links (share of PFDavg, Fussell-Vesely):');
    for (const item of ranked.slice(0, 10)) lines.push(`  ${item.id.padEnd(20)} ${(item.share * 100).toFixed(1).padStart(5)} %   RAW ${item.riskAchievementWorth.toPrecision(3)}`);
  }
  for (const warning of result.warnings) lines.push(`warning: ${warning}`);
  return lines.join('\n');
}

function main(): void {
  let parsed;
  try {
    parsed = parseArgs({
      allowPositionals: true,
      options: { json: { type: 'boolean' }, points: { type: 'string' }, method: { type: 'string' }, samples: { type: 'string' }, seed: { type: 'string' }, version: { type: 'boolean' } },
    });
  } catch (error) {
    fail([(error as Error).message, USAGE], 2);
  }
  if (parsed.values.version) {
    process.stdout.write(`${SOLVER_VERSION}\n`);
    return;
  }
  const [path, ...extra] = parsed.positionals;
  if (!path || extra.length > 0) fail([USAGE], 2);
  const method = parsed.values.method ?? 'exact';
  if (method !== 'exact' && method !== 'montecarlo') fail([`--method must be "exact" or "montecarlo" (got "${method}")`], 2);
  const points = parsed.values.points === undefined ? undefined : Number(parsed.values.points);
  if (points !== undefined && (!Number.isInteger(points) || points < 2)) fail([`--points must be an integer of at least 2 (got "${parsed.values.points}")`], 2);
  const samples = parsed.values.samples === undefined ? undefined : Number(parsed.values.samples);
  if (samples !== undefined && (!Number.isInteger(samples) || samples < 1)) fail([`--samples must be a positive integer (got "${parsed.values.samples}")`], 2);
  const seed = parsed.values.seed === undefined ? undefined : Number(parsed.values.seed);
  if (seed !== undefined && !Number.isSafeInteger(seed)) fail([`--seed must be an integer (got "${parsed.values.seed}")`], 2);

  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (error) {
    fail([`${path}: cannot read the file (${(error as NodeJS.ErrnoException).code ?? (error as Error).message})`], 2);
  }
  let model: unknown;
  try {
    model = JSON.parse(text);
  } catch (error) {
    fail([`${path}: not valid JSON (${(error as Error).message})`], 2);
  }
  try {
    const result = solveModel(model as Parameters<typeof solveModel>[0], { method, timePoints: points, samples, seed });
    process.stdout.write(parsed.values.json ? `${JSON.stringify(result)}\n` : `${summary(path, result)}\n`);
  } catch (error) {
    if (error instanceof ModelError) fail([`${path}: the model is not valid:`, ...error.lines().map((line) => `  ${line}`)], 2);
    if (error instanceof SolverUnavailableError || error instanceof RangeError) fail([`${path}: ${error.message}`], 2);
    throw error;
  }
}

main();
