import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { solveResult } from '../shared/solve-result.js';

const example = 'docs/examples/export-header-hipps.json';

function runCli(...args: string[]) {
  return spawnSync(process.execPath, ['--import', 'tsx', 'solver/cli.ts', ...args], { encoding: 'utf8', cwd: process.cwd() });
}

describe('solve CLI', () => {
  it('prints one JSON object with the result for an example model', () => {
    const run = runCli(example, '--json', '--points', '300');
    expect(run.status).toBe(0);
    const result = JSON.parse(run.stdout);
    expect(solveResult.safeParse(result).success).toBe(true);
    for (const key of ['pfdAvg', 'pfdMax', 'pfh', 'rrf', 'sil', 'curve', 'simplified', 'cutSets', 'importance']) expect(result).toHaveProperty(key);
    expect(result.curve.hours.length).toBe(result.curve.pfd.length);
    expect(result.pfdAvg).toBeGreaterThan(0);
    expect(result.pfdAvg).toBeLessThan(result.pfdMax);
    expect(result.cutSets[0].events).toEqual(['CCF-XV']);
  });

  it('prints a readable summary without --json', () => {
    const run = runCli(example);
    expect(run.status).toBe(0);
    expect(run.stdout).toMatch(/PFDavg \d\.\d{3}e-\d/);
    expect(run.stdout).toMatch(/weakest links/);
  });

  it('a bad file exits 2 and names the path of each problem in the file', () => {
    const model = JSON.parse(readFileSync(example, 'utf8'));
    model.events[4].lambdaDU = -2e-6;
    model.gates[1].k = 5;
    const folder = mkdtempSync(join(tmpdir(), 'proofline-cli-'));
    const path = join(folder, 'bad.json');
    writeFileSync(path, JSON.stringify(model));
    const run = runCli(path, '--json');
    expect(run.status).toBe(2);
    expect(run.stdout).toBe('');
    expect(run.stderr).toContain('events[4].lambdaDU');
    expect(run.stderr).toContain('gates[1].k: voting gate "SENSORS" has k = 5 but only 3 inputs');
  });

  it('a file that is not JSON exits 2 with the reason', () => {
    const folder = mkdtempSync(join(tmpdir(), 'proofline-cli-'));
    const path = join(folder, 'broken.json');
    writeFileSync(path, '{ "format": ');
    const run = runCli(path);
    expect(run.status).toBe(2);
    expect(run.stderr).toMatch(/not valid JSON/);
  });
});
