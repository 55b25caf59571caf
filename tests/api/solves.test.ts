import type { Express } from 'express';
import { sql } from 'drizzle-orm';
import type { Response as SuperResponse } from 'supertest';
import type TestAgent from 'supertest/lib/agent.js';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { solve as solveSchema, solveList, solveSummary, type Solve } from '../../shared/api/solves.js';
import type { FaultTreeModel } from '../../shared/model-file.js';
import { SOLVER_VERSION } from '../../solver/index.js';
import { solves } from '../../server/db/schema/solves.js';
import { startSolverProcess } from '../../server/solves/solver-process.js';
import { startSolving, type Solving } from '../../server/solves/solving.js';
import { createTestApp, signedInAgent } from './helpers/test-app.js';
import { openTestDatabase, resetDatabase, testDatabaseUrl, type TestDatabase } from './helpers/test-database.js';
import { seedWorld, type World } from './helpers/world.js';

type Agent = InstanceType<typeof TestAgent>;

/** Time limit of a solve in these tests: long enough for the small models, short for the hang fault. */
const TIME_LIMIT_MS = 8000;

const LAMBDA_DU = 2.0e-6;
const PROOF_TEST_HOURS = 8760;

/**
 * One invented pressure switch, proof tested every year (perfect test, no repair time), over 10 years.
 * Its exact unavailability is q(t) = 1 - exp(-lambda_DU * (t mod T)), so
 *   PFDavg = 1 - (1 - exp(-lambda_DU T)) / (lambda_DU T)  and  PFDmax = 1 - exp(-lambda_DU T)
 * (average of a periodically tested item: Rausand & Hoyland, System Reliability Theory, 2nd ed., ch. 10,
 * from memory; IEC 61508-6 B.3.2.2.1 gives the first-order form lambda_DU T / 2).
 */
function singleSwitch(name = 'Separator PSH-2101', lambda = LAMBDA_DU): FaultTreeModel {
  return {
    format: 'proofline/model',
    version: 1,
    name,
    kind: 'fault-tree',
    mission: { hours: 10 * PROOF_TEST_HOURS, demand: 'low' },
    events: [{ id: 'PSH-2101', label: 'Pressure switch', lambdaDU: lambda, proofTest: { intervalHours: PROOF_TEST_HOURS } }],
    gates: [{ id: 'TOP', type: 'or', inputs: ['PSH-2101'] }],
    top: 'TOP',
  };
}

let database: TestDatabase;
let solving: Solving;
let app: Express;
let world: World;

beforeAll(async () => {
  database = await openTestDatabase();
  solving = await startSolving({
    connectionString: testDatabaseUrl(),
    db: database.db,
    pool: database.pool,
    logger: database.logger,
    solverVersion: SOLVER_VERSION,
    timeLimitMs: TIME_LIMIT_MS,
    solverThreads: 1,
    allowTestFaults: true,
    heartbeatMs: 500,
    staleAfterMs: 5000,
  });
  app = createTestApp(database, { solving: solving.deps });
});

afterAll(async () => {
  await solving?.stop(2000);
  await database?.close();
});

beforeEach(async () => {
  await resetDatabase(database.db);
  await database.db.execute(sql`truncate table solve_results cascade`);
  world = await seedWorld(database.db);
});

async function createModel(agent: Agent, file: FaultTreeModel): Promise<string> {
  const response = await agent.post(`/api/projects/${world.projectA}/sifs/${world.sifDraft}/models`).send({ file });
  expect(response.status).toBe(201);
  return response.body.id as string;
}

function startDraftSolve(agent: Agent, modelId: string, settings: object = {}, version = 1) {
  return agent.post(`/api/projects/${world.projectA}/models/${modelId}/solves`).send({ source: { kind: 'draft', version }, settings });
}

async function readSolve(agent: Agent, solveId: string): Promise<Solve> {
  const response = await agent.get(`/api/projects/${world.projectA}/solves/${solveId}`);
  expect(response.status).toBe(200);
  return solveSchema.parse(response.body);
}

/** Polls the solve until `done` holds (every 50 ms, up to `withinMs`). */
async function waitFor(agent: Agent, solveId: string, done: (solve: Solve) => boolean, withinMs = 30_000): Promise<Solve> {
  const until = Date.now() + withinMs;
  for (;;) {
    const current = await readSolve(agent, solveId);
    if (done(current)) return current;
    if (Date.now() > until) throw new Error(`solve ${solveId} still ${current.status} after ${withinMs} ms`);
    await new Promise((resolve) => setTimeout(resolve, 50));
  }
}

const finished = (solve: Solve) => ['succeeded', 'failed', 'cancelled'].includes(solve.status);

interface StreamEvent {
  readonly event: string;
  readonly data: unknown;
}

/** Reads a whole event stream (the server ends it after the `done` event). */
async function readEvents(agent: Agent, solveId: string): Promise<{ response: SuperResponse; events: StreamEvent[] }> {
  const response = await agent
    .get(`/api/projects/${world.projectA}/solves/${solveId}/events`)
    .buffer(true)
    .parse((res, callback) => {
      let text = '';
      res.setEncoding('utf8');
      res.on('data', (chunk: string) => (text += chunk));
      res.on('end', () => callback(null, text));
    });
  const events = String(response.body)
    .split('\n\n')
    .filter((block) => block.startsWith('event: '))
    .map((block) => {
      const [eventLine, dataLine] = block.split('\n');
      return { event: eventLine!.slice('event: '.length), data: JSON.parse(dataLine!.slice('data: '.length)) };
    });
  return { response, events };
}

describe('solves: running', () => {
  it('solves a draft in a worker and stores the exact result', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const modelId = await createModel(engineer, singleSwitch());
    const started = await startDraftSolve(engineer, modelId);
    expect(started.status).toBe(202);
    expect(solveSchema.parse(started.body)).toMatchObject({ status: 'queued', cached: false, draftVersion: 1, revisionNumber: null });

    const done = await waitFor(engineer, started.body.id, finished);
    expect(done, done.error ?? '').toMatchObject({ status: 'succeeded' });
    const result = done.result!;
    const lambdaT = LAMBDA_DU * PROOF_TEST_HOURS;
    const expectedAverage = 1 - (1 - Math.exp(-lambdaT)) / lambdaT;
    // Closed form above; relative tolerance 1e-4 (the engine's numerical error is far below it).
    expect(Math.abs(result.pfdAvg - expectedAverage) / expectedAverage).toBeLessThan(1e-4);
    expect(Math.abs(result.pfdMax - (1 - Math.exp(-lambdaT))) / (1 - Math.exp(-lambdaT))).toBeLessThan(1e-4);
    expect(result.solverVersion).toBe(SOLVER_VERSION);
    expect(done).toMatchObject({ progress: 1, solverVersion: SOLVER_VERSION, error: null });
    expect(done.startedAt).not.toBeNull();
    const [row] = await database.db.select({ workerName: solves.workerName }).from(solves).where(sql`${solves.id} = ${done.id}`);
    expect(row?.workerName).toBe(solving.solver!.name);
  });

  it('shares the queue with another solver process on the same database', async () => {
    const second = await startSolverProcess({
      db: database.db,
      pool: database.pool,
      connectionString: testDatabaseUrl(),
      threads: 1,
      timeLimitMs: TIME_LIMIT_MS,
      allowTestFaults: true,
      heartbeatMs: 500,
      staleAfterMs: 5000,
      log: (message, error) => database.logger.error(message, error),
    });
    try {
      const engineer = await signedInAgent(app, 'engineer');
      const first = await startDraftSolve(engineer, await createModel(engineer, singleSwitch('test-fault:slow:1500')));
      const other = await startDraftSolve(engineer, await createModel(engineer, singleSwitch('test-fault:slow:1500 (second)')));
      const [a, b] = await Promise.all([waitFor(engineer, first.body.id, finished, 30_000), waitFor(engineer, other.body.id, finished, 30_000)]);
      expect([a, b].map((solve) => `${solve.status}: ${solve.error}`)).toEqual(['succeeded: null', 'succeeded: null']);
      const rows = await database.db.select({ workerName: solves.workerName }).from(solves);
      expect(new Set(rows.map((row) => row.workerName))).toEqual(new Set([solving.solver!.name, second.name]));
      // Each process holds one job at a time, so the two ran side by side: both started before either ended.
      expect(Math.max(Date.parse(a.startedAt!), Date.parse(b.startedAt!))).toBeLessThan(Math.min(Date.parse(a.finishedAt!), Date.parse(b.finishedAt!)));
    } finally {
      await second.stop(2000);
    }
  });

  it('streams status, rising progress and the result as server-sent events', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const modelId = await createModel(engineer, singleSwitch('test-fault:slow:2000'));
    const started = await startDraftSolve(engineer, modelId);
    const viewer = await signedInAgent(app, 'viewer');
    const { response, events } = await readEvents(viewer, started.body.id);
    expect(response.status).toBe(200);
    expect(response.headers['content-type']).toContain('text/event-stream');
    expect(events[0]!.event).toBe('status');
    expect(solveSummary.parse(events[0]!.data).status).toMatch(/queued|running/);
    const progress = events.filter((item) => item.event === 'progress').map((item) => (item.data as { progress: number }).progress);
    expect(progress.length).toBeGreaterThanOrEqual(5);
    for (let index = 1; index < progress.length; index++) expect(progress[index]!).toBeGreaterThanOrEqual(progress[index - 1]!);
    const statuses = events.filter((item) => item.event === 'status').map((item) => (item.data as { status: string }).status);
    expect(statuses).toContain('running');
    const last = events.at(-1)!;
    expect(last.event).toBe('done');
    const done = solveSchema.parse(last.data);
    expect(done.status).toBe('succeeded');
    expect(done.result!.pfdAvg).toBeGreaterThan(0);
  });

  it('streams a finished solve as its status and result at once', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const modelId = await createModel(engineer, singleSwitch());
    const started = await startDraftSolve(engineer, modelId);
    await waitFor(engineer, started.body.id, finished);
    const { events } = await readEvents(engineer, started.body.id);
    expect(events.map((item) => item.event)).toEqual(['status', 'done']);
  });
});

describe('solves: cancel, time limit, crashes', () => {
  it('cancels a running solve, and the pool goes on solving', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const slowId = await createModel(engineer, singleSwitch('test-fault:slow:30000'));
    const started = await startDraftSolve(engineer, slowId);
    await waitFor(engineer, started.body.id, (solve) => solve.status === 'running');
    const cancelAt = Date.now();
    const cancel = await engineer.post(`/api/projects/${world.projectA}/solves/${started.body.id}/cancel`);
    expect(cancel.status).toBe(200);
    expect(cancel.body.cancelRequested).toBe(true);
    const cancelled = await waitFor(engineer, started.body.id, finished, 10_000);
    expect(cancelled.status).toBe('cancelled');
    // The slow fault would run 30 s; a stop well before that is the cancel (bound loose for busy machines).
    expect(Date.now() - cancelAt).toBeLessThan(10_000);
    const again = await engineer.post(`/api/projects/${world.projectA}/solves/${started.body.id}/cancel`);
    expect(again.status).toBe(409);

    const next = await startDraftSolve(engineer, await createModel(engineer, singleSwitch('After the cancel')));
    expect((await waitFor(engineer, next.body.id, finished)).status).toBe('succeeded');
  });

  it('cancels a queued solve before any worker takes it', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const busy = await startDraftSolve(engineer, await createModel(engineer, singleSwitch('test-fault:slow:30000')));
    await waitFor(engineer, busy.body.id, (solve) => solve.status === 'running');
    const waiting = await startDraftSolve(engineer, await createModel(engineer, singleSwitch('Waits behind the slow one')));
    expect(waiting.body.status).toBe('queued');
    const cancel = await engineer.post(`/api/projects/${world.projectA}/solves/${waiting.body.id}/cancel`);
    expect(cancel.status).toBe(200);
    expect(cancel.body.status).toBe('cancelled');
    expect(cancel.body.startedAt).toBeNull();
    await engineer.post(`/api/projects/${world.projectA}/solves/${busy.body.id}/cancel`).expect(200);
    expect((await waitFor(engineer, busy.body.id, finished)).status).toBe('cancelled');
    expect((await readSolve(engineer, waiting.body.id)).startedAt).toBeNull();
  });

  it('stops a solve past its time limit with a clear message', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const started = await startDraftSolve(engineer, await createModel(engineer, singleSwitch('test-fault:hang')));
    const failed = await waitFor(engineer, started.body.id, finished, TIME_LIMIT_MS + 10_000);
    expect(failed.status).toBe('failed');
    expect(failed.error).toBe('stopped: the solve ran past its time limit of 8 s (SOLVE_TIME_LIMIT_SECONDS)');
    const ran = new Date(failed.finishedAt!).getTime() - new Date(failed.startedAt!).getTime();
    expect(ran).toBeGreaterThanOrEqual(TIME_LIMIT_MS - 50);
    // Upper bound generous: a worker thread replaced by the previous test may take seconds to start on a busy machine.
    expect(ran).toBeLessThan(TIME_LIMIT_MS + 10_000);
  });

  it('marks the job of a crashed worker failed, replaces the worker and keeps serving', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const started = await startDraftSolve(engineer, await createModel(engineer, singleSwitch('test-fault:exit')));
    const failed = await waitFor(engineer, started.body.id, finished);
    expect(failed.status).toBe('failed');
    expect(failed.error).toBe('the solver worker stopped unexpectedly (exit code 3); it was replaced and this solve did not finish');
    expect((await engineer.get('/api/auth/me')).status).toBe(200);
    const next = await startDraftSolve(engineer, await createModel(engineer, singleSwitch('After the crash')));
    const after = await waitFor(engineer, next.body.id, finished);
    expect(after, after.error ?? '').toMatchObject({ status: 'succeeded' });
  });

  it('reports an error thrown in the worker as the reason', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const started = await startDraftSolve(engineer, await createModel(engineer, singleSwitch('test-fault:throw')));
    const failed = await waitFor(engineer, started.body.id, finished);
    expect(failed).toMatchObject({ status: 'failed', error: 'the solver failed: test fault: the solver threw on purpose', result: null });
  });

  it('fails a running solve whose solver process stopped sending heartbeats', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const modelId = await createModel(engineer, singleSwitch());
    const [orphan] = await database.db
      .insert(solves)
      .values({
        projectId: world.projectA,
        modelId,
        draftVersion: 1,
        model: singleSwitch(),
        contentHash: 'orphan',
        solverVersion: SOLVER_VERSION,
        settings: { method: 'exact', timePoints: 1000 },
        status: 'running',
        requestedById: world.userId.engineer,
        startedAt: new Date(Date.now() - 60_000),
        heartbeatAt: new Date(Date.now() - 60_000),
        workerName: 'a-machine-that-died:1',
      })
      .returning();
    const failed = await waitFor(engineer, orphan!.id, finished, 15_000);
    expect(failed.status).toBe('failed');
    expect(failed.error).toContain('no heartbeat');
  });
});

describe('solves: stored results', () => {
  it('answers the same content, solver version and settings from the stored result at once', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const modelId = await createModel(engineer, singleSwitch());
    const first = await waitFor(engineer, (await startDraftSolve(engineer, modelId)).body.id, finished);
    expect(first.status).toBe('succeeded');

    const again = await startDraftSolve(engineer, modelId);
    expect(again.status).toBe(200);
    const cached = solveSchema.parse(again.body);
    expect(cached).toMatchObject({ status: 'succeeded', cached: true, progress: 1 });
    expect(cached.result).toEqual(first.result);

    // The same content in another model (another name and layout do not count) hits the store too.
    const twin = await createModel(engineer, { ...singleSwitch(), layout: { 'PSH-2101': { x: 1, y: 2 } } });
    expect((await startDraftSolve(engineer, twin)).status).toBe(200);

    // Key order is not content: the same file written with its keys reversed hits the store as well.
    const reversed = JSON.parse(JSON.stringify(singleSwitch(), (_key, value: unknown) =>
      value && typeof value === 'object' && !Array.isArray(value) ? Object.fromEntries(Object.entries(value).reverse()) : value,
    )) as FaultTreeModel;
    expect(Object.keys(reversed)[0]).toBe('top');
    expect((await startDraftSolve(engineer, await createModel(engineer, reversed))).status).toBe(200);

    const otherSettings = await startDraftSolve(engineer, modelId, { timePoints: 500 });
    expect(otherSettings.status).toBe(202);
    const otherRate = await startDraftSolve(engineer, await createModel(engineer, singleSwitch('Separator PSH-2101', 3e-6)));
    expect(otherRate.status).toBe(202);
    await waitFor(engineer, otherSettings.body.id, finished);
    await waitFor(engineer, otherRate.body.id, finished);
  });

  it('solves a revision and shows its result to a reviewer of that revision', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const modelId = await createModel(engineer, singleSwitch());
    await engineer.post(`/api/projects/${world.projectA}/models/${modelId}/revisions`).send({ draftVersion: 1, reason: 'For review' }).expect(201);
    const started = await engineer.post(`/api/projects/${world.projectA}/models/${modelId}/solves`).send({ source: { kind: 'revision', number: 1 } });
    expect(started.status).toBe(202);
    expect(started.body).toMatchObject({ revisionNumber: 1, draftVersion: null });
    await waitFor(engineer, started.body.id, finished);
    await engineer.put(`/api/projects/${world.projectA}/models/${modelId}/draft`).send({ version: 1, content: singleSwitch('Edited after review', 5e-6) }).expect(200);
    const draftSolve = await startDraftSolve(engineer, modelId, {}, 2);
    expect(draftSolve.status).toBe(202);

    const reviewer = await signedInAgent(app, 'reviewer');
    const list = solveList.parse((await reviewer.get(`/api/projects/${world.projectA}/models/${modelId}/solves?revision=1&status=succeeded`)).body);
    expect(list.map((item) => item.id)).toEqual([started.body.id]);
    const read = await readSolve(reviewer, list[0]!.id);
    expect(read.result!.pfdAvg).toBeGreaterThan(0);
    await waitFor(engineer, draftSolve.body.id, finished);
  });
});

describe('solves: engines', () => {
  it('solves a state model exactly', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const missionHours = 10 * PROOF_TEST_HOURS;
    const response = await engineer.post(`/api/projects/${world.projectA}/sifs/${world.sifDraft}/models`).send({
      file: {
        format: 'proofline/model',
        version: 1,
        name: 'Untested relay',
        kind: 'markov',
        mission: { hours: missionHours, demand: 'low' },
        states: [{ id: 'OK', initial: 1 }, { id: 'FAILED', down: true }],
        transitions: [{ from: 'OK', to: 'FAILED', rate: LAMBDA_DU }],
      },
    });
    expect(response.status).toBe(201);
    const done = await waitFor(engineer, (await startDraftSolve(engineer, response.body.id)).body.id, finished);
    expect(done, done.error ?? '').toMatchObject({ status: 'succeeded' });
    // Never tested, never repaired: PFD(t) = 1 - exp(-lambda t), so PFDavg = 1 - (1 - exp(-lambda T)) / (lambda T)
    // over the mission T (exact closed form of the two-state chain); relative tolerance 1e-4.
    const lambdaT = LAMBDA_DU * missionHours;
    const expected = 1 - (1 - Math.exp(-lambdaT)) / lambdaT;
    expect(done.result!.method).toBe('markov');
    expect(Math.abs(done.result!.pfdAvg - expected) / expected).toBeLessThan(1e-4);
  });

  it('runs the Monte Carlo check with its seed as part of the stored key', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const modelId = await createModel(engineer, singleSwitch());
    const settings = { method: 'montecarlo', samples: 20_000, seed: 7 };
    const started = await startDraftSolve(engineer, modelId, settings);
    expect(started.status).toBe(202);
    expect(started.body.settings).toEqual({ method: 'montecarlo', timePoints: 1000, samples: 20_000, seed: 7 });
    const done = await waitFor(engineer, started.body.id, finished, 30_000);
    expect(done, done.error ?? '').toMatchObject({ status: 'succeeded' });
    const lambdaT = LAMBDA_DU * PROOF_TEST_HOURS;
    const exact = 1 - (1 - Math.exp(-lambdaT)) / lambdaT;
    // The simulated PFDavg is a seeded estimate; its own interval must hold the closed form above.
    const interval = done.result!.interval!.pfdAvg;
    expect(interval.lower).toBeLessThanOrEqual(exact);
    expect(interval.upper).toBeGreaterThanOrEqual(exact);
    expect((await startDraftSolve(engineer, modelId, settings)).status).toBe(200);
    const otherSeed = await startDraftSolve(engineer, modelId, { ...settings, seed: 8 });
    expect(otherSeed.status).toBe(202);
    await waitFor(engineer, otherSeed.body.id, finished, 30_000);
  });
});

describe('solves: input and roles', () => {
  it('refuses a stale draft version with the stored draft, and bad settings by name', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const modelId = await createModel(engineer, singleSwitch());
    await engineer.put(`/api/projects/${world.projectA}/models/${modelId}/draft`).send({ version: 1, content: singleSwitch('Newer') }).expect(200);
    const stale = await startDraftSolve(engineer, modelId, {}, 1);
    expect(stale.status).toBe(409);
    expect(stale.body.error.details.current.version).toBe(2);
    const bad = await startDraftSolve(engineer, modelId, { timePoints: 3 }, 2);
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.issues).toContainEqual({ path: 'settings.timePoints', message: 'must be 10 or more' });
    const missingRevision = await engineer.post(`/api/projects/${world.projectA}/models/${modelId}/solves`).send({ source: { kind: 'revision', number: 4 } });
    expect(missingRevision.status).toBe(404);
    const unfinished = { ...singleSwitch(), top: 'NOWHERE' };
    await engineer.put(`/api/projects/${world.projectA}/models/${modelId}/draft`).send({ version: 2, content: unfinished }).expect(200);
    const invalid = await startDraftSolve(engineer, modelId, {}, 3);
    expect(invalid.status).toBe(400);
    expect(invalid.body.error.details.issues.map((issue: { path: string }) => issue.path)).toContain('draft.top');
  });

  it('lets viewers and reviewers read solves and results but not start or cancel them', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const modelId = await createModel(engineer, singleSwitch());
    const started = await startDraftSolve(engineer, modelId);
    await waitFor(engineer, started.body.id, finished);
    for (const username of ['viewer', 'reviewer']) {
      const agent = await signedInAgent(app, username);
      const start = await startDraftSolve(agent, modelId);
      expect(start.status).toBe(403);
      expect(start.body.error.message).toBe(`as a ${username} of this project you may not start a solve`);
      expect((await agent.post(`/api/projects/${world.projectA}/solves/${started.body.id}/cancel`)).status).toBe(403);
      expect((await readSolve(agent, started.body.id)).result).not.toBeNull();
      expect((await agent.get(`/api/projects/${world.projectA}/models/${modelId}/solves`)).status).toBe(200);
      const { events } = await readEvents(agent, started.body.id);
      expect(events.at(-1)!.event).toBe('done');
    }
    const lead = await signedInAgent(app, 'lead');
    expect((await startDraftSolve(lead, modelId)).status).toBe(200);
    const outsider = await signedInAgent(app, 'outsider');
    expect((await outsider.get(`/api/projects/${world.projectA}/solves/${started.body.id}`)).status).toBe(404);
    expect((await outsider.get(`/api/projects/${world.projectB}/solves/${started.body.id}`)).status).toBe(404);
    expect((await outsider.get(`/api/projects/${world.projectB}/solves/${started.body.id}/events`)).status).toBe(404);
  });
});
