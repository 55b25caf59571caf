import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync } from 'node:fs';
import { createServer } from 'node:net';
import { fileURLToPath } from 'node:url';
import pg from 'pg';
import type { TestProject } from 'vitest/node';

declare module 'vitest' {
  export interface ProvidedContext {
    /** Where the server under test listens, e.g. http://127.0.0.1:41234. */
    baseUrl: string;
  }
}

const ROOT = fileURLToPath(new URL('../..', import.meta.url));
const SERVER_START_TIMEOUT_MS = 90_000;

/**
 * Resets the database named by E2E_DATABASE_URL, starts the real server on it (migrations and the demo
 * seed run at its start) on a free port, and stops it after the run.
 */
export default async function setup(project: TestProject): Promise<() => Promise<void>> {
  const databaseUrl = process.env.E2E_DATABASE_URL;
  if (!databaseUrl) {
    throw new Error(
      'E2E_DATABASE_URL is not set: npm test sets it; by hand run `source scripts/db.sh && db_start proofline_e2e` and ' +
        'E2E_DATABASE_URL="$DB_BASE_URL/proofline_e2e" npx vitest run --config tests/e2e/vitest.e2e.config.ts',
    );
  }
  if (!existsSync(`${ROOT}/dist/proofline/browser/index.html`)) {
    throw new Error('The client is not built: run `npx ng build --configuration production` first (npm test does).');
  }
  await resetDatabase(databaseUrl);
  const port = await freePort();
  const server = startServer(databaseUrl, port);
  const baseUrl = `http://127.0.0.1:${port}`;
  await waitForServer(baseUrl, server);
  project.provide('baseUrl', baseUrl);
  return () => stopServer(server.process);
}

/** Drops every schema the app made (tables, migration journal, queue) and leaves an empty public schema. */
async function resetDatabase(databaseUrl: string): Promise<void> {
  const client = new pg.Client({ connectionString: databaseUrl });
  await client.connect();
  try {
    const { rows } = await client.query<{ name: string }>(
      "select nspname as name from pg_namespace where nspname not like 'pg\\_%' and nspname <> 'information_schema'",
    );
    for (const { name } of rows) await client.query(`drop schema "${name.replaceAll('"', '""')}" cascade`);
    await client.query('create schema public');
  } finally {
    await client.end();
  }
}

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = createServer();
    probe.once('error', reject);
    probe.listen(0, '127.0.0.1', () => {
      const address = probe.address();
      probe.close(() => (typeof address === 'object' && address ? resolve(address.port) : reject(new Error('no port'))));
    });
  });
}

interface RunningServer {
  readonly process: ChildProcess;
  readonly output: string[];
  exited: boolean;
}

function startServer(databaseUrl: string, port: number): RunningServer {
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
    cwd: ROOT,
    env: { ...process.env, DATABASE_URL: databaseUrl, PORT: String(port), HOST: '127.0.0.1', PROOFLINE_SOLVER: 'off' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const running: RunningServer = { process: child, output: [], exited: false };
  child.stdout?.on('data', (chunk: Buffer) => running.output.push(chunk.toString()));
  child.stderr?.on('data', (chunk: Buffer) => running.output.push(chunk.toString()));
  child.once('exit', () => {
    running.exited = true;
  });
  return running;
}

/** Waits until the API answers (GET /api/auth/me: 401 JSON when signed out); fails with the server's output. */
async function waitForServer(baseUrl: string, server: RunningServer): Promise<void> {
  const deadline = Date.now() + SERVER_START_TIMEOUT_MS;
  while (Date.now() < deadline) {
    if (server.exited) throw new Error(`The server exited during start:\n${server.output.join('')}`);
    try {
      const reply = await fetch(`${baseUrl}/api/auth/me`);
      if (reply.status === 401) return;
    } catch {
      // Not listening yet.
    }
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
  await stopServer(server.process);
  throw new Error(`The server did not answer within ${SERVER_START_TIMEOUT_MS / 1000} s:\n${server.output.join('')}`);
}

function stopServer(child: ChildProcess): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return Promise.resolve();
  return new Promise((resolve) => {
    const force = setTimeout(() => child.kill('SIGKILL'), 10_000);
    child.once('exit', () => {
      clearTimeout(force);
      resolve();
    });
    child.kill('SIGTERM');
  });
}
