import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { auditList } from '../../shared/api/audit.js';
import { reviewRound } from '../../shared/api/reviews.js';
import { users } from '../../server/db/schema/users.js';
import { signedInAgent } from './helpers/test-app.js';
import type { World } from './helpers/world.js';
import { issuedModel, openReviewWorld, resetReviewWorld, type ReviewWorld } from './reviews-helpers.js';

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

describe('audit trail', () => {
  it('records issue, review request, annotation, approval and role changes with who and when, per SIF and per project', async () => {
    const before = Date.now();
    const { modelId } = await issuedModel(context.app, world);
    const engineer = await signedInAgent(context.app, 'engineer');
    const round = reviewRound.parse(
      (await engineer.post(`/api/projects/${world.projectA}/models/${modelId}/reviews`).send({ revision: 1, reviewerIds: [world.userId.reviewer], message: 'Ready.' })).body,
    );
    const reviewer = await signedInAgent(context.app, 'reviewer');
    await reviewer.post(`/api/projects/${world.projectA}/models/${modelId}/annotations`).send({ revision: 1, target: { kind: 'event', itemId: 'PT-A' }, severity: 'remark', body: 'Fine.' });
    await reviewer.post(`/api/projects/${world.projectA}/reviews/${round.id}/approve`).send({ comment: 'Approved.' });
    const lead = await signedInAgent(context.app, 'lead');
    expect((await lead.put(`/api/projects/${world.projectA}/members/${world.userId.viewer}`).send({ role: 'engineer' })).status).toBe(200);
    expect((await lead.delete(`/api/projects/${world.projectA}/members/${world.userId.viewer}`)).status).toBe(204);

    const viewer = await signedInAgent(context.app, 'reviewer');
    const project = auditList.parse((await viewer.get(`/api/projects/${world.projectA}/audit`)).body);
    expect(project.map((entry) => `${entry.action} ${entry.actorDisplayName}`)).toEqual([
      'revision.issued Engineer (test)',
      'review.requested Engineer (test)',
      'annotation.created Reviewer (test)',
      'review.approved Reviewer (test)',
      'member.role-changed Lead (test)',
      'member.removed Lead (test)',
    ]);
    expect(project.every((entry) => Date.parse(entry.at) >= before - 1000 && Date.parse(entry.at) <= Date.now() + 1000)).toBe(true);
    expect(project[4]!.details).toEqual({ userId: world.userId.viewer, from: 'viewer', to: 'engineer' });

    const perSif = auditList.parse((await viewer.get(`/api/projects/${world.projectA}/audit?sifId=${world.sifDraft}`)).body);
    expect(perSif.map((entry) => entry.action)).toEqual(['revision.issued', 'review.requested', 'annotation.created', 'review.approved']);
    const otherSif = await viewer.get(`/api/projects/${world.projectA}/audit?sifId=${world.sifApproved}`);
    expect(otherSif.body).toEqual([]);
  });

  it('exports CSV with formula-looking text escaped', async () => {
    // A display name a spreadsheet would run as a formula (invented).
    await context.database.db.update(users).set({ displayName: '=HYPERLINK("http://x.invalid")' }).where(eq(users.id, world.userId.engineer));
    await issuedModel(context.app, world);
    const reviewer = await signedInAgent(context.app, 'reviewer');
    const csv = await reviewer.get(`/api/projects/${world.projectA}/audit/csv?sifId=${world.sifDraft}`);
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toContain('text/csv');
    expect(csv.headers['content-disposition']).toContain('attachment');
    const lines = csv.text.trim().split('\r\n');
    expect(lines[0]).toBe('at,who,action,summary,sif_id,details');
    expect(lines).toHaveLength(2);
    // OWASP CSV injection guidance: a text cell starting with = + - @ gets a leading apostrophe.
    const cells = lines[1]!.split(',');
    expect(cells[1]).toBe(`"'=HYPERLINK(""http://x.invalid"")"`);
    expect(cells[2]).toBe('revision.issued');
  });

  it('is read by every member and site admins; non-members get 404', async () => {
    for (const username of ['lead', 'engineer', 'reviewer', 'viewer', 'admin']) {
      expect((await (await signedInAgent(context.app, username)).get(`/api/projects/${world.projectA}/audit`)).status).toBe(200);
    }
    const outsider = await signedInAgent(context.app, 'outsider');
    expect((await outsider.get(`/api/projects/${world.projectA}/audit`)).status).toBe(404);
    expect((await outsider.get(`/api/projects/${world.projectA}/audit/csv`)).status).toBe(404);
    // The permission is checked before the query: a non-member learns nothing from a malformed one either.
    expect((await outsider.get(`/api/projects/${world.projectA}/audit?sifId=nope`)).status).toBe(404);
    const member = await signedInAgent(context.app, 'viewer');
    const malformed = await member.get(`/api/projects/${world.projectA}/audit?sifId=nope`);
    expect(malformed.status).toBe(400);
    expect(malformed.body.error.details.issues[0].path).toBe('sifId');
  });
});
