import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { solveResult } from '../../shared/solve-result.js';
import { generateModels } from './index.js';

function runCli(...args: string[]) {
  return spawnSync(process.execPath, ['--import', 'tsx', 'solver/cli.ts', ...args], { encoding: 'utf8', cwd: process.cwd() });
}

const { markov, faultTree } = generateModels({
  name: 'Separator level trip',
  mission: { hours: 87_600, demand: 'low' },
  groups: [{ id: 'LT', voting: '1oo2', beta: 0.1, channels: { identical: { lambdaDU: 2e-6, lambdaDD: 1e-6, mttrHours: 8, proofTest: { intervalHours: 8760 } }, count: 2 } }],
});
const folder = mkdtempSync(join(tmpdir(), 'proofline-generated-'));
const markovPath = join(folder, 'markov.json');
const treePath = join(folder, 'tree.json');
writeFileSync(markovPath, JSON.stringify(markov));
writeFileSync(treePath, JSON.stringify(faultTree));

describe('solve CLI with generated models', () => {
  it('solves a state model with the same keys plus states', () => {
    const run = runCli(markovPath, '--json', '--points', '100');
    expect(run.status).toBe(0);
    const result = JSON.parse(run.stdout);
    expect(solveResult.safeParse(result).success).toBe(true);
    expect(result.method).toBe('markov');
    for (const key of ['pfdAvg', 'pfdMax', 'pfh', 'rrf', 'sil', 'curve', 'simplified', 'cutSets', 'importance', 'states']) expect(result).toHaveProperty(key);
    expect(result.states.length).toBe(markov.states.length);
    expect(result.states[0].probability.length).toBe(result.curve.hours.length);
  });

  it('runs the simulator with --method montecarlo --samples N --seed S, reproducibly', () => {
    const first = runCli(treePath, '--json', '--method', 'montecarlo', '--samples', '3000', '--seed', '12');
    const again = runCli(treePath, '--json', '--method', 'montecarlo', '--samples', '3000', '--seed', '12');
    expect(first.status).toBe(0);
    const result = JSON.parse(first.stdout);
    expect(result.method).toBe('montecarlo');
    expect(result.samples).toBe(3000);
    expect(result.interval.pfdAvg.level).toBe(0.99);
    expect(JSON.parse(again.stdout).pfdAvg).toBe(result.pfdAvg);
    const summary = runCli(treePath, '--method', 'montecarlo', '--samples', '1000');
    expect(summary.stdout).toMatch(/99 % interval: PFDavg/);
  });

  it('refuses bad --samples and --seed with exit 2', () => {
    expect(runCli(treePath, '--method', 'montecarlo', '--samples', 'many').status).toBe(2);
    const run = runCli(treePath, '--method', 'montecarlo', '--seed', '1.5');
    expect(run.status).toBe(2);
    expect(run.stderr).toMatch(/--seed must be an integer/);
  });
});
