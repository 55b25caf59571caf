import type { Express } from 'express';
import { sql } from 'drizzle-orm';
import type TestAgent from 'supertest/lib/agent.js';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { resultAnalysis } from '../../shared/api/results.js';
import { solve as solveSchema, type Solve } from '../../shared/api/solves.js';
import type { FaultTreeModel } from '../../shared/model-file.js';
import { DEMO_MODEL } from '../../server/seed/demo-model.js';
import { annotations } from '../../server/db/schema/reviews.js';
import { startSolving, type Solving } from '../../server/solves/solving.js';
import { SOLVER_VERSION } from '../../solver/index.js';
import { createTestApp, signedInAgent } from './helpers/test-app.js';
import { pdfText } from './helpers/pdf-text.js';
import { openTestDatabase, resetDatabase, testDatabaseUrl, type TestDatabase } from './helpers/test-database.js';
import { seedWorld, type World } from './helpers/world.js';

type Agent = InstanceType<typeof TestAgent>;

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
    timeLimitMs: 20_000,
    solverThreads: 1,
    allowTestFaults: false,
    heartbeatMs: 200,
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

/** The demo model with one label a spreadsheet would run as a formula. */
const MODEL: FaultTreeModel = {
  ...DEMO_MODEL,
  events: DEMO_MODEL.events.map((event) => (event.id === 'LS-110' ? { ...event, label: '=HYPERLINK("http://example.invalid","x")' } : event)),
};

async function solvedModel(engineer: Agent): Promise<Solve> {
  const created = await engineer.post(`/api/projects/${world.projectA}/sifs/${world.sifDraft}/models`).send({ file: MODEL });
  expect(created.status).toBe(201);
  return solvedDraft(engineer, created.body.id, { timePoints: 2000 });
}

async function solvedDraft(engineer: Agent, modelId: string, settings: Record<string, unknown>): Promise<Solve> {
  const started = await engineer.post(`/api/projects/${world.projectA}/models/${modelId}/solves`).send({ source: { kind: 'draft', version: 1 }, settings });
  expect([200, 202]).toContain(started.status);
  const until = Date.now() + 30_000;
  for (;;) {
    const current = solveSchema.parse((await engineer.get(`/api/projects/${world.projectA}/solves/${started.body.id}`)).body);
    if (current.status === 'succeeded') return current;
    if (current.status === 'failed' || current.status === 'cancelled' || Date.now() > until) throw new Error(`solve ended ${current.status}: ${current.error}`);
    await new Promise((resolve) => setTimeout(resolve, 50));
  }
}

function base(solveId: string) {
  return `/api/projects/${world.projectA}/solves/${solveId}`;
}

describe('results routes', () => {
  it('a viewer reads the analysis: constraints per subsystem, the SIL claim with its limits, spurious trips', async () => {
    const solved = await solvedModel(await signedInAgent(app, 'engineer'));
    const viewer = await signedInAgent(app, 'viewer');
    const response = await viewer.get(`${base(solved.id)}/analysis`);
    expect(response.status).toBe(200);
    const analysis = resultAnalysis.parse(response.body);
    // HFT: 2oo3 tolerates 1, a single logic solver 0, 1oo2 valves 1 (IEC 61508-2:2010 7.4.4.1.1).
    expect(analysis.constraints?.map((row) => [row.id, row.hft])).toEqual([
      ['SENSORS', 1],
      ['LS-110', 0],
      ['VALVES', 1],
    ]);
    // Probability: PFDavg in [1e-3, 1e-2) is SIL 2 (IEC 61508-1:2010 Table 2); Route 1H of the valves
    // (type A, SFF 33 %, HFT 1) allows SIL 2 (IEC 61508-2:2010 Table 2): the claim is SIL 2.
    expect(solved.result?.sil).toBe(2);
    expect(analysis.claim.sil).toBe(2);
    expect(analysis.claim.limits.find((limit) => limit.rule === 'iec61508-route-1h' && limit.subsystem === 'VALVES')?.sil).toBe(2);
    expect(analysis.spuriousTrip?.ratePerHour).toBeGreaterThan(0);
    expect(analysis.model).toEqual(MODEL);
  });

  it('a reviewer downloads the verification PDF with the SIF, the results, the constraints and the caution', async () => {
    const solved = await solvedModel(await signedInAgent(app, 'engineer'));
    await database.db.insert(annotations).values({
      projectId: world.projectA,
      sifId: world.sifDraft,
      modelId: solved.modelId,
      revision: 1,
      targetKind: 'event',
      itemId: 'XV-1101A',
      severity: 'must-fix',
      body: 'State the source of the valve rates.',
      authorId: world.userId.reviewer,
    });
    await database.db.insert(annotations).values({
      projectId: world.projectA,
      sifId: world.sifDraft,
      modelId: solved.modelId,
      revision: 1,
      targetKind: 'result',
      itemId: 'pfd-curve',
      severity: 'question',
      status: 'resolved',
      body: 'Is the proof test perfect?',
      authorId: world.userId.reviewer,
    });
    const reviewer = await signedInAgent(app, 'reviewer');
    const response = await reviewer.get(`${base(solved.id)}/report`).buffer(true).parse((res, callback) => {
      const chunks: Buffer[] = [];
      res.on('data', (chunk: Buffer) => chunks.push(chunk));
      res.on('end', () => callback(null, Buffer.concat(chunks)));
    });
    expect(response.status).toBe(200);
    expect(response.headers['content-type']).toBe('application/pdf');
    expect(response.headers['content-disposition']).toMatch(/^attachment; filename="verification-.*\.pdf"$/);
    const { text } = await pdfText(response.body as Buffer);
    const pfdAvg = solved.result?.pfdAvg as number;
    for (const expected of [
      'Verification report',
      'Model picture',
      'Separator high-pressure shutdown',
      pfdAvg.toExponential(2),
      'IEC 61508-2:2010 7.4.4.2',
      'IEC 61511-1:2016 11.4.5',
      'Minimal cut sets',
      'XV-1101A',
      'invented demo figure',
      `version ${SOLVER_VERSION}`,
      'does not replace competent judgement',
      'must-fix open event XV-1101A Reviewer (test) State the source of the valve rates.',
      // Comments on a result figure are listed with the others, named by the figure.
      'question resolved result figure PFD(t) chart Reviewer (test) Is the proof test perfect?',
      'No review round of this model has been requested.',
    ]) {
      expect(text).toContain(expected);
    }
  });

  it('CSV of the curve has every point; a formula-looking label is escaped (OWASP CSV injection)', async () => {
    const solved = await solvedModel(await signedInAgent(app, 'engineer'));
    const viewer = await signedInAgent(app, 'viewer');
    const curve = await viewer.get(`${base(solved.id)}/csv?table=curve`);
    expect(curve.status).toBe(200);
    expect(curve.headers['content-type']).toBe('text/csv; charset=utf-8');
    const lines = curve.text.trim().split('\r\n');
    // w(t) is a third column when the engine computed it (server/reports/report-files.test.ts checks both forms).
    expect(lines[0]).toBe(solved.result?.curve.frequency ? 'hours,pfd,frequency_per_hour' : 'hours,pfd');
    expect(lines.length - 1).toBe(solved.result?.curve.hours.length);
    const [hours, pfd] = lines[100].split(',').map(Number);
    expect(hours).toBe(solved.result?.curve.hours[99]);
    expect(pfd).toBe(solved.result?.curve.pfd[99]);
    const importance = await viewer.get(`${base(solved.id)}/csv?table=importance`);
    const row = importance.text.split('\r\n').find((line) => line.startsWith('LS-110,'));
    expect(row).toContain(`"'=HYPERLINK(""http://example.invalid"",""x"")"`);
    const contributions = await viewer.get(`${base(solved.id)}/csv?table=contributions`);
    expect(contributions.text.split('\r\n')[1]).toMatch(/^VALVES,/);
  });

  it('a Monte Carlo check of the same draft shows beside the exact solve, its 99 % interval holding the exact PFDavg', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const exact = await solvedModel(engineer);
    const check = await solvedDraft(engineer, exact.modelId, { method: 'montecarlo', timePoints: 2000, samples: 100_000, seed: 11 });
    expect(check.contentHash).toBe(exact.contentHash);
    const analysis = resultAnalysis.parse((await engineer.get(`${base(exact.id)}/analysis`)).body);
    expect(analysis.methods.map((method) => [method.solveId, method.method])).toEqual([
      [exact.id, 'exact'],
      [check.id, 'montecarlo'],
    ]);
    const simulated = analysis.methods[1];
    expect(simulated.samples).toBe(100_000);
    // The simulation is a seeded estimate of the same measure the exact engine integrates: its 99 %
    // interval of the mean (normal approximation, common practice) must hold the exact PFDavg. The
    // interval half-width shrinks as 1/sqrt(N), so a wrong engine would fall outside at this N.
    const interval = simulated.interval!.pfdAvg;
    expect(interval.level).toBe(0.99);
    expect(interval.lower).toBeLessThanOrEqual(exact.result!.pfdAvg);
    expect(interval.upper).toBeGreaterThanOrEqual(exact.result!.pfdAvg);
    expect(interval.upper / interval.lower).toBeLessThan(1.5);
    // The analysis of the Monte Carlo solve lists it first and the exact one beside it.
    const fromCheck = resultAnalysis.parse((await engineer.get(`${base(check.id)}/analysis`)).body);
    expect(fromCheck.methods.map((method) => method.method)).toEqual(['montecarlo', 'exact']);
  });

  it('refuses a Monte Carlo check of a state model by name instead of queueing a solve that must fail', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const created = await engineer.post(`/api/projects/${world.projectA}/sifs/${world.sifDraft}/models`).send({
      file: {
        format: 'proofline/model',
        version: 1,
        name: 'Two-state valve',
        kind: 'markov',
        mission: { hours: 87_600, demand: 'low' },
        states: [{ id: 'OK', initial: 1 }, { id: 'FAILED', down: true }],
        transitions: [{ from: 'OK', to: 'FAILED', rate: 2e-6 }],
      },
    });
    expect(created.status).toBe(201);
    const refused = await engineer.post(`/api/projects/${world.projectA}/models/${created.body.id}/solves`).send({ source: { kind: 'draft', version: 1 }, settings: { method: 'montecarlo' } });
    expect(refused.status).toBe(400);
    expect(refused.body.error.details.issues).toEqual([{ path: 'settings.method', message: 'Monte Carlo simulation is for fault trees; a state model is solved exactly (method "exact")' }]);
    const listed = await engineer.get(`/api/projects/${world.projectA}/models/${created.body.id}/solves`);
    expect(listed.body).toEqual([]);
  });

  it('refuses an unknown table (400), hides the solve from an outsider (404) and asks for a session (401)', async () => {
    const solved = await solvedModel(await signedInAgent(app, 'engineer'));
    const viewer = await signedInAgent(app, 'viewer');
    const bad = await viewer.get(`${base(solved.id)}/csv?table=everything`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.issues[0].path).toBe('table');
    const outsider = await signedInAgent(app, 'outsider');
    expect((await outsider.get(`${base(solved.id)}/report`)).status).toBe(404);
    expect((await outsider.get(`${base(solved.id)}/analysis`)).status).toBe(404);
    const anonymous = await (await import('supertest')).default(app).get(`${base(solved.id)}/csv`);
    expect(anonymous.status).toBe(401);
  });
});
