import type { Express } from 'express';
import fc from 'fast-check';
import type TestAgent from 'supertest/lib/agent.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { FaultTreeModel } from '../../shared/model-file.js';
import { SOLVER_VERSION } from '../../solver/index.js';
import { startSolving, type Solving } from '../../server/solves/solving.js';
import { createTestApp, signedInAgent } from './helpers/test-app.js';
import { openTestDatabase, resetDatabase, testDatabaseUrl, type TestDatabase } from './helpers/test-database.js';
import { seedWorld, type World } from './helpers/world.js';

// Robustness (issue 10): malformed model files and bodies posted to the import, draft-save and solve
// routes and as a new model. The rule is ours: a 4xx with a message, or an accepted change, never a 500; the
// server and its solver workers stay up. Seeds are fixed so a failure replays; run counts keep the file well
// under a minute. The device CSV import is fuzzed in fuzz-devices.test.ts.

/** An invented 1oo2 pair of pressure switches on a fictional separator (rates per hour, times in hours). */
const VALID_FILE: FaultTreeModel = {
  format: 'proofline/model',
  version: 1,
  name: 'Separator high pressure, 1oo2 switches',
  kind: 'fault-tree',
  mission: { hours: 87_600, demand: 'low' },
  events: [
    { id: 'PSH-A', label: 'Pressure switch A', lambdaDU: 3.0e-7, proofTest: { intervalHours: 8760 } },
    { id: 'PSH-B', label: 'Pressure switch B', lambdaDU: 3.0e-7, proofTest: { intervalHours: 8760 } },
  ],
  gates: [{ id: 'TOP', label: 'Both switches fail', type: 'and', inputs: ['PSH-A', 'PSH-B'] }],
  top: 'TOP',
  layout: {},
};

let database: TestDatabase;
let solving: Solving;
let app: Express;
let world: World;
let agent: TestAgent;
let modelPath: string;
let draftVersion = 1;

beforeAll(async () => {
  database = await openTestDatabase();
  solving = await startSolving({
    connectionString: testDatabaseUrl(),
    db: database.db,
    pool: database.pool,
    logger: database.logger,
    solverVersion: SOLVER_VERSION,
    timeLimitMs: 8000,
    solverThreads: 1,
  });
  app = createTestApp(database, { solving: solving.deps });
  await resetDatabase(database.db);
  world = await seedWorld(database.db);
  agent = await signedInAgent(app, 'engineer');
  const created = await agent.post(`/api/projects/${world.projectA}/sifs/${world.sifDraft}/models`).send({ file: VALID_FILE });
  expect(created.status).toBe(201);
  modelPath = `/api/projects/${world.projectA}/models/${created.body.id}`;
});

afterAll(async () => {
  await solving?.stop(2000);
  await database?.close();
});

/** A refusal must say what is wrong; an accepted change is fine (nothing the user typed is lost). */
function expectHandled(status: number, body: unknown, accepted: readonly number[]): void {
  if (accepted.includes(status)) return;
  expect(status, JSON.stringify(body).slice(0, 300)).toBeGreaterThanOrEqual(400);
  expect(status, JSON.stringify(body).slice(0, 300)).toBeLessThan(500);
  const message = (body as { error?: { message?: unknown } }).error?.message;
  expect(typeof message === 'string' && message.length > 0, `no message in ${JSON.stringify(body).slice(0, 200)}`).toBe(true);
}

/** Any JSON value, deep enough to reach nested fields, with keys that tempt prototype pollution. */
const anyJson = fc.jsonValue({ maxDepth: 4 });
const trickyKey = fc.constantFrom('__proto__', 'constructor', 'prototype', 'toString', '', 'events', 'gates', 'top', 'kind', 'format');

/** The valid file with one field somewhere replaced, removed or added. */
const mutatedFile = fc
  .tuple(
    fc.constantFrom<(string | number)[]>(
      [], ['format'], ['version'], ['kind'], ['mission'], ['mission', 'hours'], ['mission', 'demand'], ['events'], ['events', 0],
      ['events', 0, 'lambdaDU'], ['events', 0, 'proofTest'], ['events', 0, 'proofTest', 'intervalHours'], ['events', 1, 'id'],
      ['gates'], ['gates', 0, 'type'], ['gates', 0, 'inputs'], ['gates', 0, 'inputs', 0], ['top'], ['layout'],
    ),
    fc.oneof(anyJson, fc.constant(undefined), fc.double(), fc.constantFrom(-1, 0, 1e308, Number.MAX_SAFE_INTEGER, 'TOP', 'PSH-A')),
    fc.option(fc.tuple(trickyKey, anyJson), { nil: undefined }),
  )
  .map(([path, value, extra]) => {
    const file = structuredClone(VALID_FILE) as unknown as Record<string | number, unknown>;
    let parent: Record<string | number, unknown> = file;
    for (const key of path.slice(0, -1)) parent = parent[key] as Record<string | number, unknown>;
    const last = path.at(-1);
    if (last === undefined) return value;
    if (value === undefined) delete parent[last];
    else parent[last] = value;
    if (extra) Object.defineProperty(parent, extra[0], { value: extra[1], enumerable: true, configurable: true, writable: true });
    return file;
  });

const SETTINGS = { numRuns: 400, seed: 10_2026, endOnFailure: true } as const;

describe('malformed input', () => {
  it('import: any body and any broken model file get a 4xx with a message, never a 500', async () => {
    await fc.assert(
      fc.asyncProperty(fc.oneof(anyJson, fc.record({ version: fc.oneof(anyJson, fc.constant(1)), file: fc.oneof(anyJson, mutatedFile) })), async (body) => {
        const response = await sendJson('post', `${modelPath}/import`, body);
        if (response.status === 200) draftVersion = response.body.version;
        expectHandled(response.status, response.body, [200]);
      }),
      SETTINGS,
    );
  }, 60_000);

  it('import as a new model: any body and any broken model file get a 4xx with a message, never a 500', async () => {
    const createPath = `/api/projects/${world.projectA}/sifs/${world.sifDraft}/models`;
    let created = 0;
    await fc.assert(
      fc.asyncProperty(fc.oneof(anyJson, fc.record({ file: fc.oneof(anyJson, mutatedFile) }), fc.record({ file: mutatedFile })), async (body) => {
        const response = await sendJson('post', createPath, body);
        if (response.status === 201) created += 1;
        expectHandled(response.status, response.body, [201]);
      }),
      { ...SETTINGS, numRuns: 300 },
    );
    // Some mutations keep the file valid (a changed label, an extra layout key); they are imported.
    expect(created).toBeGreaterThan(0);
  }, 60_000);

  it('import: raw bytes that are not JSON get a 400 naming the body', async () => {
    await fc.assert(
      fc.asyncProperty(fc.string({ unit: 'binary', maxLength: 400 }).filter((text) => text.trim() !== '' && !isJson(text)), async (text) => {
        const response = await agent.post(`${modelPath}/import`).set('Content-Type', 'application/json').send(text);
        expect(response.status).toBe(400);
        expect(response.body.error.message).toContain('body');
      }),
      { ...SETTINGS, numRuns: 200 },
    );
  }, 60_000);

  it('draft save: any body gets a 4xx with a message or is kept as the draft, never a 500', async () => {
    await fc.assert(
      fc.asyncProperty(fc.oneof(anyJson, fc.record({ version: fc.oneof(anyJson, fc.constant(draftVersion)), content: fc.oneof(anyJson, mutatedFile) })), async (body) => {
        const response = await sendJson('put', `${modelPath}/draft`, body);
        if (response.status === 200) draftVersion = response.body.version;
        expectHandled(response.status, response.body, [200]);
      }),
      SETTINGS,
    );
  }, 60_000);

  it('draft save: raw bytes that are not JSON get a 400 naming the body', async () => {
    await fc.assert(
      fc.asyncProperty(fc.string({ unit: 'binary', maxLength: 200 }).filter((text) => text.trim() !== '' && !isJson(text)), async (text) => {
        const response = await agent.put(`${modelPath}/draft`).set('Content-Type', 'application/json').send(text);
        expect(response.status).toBe(400);
        expect(response.body.error.message).toContain('body');
      }),
      { ...SETTINGS, numRuns: 300 },
    );
  }, 60_000);

  it('solve: any body gets a 4xx with a message, and a broken saved draft is refused before it is queued', async () => {
    await fc.assert(
      fc.asyncProperty(fc.oneof(anyJson, fc.record({ source: fc.oneof(anyJson, fc.record({ kind: fc.constantFrom('draft', 'revision', 'x'), version: anyJson })), settings: anyJson })), async (body) => {
        const response = await sendJson('post', `${modelPath}/solves`, body);
        expectHandled(response.status, response.body, [200, 202]);
      }),
      SETTINGS,
    );
    await fc.assert(
      fc.asyncProperty(mutatedFile, async (content) => {
        const saved = await agent.put(`${modelPath}/draft`).send({ version: draftVersion, content });
        if (saved.status !== 200) {
          expectHandled(saved.status, saved.body, []);
          return;
        }
        draftVersion = saved.body.version;
        const response = await agent.post(`${modelPath}/solves`).send({ source: { kind: 'draft', version: draftVersion } });
        expectHandled(response.status, response.body, [200, 202]);
      }),
      { ...SETTINGS, numRuns: 150 },
    );
  }, 60_000);

  it('the server and its solver workers are still up afterwards: a valid model still solves', async () => {
    const saved = await agent.put(`${modelPath}/draft`).send({ version: draftVersion, content: VALID_FILE });
    expect(saved.status).toBe(200);
    const started = await agent.post(`${modelPath}/solves`).send({ source: { kind: 'draft', version: saved.body.version }, settings: { method: 'exact', timePoints: 50 } });
    expect([200, 202]).toContain(started.status);
    const deadline = Date.now() + 30_000;
    let status = started.body.status as string;
    while (!['succeeded', 'failed', 'cancelled'].includes(status) && Date.now() < deadline) {
      await new Promise((resolve) => setTimeout(resolve, 200));
      status = (await agent.get(`/api/projects/${world.projectA}/solves/${started.body.id}`)).body.status;
    }
    expect(status).toBe('succeeded');
    expect((await agent.get('/api/health')).status).toBe(200);
  }, 60_000);
});

/** Any JSON value as the body, also a bare number, string or null, which supertest would not send itself. */
function sendJson(method: 'post' | 'put', path: string, body: unknown) {
  return agent[method](path).set('Content-Type', 'application/json').send(JSON.stringify(body) ?? 'null');
}

function isJson(text: string): boolean {
  try {
    JSON.parse(text);
    return true;
  } catch {
    return false;
  }
}
