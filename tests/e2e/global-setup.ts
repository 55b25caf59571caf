import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync } from 'node:fs';
import { createServer as createHttpServer } from 'node:http';
import { createServer } from 'node:net';
import { fileURLToPath } from 'node:url';
import pg from 'pg';
import type { TestProject } from 'vitest/node';
import { startSmtpFake } from '../../server/mail/smtp-fake.js';

declare module 'vitest' {
  export interface ProvidedContext {
    /** Where the server under test listens, e.g. http://127.0.0.1:41234. */
    baseUrl: string;
    /** GET answers what the test's SMTP server received, as ReceivedMail[] (server/mail/smtp-fake.ts). */
    mailInboxUrl: string;
    /** The domain of users' addresses in the server under test (username@domain). */
    mailDomain: string;
  }
}

/** Users' addresses in the server under test: not the default, so the tests see the configuration taken. */
const MAIL_DOMAIN = 'brackwater-point.test';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));
const SERVER_START_TIMEOUT_MS = 90_000;

/**
 * Resets the database named by E2E_DATABASE_URL, starts the real server on it (migrations and the demo
 * seed run at its start) on a free port with its mail going to the test's SMTP server, and stops both after the run.
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
  const mail = await startMailbox();
  const port = await freePort();
  const server = startServer(databaseUrl, port, mail.smtpPort);
  const baseUrl = `http://127.0.0.1:${port}`;
  try {
    await waitForServer(baseUrl, server);
  } catch (error) {
    await mail.close();
    throw error;
  }
  project.provide('baseUrl', baseUrl);
  project.provide('mailInboxUrl', mail.inboxUrl);
  project.provide('mailDomain', MAIL_DOMAIN);
  return async () => {
    await stopServer(server.process);
    await mail.close();
  };
}

/**
 * The test's own SMTP server, which the app reaches as its configured real host (SMTP_HOST/SMTP_PORT), so the
 * notices travel the production path through nodemailer. It runs here, in the runner's process; the test
 * files run in workers, so they read what it received over a small local HTTP endpoint.
 */
async function startMailbox(): Promise<{ smtpPort: number; inboxUrl: string; close(): Promise<void> }> {
  const smtp = await startSmtpFake(0);
  const inbox = createHttpServer((_request, response) => {
    response.writeHead(200, { 'content-type': 'application/json' });
    response.end(JSON.stringify(smtp.received));
  });
  await new Promise<void>((resolve, reject) => {
    inbox.once('error', reject);
    inbox.listen(0, '127.0.0.1', () => resolve());
  });
  const address = inbox.address();
  if (typeof address !== 'object' || !address) throw new Error('the mail inbox endpoint has no port');
  return {
    smtpPort: smtp.port,
    inboxUrl: `http://127.0.0.1:${address.port}/`,
    close: async () => {
      await new Promise<void>((resolve) => inbox.close(() => resolve()));
      await smtp.close();
    },
  };
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

function startServer(databaseUrl: string, port: number, smtpPort: number): RunningServer {
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    DATABASE_URL: databaseUrl,
    PORT: String(port),
    HOST: '127.0.0.1',
    PROOFLINE_SOLVER: 'off',
    SMTP_HOST: '127.0.0.1',
    SMTP_PORT: String(smtpPort),
    SMTP_SECURE: 'false',
    MAIL_DOMAIN,
  };
  // The test's SMTP server takes mail without signing in.
  delete env.SMTP_USER;
  delete env.SMTP_PASSWORD;
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
    cwd: ROOT,
    env,
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
