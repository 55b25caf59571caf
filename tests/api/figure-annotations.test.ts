import { sql } from 'drizzle-orm';
import type { Express } from 'express';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { annotation, annotationList, type Annotation } from '../../shared/api/annotations.js';
import { auditList } from '../../shared/api/audit.js';
import { solve as solveSchema, type Solve } from '../../shared/api/solves.js';
import type { FaultTreeModel } from '../../shared/model-file.js';
import { startSolving, type Solving } from '../../server/solves/solving.js';
import { SOLVER_VERSION } from '../../solver/index.js';
import { signedInAgent } from './helpers/test-app.js';
import { testDatabaseUrl } from './helpers/test-database.js';
import type { World } from './helpers/world.js';
import { issuedModel, issueNext, openReviewWorld, receivedAtLeast, resetReviewWorld, transmitterPair, type ReviewWorld } from './reviews-helpers.js';

let context: Omit<ReviewWorld, 'world'>;
let solving: Solving;
let world: World;

beforeAll(async () => {
  context = await openReviewWorld(async (database) => {
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
    return { solving: solving.deps };
  });
});

afterAll(async () => {
  await solving?.stop(2000);
  await context.smtp.close();
  await context.database.close();
});

beforeEach(async () => {
  world = await resetReviewWorld(context);
  await context.database.db.execute(sql`truncate table solve_results cascade`);
});

const annotationsUrl = (modelId: string) => `/api/projects/${world.projectA}/models/${modelId}/annotations`;
const threadUrl = (id: string, action: 'replies' | 'resolve' | 'reopen') => `/api/projects/${world.projectA}/annotations/${id}/${action}`;

/** Solves an issued revision (as the engineer: reviewers do not start solves) and waits for the result. */
async function solveRevision(app: Express, modelId: string, number: number, settings: Record<string, unknown> = { method: 'exact', timePoints: 200 }): Promise<Solve> {
  const engineer = await signedInAgent(app, 'engineer');
  const started = await engineer.post(`/api/projects/${world.projectA}/models/${modelId}/solves`).send({ source: { kind: 'revision', number }, settings });
  if (![200, 202].includes(started.status)) throw new Error(`solve not started: ${JSON.stringify(started.body)}`);
  const until = Date.now() + 30_000;
  for (;;) {
    const current = solveSchema.parse((await engineer.get(`/api/projects/${world.projectA}/solves/${started.body.id}`)).body);
    if (current.status === 'succeeded') return current;
    if (current.status === 'failed' || current.status === 'cancelled' || Date.now() > until) throw new Error(`solve ended ${current.status}: ${current.error}`);
    await new Promise((resolve) => setTimeout(resolve, 50));
  }
}

/** The same pair with a new label on transmitter A: the content changes, no figure does. */
function relabelled(file: FaultTreeModel): FaultTreeModel {
  return { ...file, events: file.events.map((event) => (event.id === 'PT-A' ? { ...event, label: 'Transmitter A (north nozzle)' } : event)) };
}

const byFigure = (list: readonly Annotation[]) => Object.fromEntries(list.map((entry) => [entry.target.itemId, entry.outdatedBecause]));

describe('annotations on result figures', () => {
  it('a reviewer comments on a figure of a solved revision; the thread keeps its solve, takes replies, resolves, re-opens, is mailed and audited', async () => {
    const { modelId } = await issuedModel(context.app, world);
    const solved = await solveRevision(context.app, modelId, 1);
    // Sanity check that the figure is the real solve of a 1oo2 pair: PFDavg = lambdaA lambdaB tau^2 / 3 for
    // lambda tau << 1 (IEC 61508-6:2010 B.3.2.2.2 with no DD failures and no common cause; Rausand & Hoyland
    // 2004, 10.4), 2e-7 * 2e-7 * 8760^2 / 3 = 1.023e-6; tolerance 1 % for the exponential terms left out.
    expect(solved.result!.pfdAvg).toBeGreaterThan(1.023e-6 * 0.99);
    expect(solved.result!.pfdAvg).toBeLessThan(1.023e-6 * 1.01);

    const reviewer = await signedInAgent(context.app, 'reviewer');
    const created = await reviewer
      .post(annotationsUrl(modelId))
      .send({ revision: 1, target: { kind: 'result', itemId: 'pfd-curve' }, solveId: solved.id, severity: 'question', body: 'Is the proof test assumed perfect?' });
    expect(created.status).toBe(201);
    const thread = annotation.parse(created.body);
    expect(thread).toMatchObject({ target: { kind: 'result', itemId: 'pfd-curve' }, solveId: solved.id, outdated: false, outdatedBecause: null, status: 'open' });

    const engineer = await signedInAgent(context.app, 'engineer');
    const replied = await engineer.post(threadUrl(thread.id, 'replies')).send({ body: 'Yes, coverage 100 %; stated in the assumptions.' });
    expect(replied.status).toBe(201);
    expect(annotation.parse(replied.body).replies.map((reply) => reply.body)).toEqual(['Yes, coverage 100 %; stated in the assumptions.']);
    expect((await engineer.post(threadUrl(thread.id, 'resolve'))).body).toMatchObject({ status: 'resolved', resolvedById: world.userId.engineer });
    expect((await reviewer.post(threadUrl(thread.id, 'reopen'))).body).toMatchObject({ status: 'open', resolvedById: null });

    // Listed with the model's other threads, for the results page and the review panel alike.
    const listed = annotationList.parse((await engineer.get(annotationsUrl(modelId))).body);
    expect(listed.annotations.map((entry) => [entry.target.kind, entry.target.itemId, entry.replies.length])).toEqual([['result', 'pfd-curve', 1]]);

    await receivedAtLeast(context.smtp, 2);
    const comment = context.smtp.received.find((mail) => mail.subject.includes('commented on'));
    expect(comment?.to).toEqual(['engineer@proofline.test']);
    expect(comment?.raw).toContain('question on result figure PFD(t) chart');

    const audit = auditList.parse((await engineer.get(`/api/projects/${world.projectA}/audit?sifId=${world.sifDraft}`)).body);
    const summaries = audit.map((event) => event.summary);
    expect(summaries).toContain(`annotated result figure PFD(t) chart of ${transmitterPair().name} revision 1 (question)`);
    expect(summaries).toContain('resolved the annotation on result figure PFD(t) chart');
    expect(summaries).toContain('re-opened the annotation on result figure PFD(t) chart');
  });

  it('carries figure threads forward; a thread is outdated when its figure changed, not when only the model text did', async () => {
    const first = transmitterPair();
    const { modelId } = await issuedModel(context.app, world, 'engineer', first);
    const one = await solveRevision(context.app, modelId, 1);
    const reviewer = await signedInAgent(context.app, 'reviewer');
    for (const figure of ['pfd-curve', 'cut-sets', 'constraints', 'spurious-trips', 'sensitivity', 'verdict']) {
      const created = await reviewer.post(annotationsUrl(modelId)).send({ revision: 1, target: { kind: 'result', itemId: figure }, severity: 'remark', body: `On ${figure}` });
      expect(created.status).toBe(201);
      expect(created.body.solveId).toBe(one.id);
    }

    // Revision 2 only renames a transmitter. Not solved yet: the figures that need a result cannot be
    // compared and say so; the ones read from the model file are compared at once.
    await issueNext(context.app, world, modelId, relabelled(first));
    const unsolved = annotationList.parse((await reviewer.get(annotationsUrl(modelId))).body);
    expect(unsolved.revision).toBe(2);
    expect(byFigure(unsolved.annotations)).toEqual({
      'pfd-curve': 'the model changed since revision 1; revision 2 has no exact result yet to compare with',
      'cut-sets': 'the model changed since revision 1; revision 2 has no exact result yet to compare with',
      verdict: 'the model changed since revision 1; revision 2 has no exact result yet to compare with',
      constraints: null,
      'spurious-trips': null,
      sensitivity: 'the figure changed since revision 1: model content changed',
    });
    // Solved, the same numbers come out: only the sensitivity (which varies the model content) is outdated.
    await solveRevision(context.app, modelId, 2);
    const relabelledList = annotationList.parse((await reviewer.get(annotationsUrl(modelId))).body);
    expect(relabelledList.annotations.filter((entry) => entry.outdated).map((entry) => entry.target.itemId)).toEqual(['sensitivity']);

    // Revision 3 raises transmitter B's rate 2.5 times: PFDavg and the cut set probability change, the
    // constraints (no safe or detected rates, SFF 0 either way) and the spurious trip rate (no safe rate) do not.
    await issueNext(context.app, world, modelId, relabelled(transmitterPair(5.0e-7)));
    const three = await solveRevision(context.app, modelId, 3);
    const changed = annotationList.parse((await reviewer.get(annotationsUrl(modelId))).body);
    const reasons = byFigure(changed.annotations);
    // Written as the results page writes measures below 0.01: 3 significant digits, exponent form.
    const shown = (value: number) => value.toExponential(2);
    // Closed form as above: the ratio of the two PFDavg is the ratio of the rates, 2.5 (within 1 %).
    expect(three.result!.pfdAvg / one.result!.pfdAvg).toBeCloseTo(2.5, 1);
    expect(reasons['pfd-curve']).toBe(
      `the figure changed since revision 1: PFDavg ${shown(one.result!.pfdAvg)} -> ${shown(three.result!.pfdAvg)}; ` +
        `PFDmax ${shown(one.result!.pfdMax)} -> ${shown(three.result!.pfdMax)}; PFH ${shown(one.result!.pfh)} -> ${shown(three.result!.pfh)}`,
    );
    expect(reasons['cut-sets']).toBe('the figure changed since revision 1: cut sets changed');
    expect(reasons['verdict']).toContain(`PFDavg ${shown(one.result!.pfdAvg)} -> ${shown(three.result!.pfdAvg)}`);
    expect(reasons['constraints']).toBeNull();
    expect(reasons['spurious-trips']).toBeNull();

    // On its own revision nothing is outdated.
    const onOne = annotationList.parse((await reviewer.get(`${annotationsUrl(modelId)}?revision=1`)).body);
    expect(onOne.annotations.map((entry) => entry.outdated)).toEqual([false, false, false, false, false, false]);
  });

  it('compares a Monte Carlo figure with the next revision\'s Monte Carlo result, not with an exact one', async () => {
    const { modelId } = await issuedModel(context.app, world);
    const monteCarlo = { method: 'montecarlo', timePoints: 50, samples: 2000, seed: 7 };
    const sampled = await solveRevision(context.app, modelId, 1, monteCarlo);
    const reviewer = await signedInAgent(context.app, 'reviewer');
    const created = await reviewer.post(annotationsUrl(modelId)).send({ revision: 1, target: { kind: 'result', itemId: 'verdict' }, solveId: sampled.id, severity: 'remark', body: 'Sampled' });
    expect(created.status).toBe(201);
    await issueNext(context.app, world, modelId, relabelled(transmitterPair()));
    await solveRevision(context.app, modelId, 2);
    const onlyExact = annotationList.parse((await reviewer.get(annotationsUrl(modelId))).body);
    expect(onlyExact.annotations[0]!.outdatedBecause).toBe('the model changed since revision 1; revision 2 has no Monte Carlo result yet to compare with');
    // The same seed and samples on the same content (the label does not enter the sampling) give the same estimate.
    await solveRevision(context.app, modelId, 2, monteCarlo);
    expect(annotationList.parse((await reviewer.get(annotationsUrl(modelId))).body).annotations[0]!.outdated).toBe(false);
  });

  it('a figure thread written before any solve of its revision is current on that revision and outdated once the model changed', async () => {
    const { modelId } = await issuedModel(context.app, world);
    const reviewer = await signedInAgent(context.app, 'reviewer');
    const created = await reviewer.post(annotationsUrl(modelId)).send({ revision: 1, target: { kind: 'result', itemId: 'importance' }, severity: 'question', body: 'Please solve it first.' });
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ solveId: null, outdated: false });
    await solveRevision(context.app, modelId, 1);
    expect(annotationList.parse((await reviewer.get(annotationsUrl(modelId))).body).annotations[0]!.outdated).toBe(false);
    await issueNext(context.app, world, modelId, relabelled(transmitterPair()));
    await solveRevision(context.app, modelId, 2);
    expect(annotationList.parse((await reviewer.get(annotationsUrl(modelId))).body).annotations[0]!.outdatedBecause).toBe(
      'the model changed since revision 1 and the figure had no result to compare with',
    );
  });

  it('refuses an unknown figure, a solve of another revision, a draft or another model, and a solve on an item pin, naming the field', async () => {
    const { agent: engineer, modelId } = await issuedModel(context.app, world);
    const other = await issuedModel(context.app, world);
    const reviewer = await signedInAgent(context.app, 'reviewer');
    const post = (body: Record<string, unknown>) => reviewer.post(annotationsUrl(modelId)).send({ revision: 1, severity: 'remark', body: 'x', ...body });

    const unknown = await post({ target: { kind: 'result', itemId: 'pfdAvg' } });
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.details.issues).toEqual([
      { path: 'target.itemId', message: 'must be one of the result figures: verdict, pfd-curve, weakest-link, spurious-trips, cut-sets, importance, constraints, sensitivity' },
    ]);

    await issueNext(context.app, world, modelId, relabelled(transmitterPair()));
    const ofTwo = await solveRevision(context.app, modelId, 2);
    const wrongRevision = await post({ target: { kind: 'result', itemId: 'verdict' }, solveId: ofTwo.id });
    expect(wrongRevision.body.error.details.issues).toEqual([{ path: 'solveId', message: 'is not a succeeded solve of revision 1 of this model' }]);

    const model = await engineer.get(`/api/projects/${world.projectA}/models/${modelId}`);
    const draft = await engineer.post(`/api/projects/${world.projectA}/models/${modelId}/solves`).send({ source: { kind: 'draft', version: model.body.draft.version }, settings: { method: 'exact', timePoints: 50 } });
    expect((await post({ target: { kind: 'result', itemId: 'verdict' }, solveId: draft.body.id })).body.error.details.issues[0].path).toBe('solveId');

    const otherSolve = await solveRevision(context.app, other.modelId, 1);
    expect((await post({ target: { kind: 'result', itemId: 'verdict' }, solveId: otherSolve.id })).body.error.details.issues[0].path).toBe('solveId');

    const onGate = await post({ target: { kind: 'gate', itemId: 'TOP' }, solveId: ofTwo.id });
    expect(onGate.body.error.details.issues).toEqual([{ path: 'solveId', message: 'is only for an annotation on a result figure' }]);
    const notAnId = await post({ target: { kind: 'result', itemId: 'verdict' }, solveId: 'latest' });
    expect(notAnId.body.error.details.issues).toEqual([{ path: 'solveId', message: 'must be an id (UUID)' }]);

    // Nothing refused was stored.
    expect(annotationList.parse((await reviewer.get(annotationsUrl(modelId))).body).annotations).toEqual([]);
  });

  it('viewers read figure threads but cannot write, reply or resolve them; outsiders get 404; authors and leads may answer', async () => {
    const { modelId } = await issuedModel(context.app, world);
    const solved = await solveRevision(context.app, modelId, 1);
    const reviewer = await signedInAgent(context.app, 'reviewer');
    const thread = annotation.parse(
      (await reviewer.post(annotationsUrl(modelId)).send({ revision: 1, target: { kind: 'result', itemId: 'cut-sets' }, solveId: solved.id, severity: 'must-fix', body: 'List the CCF cut set.' })).body,
    );
    const figureBody = { revision: 1, target: { kind: 'result', itemId: 'cut-sets' }, solveId: solved.id, severity: 'remark', body: 'x' };

    const viewer = await signedInAgent(context.app, 'viewer');
    const read = annotationList.parse((await viewer.get(annotationsUrl(modelId))).body);
    expect(read.annotations.map((entry) => entry.id)).toEqual([thread.id]);
    const refusedCreate = await viewer.post(annotationsUrl(modelId)).send(figureBody);
    expect(refusedCreate.status).toBe(403);
    expect(refusedCreate.body.error.code).toBe('forbidden');
    expect((await viewer.post(threadUrl(thread.id, 'replies')).send({ body: 'x' })).status).toBe(403);
    expect((await viewer.post(threadUrl(thread.id, 'resolve'))).status).toBe(403);

    const outsider = await signedInAgent(context.app, 'outsider');
    expect((await outsider.get(annotationsUrl(modelId))).status).toBe(404);
    expect((await outsider.post(annotationsUrl(modelId)).send(figureBody)).status).toBe(404);
    expect((await outsider.post(threadUrl(thread.id, 'replies')).send({ body: 'x' })).status).toBe(404);

    // The refused calls changed nothing.
    const after = annotationList.parse((await reviewer.get(annotationsUrl(modelId))).body);
    expect(after.annotations.map((entry) => [entry.id, entry.status, entry.replies.length])).toEqual([[thread.id, 'open', 0]]);

    const lead = await signedInAgent(context.app, 'lead');
    expect((await lead.post(threadUrl(thread.id, 'replies')).send({ body: 'Added CCF-PT.' })).status).toBe(201);
    const engineer = await signedInAgent(context.app, 'engineer');
    expect((await engineer.post(threadUrl(thread.id, 'resolve'))).status).toBe(200);
  });

  it('an open must-fix on a result figure holds the approval like one on a gate', async () => {
    const { agent: engineer, modelId } = await issuedModel(context.app, world);
    const solved = await solveRevision(context.app, modelId, 1);
    const round = await engineer.post(`/api/projects/${world.projectA}/models/${modelId}/reviews`).send({ revision: 1, reviewerIds: [world.userId.reviewer], message: 'Please check the figures.' });
    expect(round.status).toBe(201);
    const reviewer = await signedInAgent(context.app, 'reviewer');
    const thread = await reviewer
      .post(annotationsUrl(modelId))
      .send({ revision: 1, target: { kind: 'result', itemId: 'verdict' }, solveId: solved.id, severity: 'must-fix', body: 'The claim needs the proof test coverage stated.' });
    const held = await reviewer.post(`/api/projects/${world.projectA}/reviews/${round.body.id}/approve`).send({ comment: '' });
    expect(held.status).toBe(409);
    expect(held.body.error.message).toBe('1 must-fix annotation(s) are still open; they must be resolved before approval');
    await engineer.post(threadUrl(thread.body.id, 'resolve'));
    expect((await reviewer.post(`/api/projects/${world.projectA}/reviews/${round.body.id}/approve`).send({ comment: 'Fine.' })).status).toBe(200);
  });
});
