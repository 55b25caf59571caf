import type { Express } from 'express';
import request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, signedInAgent } from './helpers/test-app.js';
import { openTestDatabase, resetDatabase, type TestDatabase } from './helpers/test-database.js';
import { seedWorld, type World } from './helpers/world.js';

let database: TestDatabase;
let app: Express;
let world: World;

beforeAll(async () => {
  database = await openTestDatabase();
  app = createTestApp(database);
});
afterAll(async () => database.close());
beforeEach(async () => {
  await resetDatabase(database.db);
  world = await seedWorld(database.db);
});

const sifsOfA = () => `/api/projects/${world.projectA}/sifs`;
const sifOfA = (id: string) => `/api/projects/${world.projectA}/sifs/${id}`;

const newSif = {
  tag: 'FZT-1505',
  title: 'Cooling water low flow trip',
  hazardousEvent: 'Loss of cooling water to the compressor after-cooler, high gas temperature downstream.',
  demandMode: 'low',
  target: { kind: 'pfdAvg', value: 2e-3 },
  demandRatePerYear: 0.2,
  missionHours: 87_600,
};

describe('create', () => {
  it('stores the target once and returns the derived forms', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const response = await engineer.post(sifsOfA()).send(newSif);
    expect(response.status).toBe(201);
    expect(response.body).toMatchObject({
      projectId: world.projectA,
      tag: 'FZT-1505',
      status: 'draft',
      version: 1,
      archived: false,
      ownerId: world.userId.engineer,
      ownerDisplayName: 'Engineer (test)',
      target: { kind: 'pfdAvg', value: 2e-3 },
    });
    // PFDavg 2e-3 is in the SIL 2 band [1e-3, 1e-2) of IEC 61508-1:2010 Table 2; RRF = 1 / PFDavg = 500.
    expect(response.body.derivedTarget).toMatchObject({ measure: 'pfdAvg', sil: 2, pfdAvg: 2e-3, pfh: null, limitInclusive: true });
    expect(response.body.derivedTarget.rrf).toBeCloseTo(500, 9);
    const read = await engineer.get(sifOfA(response.body.id));
    expect(read.body).toEqual(response.body);
  });

  it.each([
    ['a missing title', { title: undefined }, 'title', 'is required'],
    ['an empty tag', { tag: '  ' }, 'tag', 'must not be empty'],
    ['a tag with odd characters', { tag: 'PZT#1' }, 'tag', 'must start with a letter or digit'],
    ['a PFH target in low demand', { target: { kind: 'pfh', value: 1e-7 } }, 'target.kind', 'does not apply in low demand mode'],
    ['a PFDavg target in high demand', { demandMode: 'high', demandRatePerYear: 5, target: { kind: 'pfdAvg', value: 1e-3 } }, 'target.kind', 'give SIL or PFH'],
    ['SIL 5', { target: { kind: 'sil', value: 5 } }, 'target.value', 'must be 1, 2, 3 or 4'],
    ['an RRF of 10 (no SIL)', { target: { kind: 'rrf', value: 10 } }, 'target.value', 'greater than 10'],
    ['a negative target', { target: { kind: 'pfdAvg', value: -1 } }, 'target.value', 'greater than 0'],
    ['a text mission time', { missionHours: '8760' }, 'missionHours', 'must be a number'],
    ['a zero mission time', { missionHours: 0 }, 'missionHours', 'greater than 0'],
    ['two demands a year in low demand', { demandRatePerYear: 2 }, 'demandRatePerYear', 'at most one demand per year'],
    ['an unknown demand mode', { demandMode: 'sometimes' }, 'demandMode', 'must be one of low, high, continuous'],
    ['an unknown field', { colour: 'red' }, 'colour', 'is not a known field'],
  ])('refuses %s with 400 naming the field', async (_name, change, path, message) => {
    const engineer = await signedInAgent(app, 'engineer');
    const response = await engineer.post(sifsOfA()).send({ ...newSif, ...change });
    expect(response.status).toBe(400);
    expect(response.body.error.code).toBe('validation_failed');
    expect(response.body.error.message).toContain(path);
    const issue = response.body.error.details.issues.find((candidate: { path: string }) => candidate.path === path);
    expect(issue?.message).toContain(message);
    expect((await engineer.get(sifsOfA())).body.total).toBe(3);
  });

  it('refuses a duplicate tag in the project (case-insensitive) with 409 naming the tag, but allows it in another project', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const duplicate = await engineer.post(sifsOfA()).send({ ...newSif, tag: 'pzt-1101' });
    expect(duplicate.status).toBe(409);
    expect(duplicate.body.error.code).toBe('already_exists');
    expect(duplicate.body.error.details.issues[0].path).toBe('tag');
    const outsider = await signedInAgent(app, 'outsider');
    expect((await outsider.post(`/api/projects/${world.projectB}/sifs`).send({ ...newSif, tag: 'PZT-1101' })).status).toBe(201);
  });

  it('accepts an owner who is a lead or engineer of the project, and refuses a reviewer', async () => {
    const lead = await signedInAgent(app, 'lead');
    const ownedByLead = await lead.post(sifsOfA()).send({ ...newSif, ownerId: world.userId.lead });
    expect(ownedByLead.body.ownerId).toBe(world.userId.lead);
    const ownedByReviewer = await lead.post(sifsOfA()).send({ ...newSif, tag: 'FZT-1506', ownerId: world.userId.reviewer });
    expect(ownedByReviewer.status).toBe(400);
    expect(ownedByReviewer.body.error.details.issues[0].path).toBe('ownerId');
  });
});

describe('optimistic versions', () => {
  it('refuses a stale save with 409, returns the stored record, and keeps the first save', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const lead = await signedInAgent(app, 'lead');
    const first = await engineer.patch(sifOfA(world.sifDraft)).send({ version: 1, title: 'Title from the engineer' });
    expect(first.status).toBe(200);
    expect(first.body.version).toBe(2);

    const stale = await lead.patch(sifOfA(world.sifDraft)).send({ version: 1, title: 'Title from the lead', missionHours: 43_800 });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('version_conflict');
    expect(stale.body.error.details.current).toEqual(first.body);

    const stored = await lead.get(sifOfA(world.sifDraft));
    expect(stored.body.title).toBe('Title from the engineer');
    expect(stored.body.missionHours).toBe(87_600);

    const merged = await lead.patch(sifOfA(world.sifDraft)).send({ version: 2, title: 'Title from the lead', missionHours: 43_800 });
    expect(merged.status).toBe(200);
    expect(merged.body).toMatchObject({ version: 3, title: 'Title from the lead', missionHours: 43_800 });
  });

  it('lets exactly one of two simultaneous saves of the same version win', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const lead = await signedInAgent(app, 'lead');
    const results = await Promise.all([
      engineer.patch(sifOfA(world.sifDraft)).send({ version: 1, title: 'First' }),
      lead.patch(sifOfA(world.sifDraft)).send({ version: 1, title: 'Second' }),
    ]);
    expect(results.map((response) => response.status).sort()).toEqual([200, 409]);
    const winner = results.find((response) => response.status === 200);
    expect((await lead.get(sifOfA(world.sifDraft))).body.title).toBe(winner?.body.title);
  });

  it('checks a new demand mode against the stored target', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const response = await engineer.patch(sifOfA(world.sifDraft)).send({ version: 1, demandMode: 'high', demandRatePerYear: 3 });
    expect(response.status).toBe(200);
    // A SIL 2 target in high demand is judged by PFH: SIL 2 band [1e-7, 1e-6) per hour, IEC 61508-1:2010 Table 3.
    expect(response.body.derivedTarget).toMatchObject({ measure: 'pfh', sil: 2, pfh: 1e-6, pfdAvg: null, limitInclusive: false });
    const wrong = await engineer.patch(sifOfA(world.sifDraft)).send({ version: 2, target: { kind: 'rrf', value: 100 } });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.details.issues[0].path).toBe('target.kind');
  });
});

describe('status', () => {
  it('goes draft -> in-review (engineer) -> approved (reviewer)', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const reviewer = await signedInAgent(app, 'reviewer');
    expect((await engineer.patch(sifOfA(world.sifDraft)).send({ version: 1, status: 'in-review' })).body.status).toBe('in-review');
    const approved = await reviewer.patch(sifOfA(world.sifDraft)).send({ version: 2, status: 'approved' });
    expect(approved.status).toBe(200);
    expect(approved.body.status).toBe('approved');
  });

  it('refuses an engineer approving (403), a reviewer editing content (403) and draft -> approved (400 on status)', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const reviewer = await signedInAgent(app, 'reviewer');
    const selfApproval = await engineer.patch(sifOfA(world.sifInReview)).send({ version: 1, status: 'approved' });
    expect(selfApproval.status).toBe(403);
    const reviewerEdit = await reviewer.patch(sifOfA(world.sifInReview)).send({ version: 1, title: 'Changed by a reviewer' });
    expect(reviewerEdit.status).toBe(403);
    const skip = await reviewer.patch(sifOfA(world.sifDraft)).send({ version: 1, status: 'approved' });
    expect(skip.status).toBe(400);
    expect(skip.body.error.details.issues[0].path).toBe('status');
  });

  it('freezes an approved SIF: content changes need status draft in the same save', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const frozen = await engineer.patch(sifOfA(world.sifApproved)).send({ version: 1, title: 'Quietly changed' });
    expect(frozen.status).toBe(409);
    expect(frozen.body.error.code).toBe('conflict');
    expect(frozen.body.error.message).toContain('approved');
    const reopened = await engineer.patch(sifOfA(world.sifApproved)).send({ version: 1, status: 'draft', title: 'Openly changed' });
    expect(reopened.status).toBe(200);
    expect(reopened.body).toMatchObject({ status: 'draft', title: 'Openly changed', version: 2 });
  });
});

describe('archive', () => {
  it('hides archived SIFs from the list unless asked, refuses edits, and restores them', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const archived = await engineer.post(`${sifOfA(world.sifDraft)}/archive`);
    expect(archived.body).toMatchObject({ archived: true, version: 2 });
    expect((await engineer.get(sifsOfA())).body.total).toBe(2);
    expect((await engineer.get(`${sifsOfA()}?includeArchived=true`)).body.total).toBe(3);
    expect((await engineer.patch(sifOfA(world.sifDraft)).send({ version: 2, title: 'x' })).status).toBe(409);
    const restored = await engineer.post(`${sifOfA(world.sifDraft)}/archive`).send({ archived: false });
    expect(restored.body).toMatchObject({ archived: false, version: 3 });
  });

  it('makes the register of an archived project read-only until restored', async () => {
    const lead = await signedInAgent(app, 'lead');
    expect((await lead.post(`/api/projects/${world.projectA}/archive`)).body.archived).toBe(true);
    expect((await lead.get(sifsOfA())).status).toBe(200);
    const refused = await lead.post(sifsOfA()).send(newSif);
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toContain('archived');
    await lead.post(`/api/projects/${world.projectA}/archive`).send({ archived: false });
    expect((await lead.post(sifsOfA()).send(newSif)).status).toBe(201);
  });
});

describe('list', () => {
  async function seedMany(agent: Awaited<ReturnType<typeof signedInAgent>>) {
    for (let index = 1; index <= 12; index += 1) {
      const response = await agent.post(sifsOfA()).send({
        ...newSif,
        tag: `XZS-${String(index).padStart(2, '0')}`,
        title: index % 2 === 0 ? `Even trip ${index}` : `Odd trip ${index}`,
        target: { kind: 'sil', value: (index % 3) + 1 },
      });
      expect(response.status).toBe(201);
    }
  }

  it('pages, sorts and searches', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    await seedMany(engineer);
    const page2 = await engineer.get(`${sifsOfA()}?search=xzs&sort=tag&order=desc&page=2&pageSize=5`);
    expect(page2.status).toBe(200);
    expect(page2.body).toMatchObject({ total: 12, page: 2, pageSize: 5 });
    expect(page2.body.items.map((sif: { tag: string }) => sif.tag)).toEqual(['XZS-07', 'XZS-06', 'XZS-05', 'XZS-04', 'XZS-03']);
    const even = await engineer.get(`${sifsOfA()}?search=EVEN&pageSize=100`);
    expect(even.body.total).toBe(6);
    const bySil = await engineer.get(`${sifsOfA()}?search=xzs&sort=sil&order=desc&pageSize=100`);
    const sils = bySil.body.items.map((sif: { derivedTarget: { sil: number } }) => sif.derivedTarget.sil);
    expect(sils).toEqual([...sils].sort((a, b) => b - a));
    expect(sils[0]).toBe(3);
    const percent = await engineer.get(`${sifsOfA()}?search=${encodeURIComponent('%')}`);
    expect(percent.body.total).toBe(0);
  });

  it('filters by status', async () => {
    const viewer = await signedInAgent(app, 'viewer');
    const inReview = await viewer.get(`${sifsOfA()}?status=in-review`);
    expect(inReview.body.items.map((sif: { tag: string }) => sif.tag)).toEqual(['LZT-1204']);
  });

  it.each([
    ['page=0', 'page', 'must be 1 or more'],
    ['pageSize=500', 'pageSize', 'must be 100 or less'],
    ['page=two', 'page', 'must be a whole number'],
    ['sort=colour', 'sort', 'must be one of'],
    ['order=up', 'order', 'asc or desc'],
    ['status=done', 'status', 'must be one of draft'],
    ['includeArchived=yes', 'includeArchived', '"true" or "false"'],
  ])('refuses the query %s with 400 naming %s', async (query, path, message) => {
    const viewer = await signedInAgent(app, 'viewer');
    const response = await viewer.get(`${sifsOfA()}?${query}`);
    expect(response.status).toBe(400);
    expect(response.body.error.details.issues[0]).toMatchObject({ path });
    expect(response.body.error.details.issues[0].message).toContain(message);
  });

  it('answers 404 for a SIF id of another project, even to its members', async () => {
    const lead = await signedInAgent(app, 'lead');
    expect((await lead.get(sifOfA(world.sifOfB))).status).toBe(404);
    const unknownRoute = await request(app).get('/api/projects');
    expect(unknownRoute.status).toBe(401);
  });
});
