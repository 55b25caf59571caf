import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { annotation, annotationList } from '../../shared/api/annotations.js';
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

const annotationsUrl = (modelId: string) => `/api/projects/${world.projectA}/models/${modelId}/annotations`;

describe('annotations', () => {
  it('pins a thread to a gate, takes replies, resolves and re-opens it, and mails the model author', async () => {
    const { modelId } = await issuedModel(context.app, world);
    const reviewer = await signedInAgent(context.app, 'reviewer');
    const created = await reviewer.post(annotationsUrl(modelId)).send({ revision: 1, target: { kind: 'gate', itemId: 'TOP' }, severity: 'question', body: 'Why AND and not 1oo2 voting?' });
    expect(created.status).toBe(201);
    const thread = annotation.parse(created.body);
    expect(thread).toMatchObject({ status: 'open', severity: 'question', target: { kind: 'gate', itemId: 'TOP' }, outdated: false, replies: [] });

    const engineer = await signedInAgent(context.app, 'engineer');
    const replied = await engineer.post(`/api/projects/${world.projectA}/annotations/${thread.id}/replies`).send({ body: 'AND of two failures is 1oo2.' });
    expect(replied.status).toBe(201);
    expect(replied.body.replies).toMatchObject([{ authorId: world.userId.engineer, body: 'AND of two failures is 1oo2.' }]);

    const resolved = await engineer.post(`/api/projects/${world.projectA}/annotations/${thread.id}/resolve`);
    expect(resolved.body).toMatchObject({ status: 'resolved', resolvedById: world.userId.engineer });
    expect((await engineer.post(`/api/projects/${world.projectA}/annotations/${thread.id}/resolve`)).status).toBe(409);
    const reopened = await reviewer.post(`/api/projects/${world.projectA}/annotations/${thread.id}/reopen`);
    expect(reopened.body).toMatchObject({ status: 'open', resolvedById: null, resolvedAt: null });

    await receivedAtLeast(context.smtp, 2);
    // The comment goes to the model's author; the reply goes to the annotation's author.
    expect(context.smtp.received.map((mail) => mail.to.join(','))).toEqual(['engineer@proofline.test', 'reviewer@proofline.test']);
  });

  it('carries threads forward and marks them outdated when their item changed or is gone', async () => {
    const { modelId } = await issuedModel(context.app, world);
    const reviewer = await signedInAgent(context.app, 'reviewer');
    const post = (itemId: string | null, kind: string) =>
      reviewer.post(annotationsUrl(modelId)).send({ revision: 1, target: { kind, itemId }, severity: 'remark', body: `On ${itemId ?? 'the model'}` });
    expect((await post('PT-A', 'event')).status).toBe(201);
    expect((await post('PT-B', 'event')).status).toBe(201);
    expect((await post(null, 'model')).status).toBe(201);
    expect((await post('pfd-curve', 'result')).status).toBe(201);

    const next = transmitterPair(5.0e-7);
    await issueNext(context.app, world, modelId, next);
    const onTwo = annotationList.parse((await reviewer.get(annotationsUrl(modelId))).body);
    expect(onTwo.revision).toBe(2);
    // The result figure: the model changed and neither revision has a result to compare (figure-annotations.test.ts).
    expect(onTwo.annotations.map((entry) => `${entry.target.itemId} ${entry.outdated}`)).toEqual(['PT-A false', 'PT-B true', 'null false', 'pfd-curve true']);
    const onOne = annotationList.parse((await reviewer.get(`${annotationsUrl(modelId)}?revision=1`)).body);
    expect(onOne.annotations.every((entry) => !entry.outdated)).toBe(true);

    const withoutA = { ...next, events: next.events.filter((event) => event.id !== 'PT-A'), gates: [{ id: 'TOP', type: 'or' as const, inputs: ['PT-B'] }] };
    await issueNext(context.app, world, modelId, withoutA);
    const onThree = annotationList.parse((await reviewer.get(annotationsUrl(modelId))).body);
    expect(onThree.annotations.find((entry) => entry.target.itemId === 'PT-A')?.outdated).toBe(true);

    // A thread written on revision 3 is not shown on revision 1.
    await reviewer.post(annotationsUrl(modelId)).send({ revision: 3, target: { kind: 'gate', itemId: 'TOP' }, severity: 'remark', body: 'OR now' });
    expect(annotationList.parse((await reviewer.get(`${annotationsUrl(modelId)}?revision=1`)).body).annotations).toHaveLength(4);
  });

  it('filters by status and severity', async () => {
    const { modelId } = await issuedModel(context.app, world);
    const reviewer = await signedInAgent(context.app, 'reviewer');
    const must = await reviewer.post(annotationsUrl(modelId)).send({ revision: 1, target: { kind: 'event', itemId: 'PT-A' }, severity: 'must-fix', body: 'Rate source?' });
    await reviewer.post(annotationsUrl(modelId)).send({ revision: 1, target: { kind: 'event', itemId: 'PT-B' }, severity: 'question', body: 'Same make?' });
    await reviewer.post(`/api/projects/${world.projectA}/annotations/${must.body.id}/resolve`);
    const bodies = async (query: string) => annotationList.parse((await reviewer.get(`${annotationsUrl(modelId)}?${query}`)).body).annotations.map((entry) => entry.body);
    expect(await bodies('severity=must-fix')).toEqual(['Rate source?']);
    expect(await bodies('status=open')).toEqual(['Same make?']);
    expect(await bodies('status=resolved&severity=question')).toEqual([]);
    const wrong = await reviewer.get(`${annotationsUrl(modelId)}?severity=urgent`);
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.details.issues[0].path).toBe('severity');
  });

  it('refuses pins to items that do not exist or do not belong to the model kind, naming the field', async () => {
    const { modelId } = await issuedModel(context.app, world);
    const reviewer = await signedInAgent(context.app, 'reviewer');
    const missing = await reviewer.post(annotationsUrl(modelId)).send({ revision: 1, target: { kind: 'gate', itemId: 'G-9' }, severity: 'remark', body: 'x' });
    expect(missing.status).toBe(400);
    expect(missing.body.error.details.issues).toEqual([{ path: 'target.itemId', message: 'revision 1 has no gate "G-9"' }]);
    const state = await reviewer.post(annotationsUrl(modelId)).send({ revision: 1, target: { kind: 'state', itemId: 'OK' }, severity: 'remark', body: 'x' });
    expect(state.body.error.details.issues[0].path).toBe('target.kind');
    const noItem = await reviewer.post(annotationsUrl(modelId)).send({ revision: 1, target: { kind: 'event' }, severity: 'remark', body: 'x' });
    expect(noItem.body.error.details.issues).toEqual([{ path: 'target.itemId', message: 'must name the event the annotation is pinned to' }]);
    const noRevision = await reviewer.post(annotationsUrl(modelId)).send({ revision: 7, target: { kind: 'model', itemId: null }, severity: 'remark', body: 'x' });
    expect(noRevision.body.error.details.issues).toEqual([{ path: 'revision', message: 'the model has no revision 7' }]);
    const empty = await reviewer.post(annotationsUrl(modelId)).send({ revision: 1, target: { kind: 'model', itemId: null }, severity: 'remark', body: '  ' });
    expect(empty.body.error.details.issues).toEqual([{ path: 'body', message: 'must not be empty' }]);
  });

  it('viewers read but cannot annotate, reply or resolve; non-members get 404; reviewers still cannot edit the model', async () => {
    const { modelId } = await issuedModel(context.app, world);
    const reviewer = await signedInAgent(context.app, 'reviewer');
    const thread = await reviewer.post(annotationsUrl(modelId)).send({ revision: 1, target: { kind: 'model', itemId: null }, severity: 'remark', body: 'Overall fine.' });
    const viewer = await signedInAgent(context.app, 'viewer');
    expect((await viewer.get(annotationsUrl(modelId))).status).toBe(200);
    expect((await viewer.post(annotationsUrl(modelId)).send({ revision: 1, target: { kind: 'model', itemId: null }, severity: 'remark', body: 'x' })).status).toBe(403);
    expect((await viewer.post(`/api/projects/${world.projectA}/annotations/${thread.body.id}/replies`).send({ body: 'x' })).status).toBe(403);
    expect((await viewer.post(`/api/projects/${world.projectA}/annotations/${thread.body.id}/resolve`)).status).toBe(403);
    const outsider = await signedInAgent(context.app, 'outsider');
    expect((await outsider.get(annotationsUrl(modelId))).status).toBe(404);
    expect((await outsider.post(`/api/projects/${world.projectA}/annotations/${thread.body.id}/resolve`)).status).toBe(404);
    // Project B's lead cannot reach project A's annotation through project B either.
    expect((await outsider.post(`/api/projects/${world.projectB}/annotations/${thread.body.id}/resolve`)).status).toBe(404);
    const model = await reviewer.get(`/api/projects/${world.projectA}/models/${modelId}`);
    const edit = await reviewer.put(`/api/projects/${world.projectA}/models/${modelId}/draft`).send({ version: model.body.draft.version, content: transmitterPair(9e-7) });
    expect(edit.status).toBe(403);
  });
});
