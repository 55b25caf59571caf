import { eq } from 'drizzle-orm';
import request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { annotationReplies, annotations, reviewRounds } from '../../server/db/schema/reviews.js';
import { projects } from '../../server/db/schema/projects.js';
import { signedInAgent } from './helpers/test-app.js';
import type { TestDatabase } from './helpers/test-database.js';
import type { World, WorldUsername } from './helpers/world.js';
import { issuedModel, openReviewWorld, resetReviewWorld, type ReviewWorld } from './reviews-helpers.js';

// Every peer-review route for every caller, with valid bodies, allowed and refused, and a probe of the
// stored state: it changes after an allowed call and stays as it was after a refused one. The rules are
// ours (shared/api/index.ts, peer review). The world: project A with a lead, an engineer, a reviewer and
// a viewer; "admin" is a site admin who is not a member of A; "outsider" leads project B only (404 on A).
// Each case starts from: a model of A's draft SIF made and issued (revision 1) by the engineer, an open
// review round asked by the engineer with the reviewer chosen, and one open remark by the reviewer on gate TOP.

type Caller = WorldUsername | 'anonymous';
const CALLERS: readonly Caller[] = ['anonymous', 'admin', 'lead', 'engineer', 'reviewer', 'viewer', 'outsider'];

interface Fixture {
  readonly world: World;
  readonly modelId: string;
  readonly roundId: string | null;
  readonly annotationId: string;
}

interface RouteCase {
  readonly name: string;
  readonly method: 'get' | 'post' | 'put';
  readonly path: (fixture: Fixture) => string;
  readonly body?: (fixture: Fixture) => object;
  readonly expected: Record<WorldUsername, number>;
  /** Leave the review round out (to ask for one), or resolve the remark first (to re-open it). */
  readonly arrange?: { readonly noRound?: boolean; readonly resolved?: boolean };
  readonly probe?: (database: TestDatabase, fixture: Fixture) => Promise<unknown>;
}

const everyone = (status: number): Record<WorldUsername, number> => ({ admin: status, lead: status, engineer: status, reviewer: status, viewer: status, outsider: status });
/** Members (and the site admin) read; the outsider gets 404 as if project A did not exist. */
const readers = (status: number): Record<WorldUsername, number> => ({ ...everyone(status), outsider: 404 });
/** Leads, engineers and reviewers write; viewers and the site admin (no project role) 403; outsider 404. */
const annotators = (status: number): Record<WorldUsername, number> => ({ admin: 403, lead: status, engineer: status, reviewer: status, viewer: 403, outsider: 404 });
/** Only the reviewer chosen for the round, who is not its author. */
const chosenReviewer = (status: number): Record<WorldUsername, number> => ({ admin: 403, lead: 403, engineer: 403, reviewer: status, viewer: 403, outsider: 404 });

const base = (fixture: Fixture) => `/api/projects/${fixture.world.projectA}`;
const roundOf = async ({ db }: TestDatabase, fixture: Fixture) => (await db.select().from(reviewRounds).where(eq(reviewRounds.modelId, fixture.modelId))).map((row) => row.status);
const threadOf = async ({ db }: TestDatabase, fixture: Fixture) => (await db.select().from(annotations).where(eq(annotations.id, fixture.annotationId)))[0]?.status;
const threadCount = async ({ db }: TestDatabase, fixture: Fixture) => (await db.select().from(annotations).where(eq(annotations.modelId, fixture.modelId))).length;

const ROUTES: readonly RouteCase[] = [
  { name: 'GET /api/reviews/queue', method: 'get', path: () => '/api/reviews/queue', expected: everyone(200) },
  {
    name: 'POST .../models/:modelId/reviews',
    method: 'post',
    path: (f) => `${base(f)}/models/${f.modelId}/reviews`,
    body: (f) => ({ revision: 1, reviewerIds: [f.world.userId.reviewer], message: 'Please review.' }),
    arrange: { noRound: true },
    expected: { admin: 403, lead: 201, engineer: 201, reviewer: 403, viewer: 403, outsider: 404 },
    probe: roundOf,
  },
  { name: 'GET .../sifs/:sifId/reviews', method: 'get', path: (f) => `${base(f)}/sifs/${f.world.sifDraft}/reviews`, expected: readers(200) },
  { name: 'GET .../reviews/:roundId', method: 'get', path: (f) => `${base(f)}/reviews/${f.roundId}`, expected: readers(200) },
  {
    name: 'POST .../reviews/:roundId/approve',
    method: 'post',
    path: (f) => `${base(f)}/reviews/${f.roundId}/approve`,
    body: () => ({ comment: 'Fine.' }),
    expected: chosenReviewer(200),
    probe: roundOf,
  },
  {
    name: 'POST .../reviews/:roundId/return',
    method: 'post',
    path: (f) => `${base(f)}/reviews/${f.roundId}/return`,
    body: () => ({ comment: 'See the remark on TOP.' }),
    expected: chosenReviewer(200),
    probe: roundOf,
  },
  { name: 'GET .../models/:modelId/diff', method: 'get', path: (f) => `${base(f)}/models/${f.modelId}/diff?from=1&to=1`, expected: readers(200) },
  { name: 'GET .../models/:modelId/annotations', method: 'get', path: (f) => `${base(f)}/models/${f.modelId}/annotations`, expected: readers(200) },
  {
    name: 'POST .../models/:modelId/annotations (gate)',
    method: 'post',
    path: (f) => `${base(f)}/models/${f.modelId}/annotations`,
    body: () => ({ revision: 1, target: { kind: 'event', itemId: 'PT-A' }, severity: 'question', body: 'Rate source?' }),
    expected: annotators(201),
    probe: threadCount,
  },
  {
    name: 'POST .../models/:modelId/annotations (result figure)',
    method: 'post',
    path: (f) => `${base(f)}/models/${f.modelId}/annotations`,
    body: () => ({ revision: 1, target: { kind: 'result', itemId: 'cut-sets' }, severity: 'must-fix', body: 'Show the CCF cut set.' }),
    expected: annotators(201),
    probe: threadCount,
  },
  {
    name: 'POST .../models/:modelId/annotations (whole model)',
    method: 'post',
    path: (f) => `${base(f)}/models/${f.modelId}/annotations`,
    body: () => ({ revision: 1, target: { kind: 'model', itemId: null }, severity: 'remark', body: 'Overall fine.' }),
    expected: annotators(201),
    probe: threadCount,
  },
  {
    name: 'POST .../annotations/:annotationId/replies',
    method: 'post',
    path: (f) => `${base(f)}/annotations/${f.annotationId}/replies`,
    body: () => ({ body: 'Answered.' }),
    expected: annotators(201),
    probe: async ({ db }, f) => (await db.select().from(annotationReplies).where(eq(annotationReplies.annotationId, f.annotationId))).length,
  },
  { name: 'POST .../annotations/:annotationId/resolve', method: 'post', path: (f) => `${base(f)}/annotations/${f.annotationId}/resolve`, expected: annotators(200), probe: threadOf },
  {
    name: 'POST .../annotations/:annotationId/reopen',
    method: 'post',
    path: (f) => `${base(f)}/annotations/${f.annotationId}/reopen`,
    arrange: { resolved: true },
    expected: annotators(200),
    probe: threadOf,
  },
  { name: 'GET .../audit', method: 'get', path: (f) => `${base(f)}/audit`, expected: readers(200) },
  { name: 'GET .../audit/csv', method: 'get', path: (f) => `${base(f)}/audit/csv?sifId=${f.world.sifDraft}`, expected: readers(200) },
  { name: 'GET /api/admin/mail', method: 'get', path: () => '/api/admin/mail', expected: { ...everyone(403), admin: 200 } },
  { name: 'GET /api/me/notices', method: 'get', path: () => '/api/me/notices', expected: everyone(200) },
  { name: 'PUT /api/me/notices', method: 'put', path: () => '/api/me/notices', body: () => ({ notices: false }), expected: everyone(200) },
];

let context: Omit<ReviewWorld, 'world'>;

beforeAll(async () => {
  context = await openReviewWorld();
});

afterAll(async () => {
  await context.smtp.close();
  await context.database.close();
});

async function arrange(world: World, options: RouteCase['arrange'] = {}): Promise<Fixture> {
  const { agent: engineer, modelId } = await issuedModel(context.app, world);
  let roundId: string | null = null;
  if (!options.noRound) {
    const round = await engineer.post(`/api/projects/${world.projectA}/models/${modelId}/reviews`).send({ revision: 1, reviewerIds: [world.userId.reviewer], message: 'Ready.' });
    if (round.status !== 201) throw new Error(`round not opened: ${JSON.stringify(round.body)}`);
    roundId = round.body.id as string;
  }
  const reviewer = await signedInAgent(context.app, 'reviewer');
  const thread = await reviewer.post(`/api/projects/${world.projectA}/models/${modelId}/annotations`).send({ revision: 1, target: { kind: 'gate', itemId: 'TOP' }, severity: 'remark', body: 'Why AND?' });
  if (thread.status !== 201) throw new Error(`annotation not made: ${JSON.stringify(thread.body)}`);
  if (options.resolved) await reviewer.post(`/api/projects/${world.projectA}/annotations/${thread.body.id}/resolve`);
  return { world, modelId, roundId, annotationId: thread.body.id as string };
}

describe.each(ROUTES)('$name', (route) => {
  let fixture: Fixture;

  beforeEach(async () => {
    fixture = await arrange(await resetReviewWorld(context), route.arrange);
  });

  it.each(CALLERS)('as %s', async (caller) => {
    const client = caller === 'anonymous' ? request(context.app) : await signedInAgent(context.app, caller);
    const before = await route.probe?.(context.database, fixture);
    let call = client[route.method](route.path(fixture));
    if (route.body) call = call.send(route.body(fixture));
    const response = await call;
    const expected = caller === 'anonymous' ? 401 : route.expected[caller];
    expect(response.status, JSON.stringify(response.body)).toBe(expected);
    if (expected >= 400) {
      expect(response.body.error.code).toBe({ 401: 'unauthenticated', 403: 'forbidden', 404: 'not_found' }[expected]);
      expect(response.body.error.message).toMatch(/\w/);
    }
    if (route.probe) {
      const after = await route.probe(context.database, fixture);
      if (expected < 400) expect(after).not.toEqual(before);
      else expect(after).toEqual(before);
    }
  });
});

describe('an archived project', () => {
  it('keeps its review record readable and refuses every review write with 409, storing nothing', async () => {
    const world = await resetReviewWorld(context);
    const fixture = await arrange(world);
    await context.database.db.update(projects).set({ archived: true }).where(eq(projects.id, world.projectA));
    const reviewer = await signedInAgent(context.app, 'reviewer');
    const engineer = await signedInAgent(context.app, 'engineer');
    const writes = [
      reviewer.post(`${base(fixture)}/models/${fixture.modelId}/annotations`).send({ revision: 1, target: { kind: 'result', itemId: 'verdict' }, severity: 'remark', body: 'x' }),
      reviewer.post(`${base(fixture)}/annotations/${fixture.annotationId}/replies`).send({ body: 'x' }),
      engineer.post(`${base(fixture)}/annotations/${fixture.annotationId}/resolve`),
      reviewer.post(`${base(fixture)}/reviews/${fixture.roundId}/approve`).send({ comment: '' }),
      reviewer.post(`${base(fixture)}/reviews/${fixture.roundId}/return`).send({ comment: 'x' }),
    ];
    for (const write of writes) {
      const response = await write;
      expect(response.status, JSON.stringify(response.body)).toBe(409);
      expect(response.body.error.message).toMatch(/archived/);
    }
    expect(await threadCount(context.database, fixture)).toBe(1);
    expect(await threadOf(context.database, fixture)).toBe('open');
    expect(await roundOf(context.database, fixture)).toEqual(['open']);
    expect((await reviewer.get(`${base(fixture)}/models/${fixture.modelId}/annotations`)).status).toBe(200);
  });
});
