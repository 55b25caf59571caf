import { eq, sql } from 'drizzle-orm';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { reviewRound } from '../../shared/api/reviews.js';
import { sentMailList } from '../../shared/api/audit.js';
import { projectMembers } from '../../server/db/schema/projects.js';
import { reviewRoundReviewers } from '../../server/db/schema/reviews.js';
import { sifs } from '../../server/db/schema/sifs.js';
import { signedInAgent } from './helpers/test-app.js';
import type { World, WorldUsername } from './helpers/world.js';
import { issuedModel, issueNext, openReviewWorld, receivedAtLeast, resetReviewWorld, transmitterPair, type ReviewWorld } from './reviews-helpers.js';

// Issue item 6, edge by edge: reviewers annotate and approve but do not edit the model; authors do not approve
// their own revision; viewers read. The role rules are ours (shared/api/index.ts, shared/api/reviews.ts).

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

const projectUrl = () => `/api/projects/${world.projectA}`;
const agent = (username: WorldUsername) => signedInAgent(context.app, username);

async function draftOf(modelId: string) {
  return (await (await agent('engineer')).get(`${projectUrl()}/models/${modelId}`)).body.draft as { version: number; content: unknown };
}

async function requestReview(modelId: string, revision = 1, reviewerIds = [world.userId.reviewer], username: WorldUsername = 'engineer') {
  const response = await (await agent(username)).post(`${projectUrl()}/models/${modelId}/reviews`).send({ revision, reviewerIds, message: 'Please check.' });
  if (response.status !== 201) throw new Error(`review not requested: ${JSON.stringify(response.body)}`);
  return reviewRound.parse(response.body);
}

async function sifStatus(sifId = world.sifDraft) {
  const [row] = await context.database.db.select({ status: sifs.status, version: sifs.version }).from(sifs).where(eq(sifs.id, sifId));
  return row!;
}

/** Every route that changes a model's content, with a body that an allowed caller would get through. */
async function modelWrites(modelId: string) {
  const draft = await draftOf(modelId);
  return [
    { name: 'create a model', method: 'post' as const, path: `${projectUrl()}/sifs/${world.sifDraft}/models`, body: { file: transmitterPair() } },
    { name: 'save the draft', method: 'put' as const, path: `${projectUrl()}/models/${modelId}/draft`, body: { version: draft.version, content: transmitterPair(9e-7) } },
    { name: 'import a file', method: 'post' as const, path: `${projectUrl()}/models/${modelId}/import`, body: { version: draft.version, file: transmitterPair(8e-7) } },
    { name: 'issue a revision', method: 'post' as const, path: `${projectUrl()}/models/${modelId}/revisions`, body: { draftVersion: draft.version, reason: 'Reviewer edit' } },
  ];
}

describe('reviewers annotate and approve but do not edit the model', () => {
  it('refuses every model write of a reviewer (403) and leaves the draft and revisions as they were', async () => {
    const { modelId } = await issuedModel(context.app, world);
    const before = await draftOf(modelId);
    const reviewer = await agent('reviewer');
    for (const write of await modelWrites(modelId)) {
      const response = await reviewer[write.method](write.path).send(write.body);
      expect(response.status, write.name).toBe(403);
      expect(response.body.error.code, write.name).toBe('forbidden');
    }
    expect(await draftOf(modelId)).toEqual(before);
    const revisions = await reviewer.get(`${projectUrl()}/models/${modelId}/revisions`);
    expect(revisions.body.map((revision: { number: number }) => revision.number)).toEqual([1]);
    const models = await reviewer.get(`${projectUrl()}/sifs/${world.sifDraft}/models`);
    expect(models.body).toHaveLength(1);

    // The same reviewer may annotate and approve: the refusals above are about editing, not about reviewing.
    const round = await requestReview(modelId);
    const note = await reviewer.post(`${projectUrl()}/models/${modelId}/annotations`).send({ revision: 1, target: { kind: 'event', itemId: 'PT-A' }, severity: 'remark', body: 'Source of λDU?' });
    expect(note.status).toBe(201);
    expect((await reviewer.post(`${projectUrl()}/reviews/${round.id}/approve`).send({ comment: 'Fine.' })).status).toBe(200);
  });
});

describe('authors do not approve their own revision', () => {
  it('refuses the issuer even when the round lists them as reviewer (the check at decision time, not only at request time)', async () => {
    const { modelId } = await issuedModel(context.app, world, 'lead');
    const round = await requestReview(modelId, 1, [world.userId.reviewer], 'engineer');
    // A reviewer list that names the issuer cannot be made through the API (the request refuses it), so it is written here.
    await context.database.db.insert(reviewRoundReviewers).values({ roundId: round.id, userId: world.userId.lead });
    const lead = await agent('lead');
    for (const verb of ['approve', 'return'] as const) {
      const refused = await lead.post(`${projectUrl()}/reviews/${round.id}/${verb}`).send({ comment: 'My own work is fine.' });
      expect(refused.status, verb).toBe(403);
      expect(refused.body.error.message, verb).toBe('authors do not review their own revision');
    }
    expect((await sifStatus()).status).toBe('in-review');
  });

  it('refuses the one who asked for the review when they are also a chosen reviewer', async () => {
    const { modelId } = await issuedModel(context.app, world);
    const round = await requestReview(modelId, 1, [world.userId.reviewer], 'lead');
    await context.database.db.insert(reviewRoundReviewers).values({ roundId: round.id, userId: world.userId.lead });
    const refused = await (await agent('lead')).post(`${projectUrl()}/reviews/${round.id}/approve`).send({});
    expect(refused.status).toBe(403);
    expect(refused.body.error.message).toBe('authors do not review their own revision');
  });

  it('does not let the SIF register approve a SIF whose model has an issued revision, so the round cannot be skipped', async () => {
    const { modelId } = await issuedModel(context.app, world, 'lead');
    await requestReview(modelId, 1, [world.userId.reviewer], 'lead');
    for (const username of ['lead', 'reviewer'] as const) {
      const { version } = await sifStatus();
      const refused = await (await agent(username)).patch(`${projectUrl()}/sifs/${world.sifDraft}`).send({ version, status: 'approved' });
      expect(refused.status, username).toBe(409);
      expect(refused.body.error.message, username).toContain('approved through a review round');
    }
    expect((await sifStatus()).status).toBe('in-review');
    // A SIF with no model keeps the register's own approval by a reviewer (role-matrix.test.ts covers who).
    const { version } = await sifStatus(world.sifInReview);
    expect((await (await agent('reviewer')).patch(`${projectUrl()}/sifs/${world.sifInReview}`).send({ version, status: 'approved' })).status).toBe(200);
  });

  it('refuses a chosen reviewer whose project role was changed to engineer or viewer before deciding', async () => {
    const { modelId } = await issuedModel(context.app, world);
    const round = await requestReview(modelId, 1, [world.userId.reviewer]);
    const lead = await agent('lead');
    for (const role of ['engineer', 'viewer'] as const) {
      expect((await lead.put(`${projectUrl()}/members/${world.userId.reviewer}`).send({ role })).status, role).toBe(200);
      const refused = await (await agent('reviewer')).post(`${projectUrl()}/reviews/${round.id}/approve`).send({});
      expect(refused.status, role).toBe(403);
    }
    await context.database.db.update(projectMembers).set({ role: 'reviewer' }).where(eq(projectMembers.userId, world.userId.reviewer));
    expect((await (await agent('reviewer')).post(`${projectUrl()}/reviews/${round.id}/approve`).send({})).status).toBe(200);
  });
});

describe('viewers read', () => {
  it('lets a viewer read the model, its revisions, threads, rounds, diff and audit trail, and refuses every write', async () => {
    const { modelId } = await issuedModel(context.app, world);
    await issueNext(context.app, world, modelId, transmitterPair(3.0e-7));
    const round = await requestReview(modelId, 2);
    const thread = await (await agent('reviewer'))
      .post(`${projectUrl()}/models/${modelId}/annotations`)
      .send({ revision: 2, target: { kind: 'gate', itemId: 'TOP' }, severity: 'question', body: 'Why AND?' });
    expect(thread.status).toBe(201);
    const viewer = await agent('viewer');

    const reads = [
      `${projectUrl()}/models/${modelId}`,
      `${projectUrl()}/models/${modelId}/revisions`,
      `${projectUrl()}/models/${modelId}/revisions/1`,
      `${projectUrl()}/models/${modelId}/export?revision=2`,
      `${projectUrl()}/models/${modelId}/annotations`,
      `${projectUrl()}/models/${modelId}/diff?from=1&to=2`,
      `${projectUrl()}/sifs/${world.sifDraft}/reviews`,
      `${projectUrl()}/reviews/${round.id}`,
      `${projectUrl()}/audit`,
      `${projectUrl()}/audit/csv`,
    ];
    for (const path of reads) expect((await viewer.get(path)).status, path).toBe(200);

    const auditBefore = await context.database.db.execute(sql`select count(*)::int as n from audit_events`);
    const writes = [
      ...(await modelWrites(modelId)),
      { name: 'request a review', method: 'post' as const, path: `${projectUrl()}/models/${modelId}/reviews`, body: { revision: 2, reviewerIds: [world.userId.reviewer], message: '' } },
      { name: 'approve', method: 'post' as const, path: `${projectUrl()}/reviews/${round.id}/approve`, body: {} },
      { name: 'return', method: 'post' as const, path: `${projectUrl()}/reviews/${round.id}/return`, body: { comment: 'No.' } },
      { name: 'annotate', method: 'post' as const, path: `${projectUrl()}/models/${modelId}/annotations`, body: { revision: 2, target: { kind: 'model', itemId: null }, severity: 'remark', body: 'x' } },
      { name: 'reply', method: 'post' as const, path: `${projectUrl()}/annotations/${thread.body.id}/replies`, body: { body: 'x' } },
      { name: 'resolve', method: 'post' as const, path: `${projectUrl()}/annotations/${thread.body.id}/resolve`, body: {} },
    ];
    for (const write of writes) {
      const response = await viewer[write.method](write.path).send(write.body);
      expect(response.status, write.name).toBe(403);
    }
    // Re-open needs a resolved thread to be a real attempt.
    expect((await (await agent('engineer')).post(`${projectUrl()}/annotations/${thread.body.id}/resolve`)).status).toBe(200);
    expect((await viewer.post(`${projectUrl()}/annotations/${thread.body.id}/reopen`)).status).toBe(403);
    const auditAfter = await context.database.db.execute(sql`select count(*)::int as n from audit_events`);
    // Only the engineer's resolve was recorded: no refused call left a trace.
    expect(Number(auditAfter.rows[0]!.n)).toBe(Number(auditBefore.rows[0]!.n) + 1);
    expect((await sifStatus()).status).toBe('in-review');
  });
});

describe('the notice switch', () => {
  it('keeps every kind of notice from a user who switched off, while others still get theirs, until switched on again', async () => {
    const engineer = await agent('engineer');
    expect((await engineer.put('/api/me/notices').send({ notices: false })).body).toEqual({ notices: false });
    expect((await engineer.get('/api/me/notices')).body).toEqual({ notices: false });
    const { modelId } = await issuedModel(context.app, world);
    const round = await requestReview(modelId);
    const reviewer = await agent('reviewer');
    // A comment on the engineer's model, then returned, then (revision 2) approved: three notices the engineer would get.
    expect((await reviewer.post(`${projectUrl()}/models/${modelId}/annotations`).send({ revision: 1, target: { kind: 'gate', itemId: 'TOP' }, severity: 'remark', body: 'Label?' })).status).toBe(201);
    expect((await reviewer.post(`${projectUrl()}/reviews/${round.id}/return`).send({ comment: 'See TOP.' })).status).toBe(200);
    await issueNext(context.app, world, modelId, transmitterPair(3.0e-7));
    const second = await requestReview(modelId, 2);
    expect((await reviewer.post(`${projectUrl()}/reviews/${second.id}/approve`).send({})).status).toBe(200);

    await receivedAtLeast(context.smtp, 2);
    expect(context.smtp.received.map((mail) => mail.to.join(','))).toEqual(['reviewer@proofline.test', 'reviewer@proofline.test']);
    const admin = await agent('admin');
    const sent = sentMailList.parse((await admin.get('/api/admin/mail')).body);
    expect(sent.filter((mail) => mail.toUserId === world.userId.engineer)).toEqual([]);

    expect((await engineer.put('/api/me/notices').send({ notices: true })).body).toEqual({ notices: true });
    await issueNext(context.app, world, modelId, transmitterPair(3.5e-7));
    const third = await requestReview(modelId, 3);
    expect((await reviewer.post(`${projectUrl()}/reviews/${third.id}/return`).send({ comment: 'Again.' })).status).toBe(200);
    await receivedAtLeast(context.smtp, 4);
    expect(context.smtp.received.slice(2).map((mail) => mail.to.join(','))).toEqual(['reviewer@proofline.test', 'engineer@proofline.test']);
  });
});
