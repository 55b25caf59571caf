import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { reviewRound, reviewRoundList, revisionDiff } from '../../shared/api/reviews.js';
import { sentMailList } from '../../shared/api/audit.js';
import { sifs } from '../../server/db/schema/sifs.js';
import { solveResults, solves } from '../../server/db/schema/solves.js';
import type { SolveResult } from '../../shared/solve-result.js';
import { signedInAgent } from './helpers/test-app.js';
import type { World } from './helpers/world.js';
import { issuedModel, issueNext, openReviewWorld, receivedAtLeast, resetReviewWorld, transmitterPair, type ReviewWorld } from './reviews-helpers.js';

let context: Omit<ReviewWorld, 'world'>;
let world: World;

beforeAll(async () => {
  context = await openReviewWorld();
});

afterAll(async () => {
  await context.smtp.close();
  await context.database.close();
});

beforeEach(async () => {
  world = await resetReviewWorld(context);
});

async function sifStatus(sifId = world.sifDraft) {
  const [row] = await context.database.db.select({ status: sifs.status }).from(sifs).where(eq(sifs.id, sifId));
  return row?.status;
}

async function requestReview(modelId: string, revision = 1, reviewerIds = [world.userId.reviewer], username = 'engineer') {
  const agent = await signedInAgent(context.app, username);
  return agent.post(`/api/projects/${world.projectA}/models/${modelId}/reviews`).send({ revision, reviewerIds, message: 'Please check the voting of PT-A/PT-B.' });
}

describe('review rounds: the workflow', () => {
  it('request -> in review -> returned -> draft -> re-issue -> approved, with a notice at each step', async () => {
    const { modelId } = await issuedModel(context.app, world);
    const requested = await requestReview(modelId);
    expect(requested.status).toBe(201);
    const round = reviewRound.parse(requested.body);
    expect(round).toMatchObject({ status: 'open', revision: 1, sifTag: 'PZT-1101', reviewers: [{ userId: world.userId.reviewer }] });
    expect(await sifStatus()).toBe('in-review');

    const reviewer = await signedInAgent(context.app, 'reviewer');
    const queue = reviewRoundList.parse((await reviewer.get('/api/reviews/queue')).body);
    expect(queue.map((entry) => entry.id)).toEqual([round.id]);
    const engineerQueue = await (await signedInAgent(context.app, 'engineer')).get('/api/reviews/queue');
    expect(engineerQueue.body).toEqual([]);

    const returned = await reviewer.post(`/api/projects/${world.projectA}/reviews/${round.id}/return`).send({ comment: 'Beta factor missing.' });
    expect(returned.status).toBe(200);
    expect(returned.body).toMatchObject({ status: 'returned', decidedById: world.userId.reviewer, decisionComment: 'Beta factor missing.' });
    expect(await sifStatus()).toBe('draft');
    expect((await reviewer.get('/api/reviews/queue')).body).toEqual([]);

    const second = await issueNext(context.app, world, modelId, transmitterPair(3.0e-7));
    expect(second).toBe(2);
    const again = reviewRound.parse((await requestReview(modelId, 2)).body);
    const approved = await reviewer.post(`/api/projects/${world.projectA}/reviews/${again.id}/approve`).send({ comment: 'Fine now.' });
    expect(approved.status).toBe(200);
    expect(approved.body.status).toBe('approved');
    expect(await sifStatus()).toBe('approved');

    // A new revision of an approved model supersedes the approval.
    await issueNext(context.app, world, modelId, transmitterPair(3.5e-7));
    expect(await sifStatus()).toBe('superseded');

    await receivedAtLeast(context.smtp, 4);
    expect(context.smtp.received.map((mail) => `${mail.to.join(',')} ${mail.subject.split(':')[0]}`)).toEqual([
      'reviewer@proofline.test [Proofline] Review requested',
      'engineer@proofline.test [Proofline] PZT-1101 Separator V-210 high pressure, 1oo2 revision 1 returned by Reviewer (test)',
      'reviewer@proofline.test [Proofline] Review requested',
      'engineer@proofline.test [Proofline] PZT-1101 Separator V-210 high pressure, 1oo2 revision 2 approved by Reviewer (test)',
    ]);
    const admin = await signedInAgent(context.app, 'admin');
    const sent = sentMailList.parse((await admin.get('/api/admin/mail')).body);
    expect(sent.map((mail) => mail.kind).sort()).toEqual(['review-approved', 'review-requested', 'review-requested', 'review-returned']);
    expect(sent.every((mail) => mail.error === null)).toBe(true);

    const history = reviewRoundList.parse((await reviewer.get(`/api/projects/${world.projectA}/sifs/${world.sifDraft}/reviews`)).body);
    expect(history.map((entry) => `${entry.revision} ${entry.status}`)).toEqual(['2 approved', '1 returned']);
  });

  it('sends no mail to a user who switched notices off, and says so in their settings', async () => {
    const reviewer = await signedInAgent(context.app, 'reviewer');
    expect((await reviewer.get('/api/me/notices')).body).toEqual({ notices: true });
    expect((await reviewer.put('/api/me/notices').send({ notices: false })).body).toEqual({ notices: false });
    expect((await reviewer.put('/api/me/notices').send({ notices: 'no' })).status).toBe(400);
    const { modelId } = await issuedModel(context.app, world);
    expect((await requestReview(modelId)).status).toBe(201);
    const admin = await signedInAgent(context.app, 'admin');
    expect((await admin.get('/api/admin/mail')).body).toEqual([]);
    expect(context.smtp.received).toEqual([]);
  });

  it('refuses approval while a must-fix annotation is open, and allows it once resolved', async () => {
    const { modelId } = await issuedModel(context.app, world);
    const round = reviewRound.parse((await requestReview(modelId)).body);
    const reviewer = await signedInAgent(context.app, 'reviewer');
    const note = await reviewer
      .post(`/api/projects/${world.projectA}/models/${modelId}/annotations`)
      .send({ revision: 1, target: { kind: 'gate', itemId: 'TOP' }, severity: 'must-fix', body: 'Where is the CCF group?' });
    expect(note.status).toBe(201);
    const refused = await reviewer.post(`/api/projects/${world.projectA}/reviews/${round.id}/approve`).send({});
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toContain('must-fix');
    const engineer = await signedInAgent(context.app, 'engineer');
    expect((await engineer.post(`/api/projects/${world.projectA}/annotations/${note.body.id}/resolve`)).status).toBe(200);
    expect((await reviewer.post(`/api/projects/${world.projectA}/reviews/${round.id}/approve`).send({})).status).toBe(200);
  });
});

describe('review rounds: permission edges', () => {
  it('reviewers and viewers cannot ask for a review (403), non-members get 404', async () => {
    const { modelId } = await issuedModel(context.app, world);
    expect((await requestReview(modelId, 1, [world.userId.lead], 'reviewer')).status).toBe(403);
    expect((await requestReview(modelId, 1, [world.userId.reviewer], 'viewer')).status).toBe(403);
    expect((await requestReview(modelId, 1, [world.userId.reviewer], 'outsider')).status).toBe(404);
    expect((await requestReview(modelId, 1, [world.userId.reviewer], 'lead')).status).toBe(201);
  });

  it('chosen reviewers must be reviewers or leads of the project and not the authors', async () => {
    const { modelId } = await issuedModel(context.app, world);
    const viewer = await requestReview(modelId, 1, [world.userId.viewer]);
    expect(viewer.status).toBe(400);
    expect(viewer.body.error.details.issues).toEqual([{ path: 'reviewerIds.0', message: 'is a viewer; choose a reviewer or a lead' }]);
    const outsider = await requestReview(modelId, 1, [world.userId.reviewer, world.userId.outsider]);
    expect(outsider.body.error.details.issues).toEqual([{ path: 'reviewerIds.1', message: 'is not a member of this project' }]);
    // The lead asks for review of the engineer's revision: neither may review it.
    const self = await requestReview(modelId, 1, [world.userId.lead], 'lead');
    expect(self.status).toBe(400);
    expect(self.body.error.details.issues[0].message).toContain('authors do not review their own revision');
    const empty = await requestReview(modelId, 1, []);
    expect(empty.body.error.details.issues).toEqual([{ path: 'reviewerIds', message: 'choose at least one reviewer' }]);
  });

  it('only the latest revision is reviewed, one open round at a time, none before an issue', async () => {
    const { modelId } = await issuedModel(context.app, world);
    await issueNext(context.app, world, modelId, transmitterPair(3.0e-7));
    const old = await requestReview(modelId, 1);
    expect(old.status).toBe(400);
    expect(old.body.error.details.issues).toEqual([{ path: 'revision', message: 'must be the latest issued revision (2)' }]);
    expect((await requestReview(modelId, 2)).status).toBe(201);
    expect((await requestReview(modelId, 2)).status).toBe(409);

    const engineer = await signedInAgent(context.app, 'engineer');
    const fresh = await engineer.post(`/api/projects/${world.projectA}/sifs/${world.sifDraft}/models`).send({ file: transmitterPair() });
    const unissued = await requestReview(fresh.body.id, 1);
    expect(unissued.status).toBe(409);
    expect(unissued.body.error.message).toContain('issue a revision');
  });

  it('only a chosen reviewer decides; authors, engineers, viewers and other reviewers may not', async () => {
    const { modelId } = await issuedModel(context.app, world);
    const round = reviewRound.parse((await requestReview(modelId, 1, [world.userId.reviewer])).body);
    const approve = async (username: string) => (await signedInAgent(context.app, username)).post(`/api/projects/${world.projectA}/reviews/${round.id}/approve`).send({});
    expect((await approve('engineer')).status).toBe(403);
    expect((await approve('viewer')).status).toBe(403);
    const lead = await approve('lead');
    expect(lead.status).toBe(403);
    expect(lead.body.error.message).toBe('you are not one of the reviewers chosen for this round');
    expect((await approve('outsider')).status).toBe(404);
    expect((await approve('admin')).status).toBe(403);
    expect((await approve('reviewer')).status).toBe(200);
    const twice = await approve('reviewer');
    expect(twice.status).toBe(409);
    expect(twice.body.error.message).toBe('this review round was already approved');
  });

  it('a lead who issued the revision cannot approve it even when chosen by someone else', async () => {
    const { modelId } = await issuedModel(context.app, world, 'lead');
    const refused = await requestReview(modelId, 1, [world.userId.lead], 'engineer');
    expect(refused.status).toBe(400);
    expect(refused.body.error.details.issues[0].path).toBe('reviewerIds.0');
  });

  it('returning needs a comment; a round on a revision that was followed by another is refused', async () => {
    const { modelId } = await issuedModel(context.app, world);
    const round = reviewRound.parse((await requestReview(modelId)).body);
    const reviewer = await signedInAgent(context.app, 'reviewer');
    const bare = await reviewer.post(`/api/projects/${world.projectA}/reviews/${round.id}/return`).send({});
    expect(bare.status).toBe(400);
    expect(bare.body.error.details.issues).toEqual([{ path: 'comment', message: 'is required' }]);
    await issueNext(context.app, world, modelId, transmitterPair(3.0e-7));
    const stale = await reviewer.post(`/api/projects/${world.projectA}/reviews/${round.id}/approve`).send({});
    expect(stale.status).toBe(409);
    expect(stale.body.error.message).toContain('followed by revision 2');
  });

  it('only a site admin reads the sent mail', async () => {
    for (const username of ['lead', 'reviewer', 'viewer']) {
      expect((await (await signedInAgent(context.app, username)).get('/api/admin/mail')).status).toBe(403);
    }
    expect((await (await signedInAgent(context.app, 'admin')).get('/api/admin/mail')).status).toBe(200);
  });
});

describe('revision diff', () => {
  it('lists the changed fields old -> new; results are null without stored results', async () => {
    const { modelId } = await issuedModel(context.app, world);
    await issueNext(context.app, world, modelId, transmitterPair(4.0e-7));
    const viewer = await signedInAgent(context.app, 'viewer');
    const response = await viewer.get(`/api/projects/${world.projectA}/models/${modelId}/diff?from=1&to=2`);
    expect(response.status).toBe(200);
    const diff = revisionDiff.parse(response.body);
    expect(diff.items).toEqual([{ kind: 'event', id: 'PT-B', change: 'changed', fields: [{ field: 'lambdaDU', old: 2.0e-7, new: 4.0e-7 }] }]);
    expect(diff.results).toBeNull();
    const missing = await viewer.get(`/api/projects/${world.projectA}/models/${modelId}/diff?from=1&to=9`);
    expect(missing.status).toBe(400);
    expect(missing.body.error.details.issues).toEqual([{ path: 'to', message: 'the model has no revision 9' }]);
    expect((await (await signedInAgent(context.app, 'outsider')).get(`/api/projects/${world.projectA}/models/${modelId}/diff?from=1&to=2`)).status).toBe(404);
  });

  it('lists an added item with its new fields and a removed one with its old fields, in the shape the client reads', async () => {
    const { modelId } = await issuedModel(context.app, world);
    const withGroup = { ...transmitterPair(), ccf: [{ id: 'CCF-PT', members: ['PT-A', 'PT-B'], beta: 0.05, model: 'beta' as const }] };
    await issueNext(context.app, world, modelId, withGroup);
    const viewer = await signedInAgent(context.app, 'viewer');
    const added = await viewer.get(`/api/projects/${world.projectA}/models/${modelId}/diff?from=1&to=2`);
    expect(added.status).toBe(200);
    // The client parses the answer with the same schema: an added item's fields have no old value on the wire.
    expect(revisionDiff.parse(added.body).items).toEqual([
      { kind: 'ccf', id: 'CCF-PT', change: 'added', fields: [{ field: 'members', new: ['PT-A', 'PT-B'] }, { field: 'beta', new: 0.05 }, { field: 'model', new: 'beta' }] },
    ]);
    expect(added.body.items[0].fields[0]).not.toHaveProperty('old');
    const removed = revisionDiff.parse((await viewer.get(`/api/projects/${world.projectA}/models/${modelId}/diff?from=2&to=1`)).body);
    expect(removed.items).toEqual([
      { kind: 'ccf', id: 'CCF-PT', change: 'removed', fields: [{ field: 'members', old: ['PT-A', 'PT-B'] }, { field: 'beta', old: 0.05 }, { field: 'model', old: 'beta' }] },
    ]);
  });

  it('compares the stored results of both revisions, the latest succeeded solve of each', async () => {
    const { modelId } = await issuedModel(context.app, world);
    await issueNext(context.app, world, modelId, transmitterPair(4.0e-7));
    const db = context.database.db;
    // Invented figures: only their pass-through old -> new is checked here, not their value.
    const storeResult = async (revision: number, pfdAvg: number, sil: 1 | 2) => {
      const result = { pfdAvg, pfdMax: pfdAvg * 2, pfh: pfdAvg / 8760, rrf: 1 / pfdAvg, sil } as unknown as SolveResult;
      const [stored] = await db
        .insert(solveResults)
        .values({ cacheKey: `review-test-${revision}-${pfdAvg}`, contentHash: 'h', solverVersion: 'test', settings: {} as never, result })
        .returning();
      await db.insert(solves).values({
        projectId: world.projectA,
        modelId,
        revisionNumber: revision,
        model: {},
        contentHash: 'h',
        solverVersion: 'test',
        settings: {} as never,
        status: 'succeeded',
        progress: 1,
        resultId: stored!.id,
        requestedById: world.userId.engineer,
        finishedAt: new Date(Date.now() + pfdAvg),
      });
    };
    await storeResult(1, 1.0e-3, 2);
    const oneSided = revisionDiff.parse((await (await signedInAgent(context.app, 'viewer')).get(`/api/projects/${world.projectA}/models/${modelId}/diff?from=1&to=2`)).body);
    expect(oneSided.results).toBeNull();
    await storeResult(2, 2.0e-3, 2);
    await storeResult(2, 4.0e-2, 1);
    const diff = revisionDiff.parse((await (await signedInAgent(context.app, 'viewer')).get(`/api/projects/${world.projectA}/models/${modelId}/diff?from=1&to=2`)).body);
    expect(diff.results).toEqual([
      { figure: 'pfdAvg', old: 1.0e-3, new: 4.0e-2 },
      { figure: 'pfdMax', old: 2.0e-3, new: 8.0e-2 },
      { figure: 'pfh', old: 1.0e-3 / 8760, new: 4.0e-2 / 8760 },
      { figure: 'rrf', old: 1 / 1.0e-3, new: 1 / 4.0e-2 },
      { figure: 'sil', old: 2, new: 1 },
    ]);
  });
});
