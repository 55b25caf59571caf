import { spawn, type ChildProcess } from 'node:child_process';
import { createServer } from 'node:net';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { FaultTreeModel } from '../../shared/model-file.js';
import { testDatabaseUrl } from '../api/helpers/test-database.js';

// Restarting the server mid-save and mid-solve (issue 10): the real server (server/main.ts) runs as a child
// process on its own database and is killed with SIGKILL, as a crash or power cut would. No model data may
// be lost, and a solve that was queued or running is finished after the restart or reported failed.

const ROOT = new URL('../..', import.meta.url).pathname;
const ENGINEER = { username: 'engineer', password: 'proofline-engineer' };

/** An invented 1oo2 pair of temperature switches on a fictional reboiler (rates per hour, times in hours). */
function reboilerPair(name: string): FaultTreeModel {
  return {
    format: 'proofline/model',
    version: 1,
    name,
    kind: 'fault-tree',
    mission: { hours: 87_600, demand: 'low' },
    events: [
      { id: 'TSH-A', label: 'Temperature switch A', lambdaDU: 4.0e-7, proofTest: { intervalHours: 8760 } },
      { id: 'TSH-B', label: 'Temperature switch B', lambdaDU: 4.0e-7, proofTest: { intervalHours: 8760 } },
    ],
    gates: [{ id: 'TOP', label: 'Both switches fail', type: 'and', inputs: ['TSH-A', 'TSH-B'] }],
    top: 'TOP',
    layout: {},
  };
}

let databaseUrl: string;
let server: ChildProcess | null = null;
let baseUrl = '';
let cookie = '';

async function freshDatabase(): Promise<string> {
  const url = new URL(testDatabaseUrl());
  const name = `${url.pathname.slice(1)}_restart`;
  const admin = new pg.Client({ connectionString: url.toString() });
  await admin.connect();
  await admin.query(`drop database if exists "${name}" with (force)`);
  await admin.query(`create database "${name}"`);
  await admin.end();
  url.pathname = `/${name}`;
  return url.toString();
}

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = createServer();
    probe.once('error', reject);
    probe.listen(0, '127.0.0.1', () => {
      const { port } = probe.address() as { port: number };
      probe.close(() => resolve(port));
    });
  });
}

async function startServer(solver: boolean): Promise<void> {
  const port = await freePort();
  const output: string[] = [];
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
    cwd: ROOT,
    env: { ...process.env, DATABASE_URL: databaseUrl, PORT: String(port), HOST: '127.0.0.1', PROOFLINE_SOLVER: solver ? 'on' : 'off', SOLVER_THREADS: '1', PROOFLINE_CLIENT_DIR: '/nonexistent' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout?.on('data', (chunk: Buffer) => output.push(chunk.toString()));
  child.stderr?.on('data', (chunk: Buffer) => output.push(chunk.toString()));
  server = child;
  baseUrl = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 60_000;
  while (Date.now() < deadline) {
    if (child.exitCode !== null) throw new Error(`the server exited during start:\n${output.join('')}`);
    if ((await fetch(`${baseUrl}/api/auth/me`).catch(() => null))?.status === 401) return;
    await new Promise((resolve) => setTimeout(resolve, 200));
  }
  throw new Error(`the server did not answer within 60 s:\n${output.join('')}`);
}

async function killServer(): Promise<void> {
  const child = server;
  server = null;
  if (!child || child.exitCode !== null) return;
  const exited = new Promise((resolve) => child.once('exit', resolve));
  child.kill('SIGKILL');
  await exited;
}

async function api(method: string, path: string, body?: unknown): Promise<{ status: number; body: any }> {
  const response = await fetch(`${baseUrl}${path}`, {
    method,
    headers: { 'Content-Type': 'application/json', ...(cookie ? { Cookie: cookie } : {}) },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const setCookie = response.headers.get('set-cookie');
  if (setCookie) cookie = setCookie.split(';')[0]!;
  const text = await response.text();
  return { status: response.status, body: text ? JSON.parse(text) : null };
}

async function solveStatus(projectId: string, solveId: string, until: readonly string[], timeoutMs: number): Promise<{ status: string; error: string | null }> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const { body } = await api('GET', `/api/projects/${projectId}/solves/${solveId}`);
    if (until.includes(body.status) || Date.now() > deadline) return body;
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
}

beforeAll(async () => {
  databaseUrl = await freshDatabase();
}, 120_000);

afterAll(async () => {
  await killServer();
});

describe('a server killed mid-way', () => {
  it('loses no saved draft, and finishes the solve it had queued, after a restart', async () => {
    await startServer(false);
    expect((await api('POST', '/api/auth/sign-in', ENGINEER)).status).toBe(200);
    const [project] = (await api('GET', '/api/projects')).body;
    const sif = (await api('GET', `/api/projects/${project.id}/sifs`)).body.items[0];
    const created = await api('POST', `/api/projects/${project.id}/sifs/${sif.id}/models`, { file: reboilerPair('Reboiler before the crash') });
    expect(created.status).toBe(201);
    const modelPath = `/api/projects/${project.id}/models/${created.body.id}`;
    const saved = await api('PUT', `${modelPath}/draft`, { version: 1, content: reboilerPair('Reboiler saved') });
    expect(saved.status).toBe(200);
    // No solver process runs yet, so the solve stays queued in the database.
    const queued = await api('POST', `${modelPath}/solves`, { source: { kind: 'draft', version: saved.body.version }, settings: { method: 'exact', timePoints: 50 } });
    expect(queued.status).toBe(202);
    // A save in flight when the server dies: either it was stored whole or not at all.
    const inFlight = api('PUT', `${modelPath}/draft`, { version: saved.body.version, content: reboilerPair('Reboiler in flight') }).catch(() => null);
    await killServer();
    await inFlight;

    await startServer(true);
    expect((await api('GET', '/api/auth/me')).status).toBe(200);
    const model = await api('GET', modelPath);
    expect(model.status).toBe(200);
    const name = model.body.draft.content.name;
    expect(['Reboiler saved', 'Reboiler in flight']).toContain(name);
    expect(model.body.draft.content).toEqual(reboilerPair(name));
    const finished = await solveStatus(project.id, queued.body.id, ['succeeded', 'failed', 'cancelled'], 60_000);
    expect(finished.status).toBe('succeeded');
  }, 180_000);

  it('reports a solve that was running when the server died as failed, with the reason', async () => {
    expect((await api('POST', '/api/auth/sign-in', ENGINEER)).status).toBe(200);
    const [project] = (await api('GET', '/api/projects')).body;
    const sif = (await api('GET', `/api/projects/${project.id}/sifs`)).body.items[0];
    const created = await api('POST', `/api/projects/${project.id}/sifs/${sif.id}/models`, { file: reboilerPair('Reboiler long check') });
    const modelPath = `/api/projects/${project.id}/models/${created.body.id}`;
    // A Monte Carlo check with many samples runs long enough to be killed mid-way.
    const started = await api('POST', `${modelPath}/solves`, { source: { kind: 'draft', version: 1 }, settings: { method: 'montecarlo', samples: 10_000_000, timePoints: 20_000, seed: 7 } });
    expect(started.status).toBe(202);
    const running = await solveStatus(project.id, started.body.id, ['running', 'succeeded', 'failed'], 60_000);
    expect(running.status).toBe('running');
    await killServer();

    await startServer(true);
    // The solver process marks a solve without a heartbeat for 30 s as failed (server/solves/solver-process.ts).
    const after = await solveStatus(project.id, started.body.id, ['failed', 'succeeded'], 120_000);
    expect(after.status).toBe('failed');
    expect(after.error).toMatch(/stopped/);
    const model = await api('GET', modelPath);
    expect(model.body.draft.content).toEqual(reboilerPair('Reboiler long check'));
  }, 240_000);
});
