import type { Express } from 'express';
import pg from 'pg';
import request from 'supertest';
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { POOL_APPLICATION_NAME } from '../../server/db/client.js';
import { createTestApp, signedInAgent } from './helpers/test-app.js';
import { openTestDatabase, resetDatabase, testDatabaseUrl, type TestDatabase } from './helpers/test-database.js';
import { TcpProxy } from './helpers/tcp-proxy.js';
import { seedWorld } from './helpers/world.js';

// The server must keep running through a PostgreSQL restart: requests fail with 503 while the database is
// gone and work again afterwards, with the same sessions.

/** Calls `attempt` until it answers 200 (at most `seconds`); returns every status seen on the way. */
async function untilOk(attempt: () => Promise<request.Response>, seconds = 30): Promise<number[]> {
  const seen: number[] = [];
  const deadline = Date.now() + seconds * 1000;
  while (Date.now() < deadline) {
    const response = await attempt();
    seen.push(response.status);
    if (response.status === 200) return seen;
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
  return seen;
}

let setup: TestDatabase;

beforeAll(async () => {
  setup = await openTestDatabase();
});
afterAll(async () => setup.close());
beforeEach(async () => {
  await resetDatabase(setup.db);
  await seedWorld(setup.db);
});

describe('connections killed with pg_terminate_backend', () => {
  let database: TestDatabase;
  let app: Express;

  beforeEach(async () => {
    database = await openTestDatabase();
    app = createTestApp(database);
  });
  afterEach(async () => database.close());

  it('recovers on the next requests, answering 503 (never 500) in between', async () => {
    const lead = await signedInAgent(app, 'lead');
    await Promise.all([lead.get('/api/projects'), lead.get('/api/users'), lead.get('/api/auth/me')]);
    expect(database.pool.totalCount).toBeGreaterThan(0);

    const admin = new pg.Client({ connectionString: testDatabaseUrl(), application_name: 'proofline-test-admin' });
    await admin.connect();
    try {
      const killed = await admin.query(
        'select pg_terminate_backend(pid) from pg_stat_activity where datname = current_database() and application_name = $1 and pid <> pg_backend_pid()',
        [POOL_APPLICATION_NAME],
      );
      expect(killed.rowCount).toBeGreaterThan(0);
    } finally {
      await admin.end();
    }

    const statuses = await untilOk(() => lead.get('/api/projects'));
    expect(statuses.at(-1)).toBe(200);
    expect(statuses.filter((status) => status !== 200 && status !== 503)).toEqual([]);
    expect((await lead.get('/api/projects')).body.map((project: { name: string }) => project.name)).toEqual(['Project A']);
    expect(database.logger.lines.some((line) => line.includes('database connection lost'))).toBe(true);
  });
});

describe('database unreachable, then back', () => {
  let proxy: TcpProxy;
  let database: TestDatabase;
  let app: Express;

  beforeEach(async () => {
    const url = new URL(testDatabaseUrl());
    proxy = new TcpProxy(url.hostname, Number(url.port || 5432));
    url.port = String(await proxy.start());
    database = await openTestDatabase(url.toString());
    app = createTestApp(database);
  });
  afterEach(async () => {
    await proxy.stop();
    await database.close();
  });

  it('answers 503 while down, then serves the same session again', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    expect((await engineer.get('/api/auth/me')).status).toBe(200);

    await proxy.stop();
    const whileDown = await engineer.get('/api/auth/me');
    expect(whileDown.status).toBe(503);
    expect(whileDown.body.error.code).toBe('service_unavailable');
    expect((await request(app).get('/api/health')).status).toBe(503);
    const signIn = await request(app).post('/api/auth/sign-in').send({ username: 'lead', password: 'lead-password-1' });
    expect(signIn.status).toBe(503);

    await proxy.start();
    const statuses = await untilOk(() => engineer.get('/api/auth/me'));
    expect(statuses.at(-1)).toBe(200);
    expect((await engineer.get('/api/auth/me')).body.username).toBe('engineer');
    expect((await request(app).get('/api/health')).status).toBe(200);
  });
});
