import type { Express } from 'express';
import { eq, sql } from 'drizzle-orm';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { draftConflictDetails, modelDetail, modelDraft, modelRevisionDetail, modelRevisionList } from '../../shared/api/models.js';
import { modelFile, type FaultTreeModel } from '../../shared/model-file.js';
import { projects } from '../../server/db/schema/projects.js';
import { sifs } from '../../server/db/schema/sifs.js';
import { createTestApp, signedInAgent } from './helpers/test-app.js';
import { openTestDatabase, resetDatabase, type TestDatabase } from './helpers/test-database.js';
import { seedWorld, type World } from './helpers/world.js';

/** An invented 1oo2 pair of level switches on a fictional knock-out drum (rates per hour, times in hours). */
function levelSwitchPair(name = 'KO drum high level, 1oo2 switches'): FaultTreeModel {
  return {
    format: 'proofline/model',
    version: 1,
    name,
    kind: 'fault-tree',
    mission: { hours: 87_600, demand: 'low' },
    events: [
      { id: 'LSH-A', label: 'Level switch A', lambdaDU: 2.0e-7, proofTest: { intervalHours: 8760 } },
      { id: 'LSH-B', label: 'Level switch B', lambdaDU: 2.0e-7, proofTest: { intervalHours: 8760 } },
    ],
    gates: [{ id: 'TOP', label: 'Both switches fail', type: 'and', inputs: ['LSH-A', 'LSH-B'] }],
    top: 'TOP',
    layout: { 'LSH-A': { x: 40, y: 200 } },
  };
}

let database: TestDatabase;
let app: Express;
let world: World;

beforeAll(async () => {
  database = await openTestDatabase();
  app = createTestApp(database);
});

afterAll(async () => {
  await database.close();
});

beforeEach(async () => {
  await resetDatabase(database.db);
  await database.db.execute(sql`truncate table solve_results cascade`);
  world = await seedWorld(database.db);
});

async function createModel(username = 'engineer', file: unknown = levelSwitchPair()) {
  const agent = await signedInAgent(app, username);
  const response = await agent.post(`/api/projects/${world.projectA}/sifs/${world.sifDraft}/models`).send({ file });
  return { agent, response };
}

describe('models: create and import', () => {
  it('creates a model from a valid model file and lists it under its SIF', async () => {
    const { agent, response } = await createModel();
    expect(response.status).toBe(201);
    const created = modelDetail.parse(response.body);
    expect(created).toMatchObject({ name: 'KO drum high level, 1oo2 switches', kind: 'fault-tree', draftVersion: 1, latestRevision: null, sifId: world.sifDraft });
    expect(created.draft.issues).toEqual([]);
    expect(modelFile.parse(created.draft.content)).toEqual(levelSwitchPair());
    expect(created.draft.updatedByDisplayName).toBe('Engineer (test)');

    const list = await agent.get(`/api/projects/${world.projectA}/sifs/${world.sifDraft}/models`);
    expect(list.status).toBe(200);
    expect(list.body.map((model: { id: string }) => model.id)).toEqual([created.id]);
  });

  it('refuses an invalid file with every problem named by its path in the file', async () => {
    const file = levelSwitchPair();
    (file.events[0] as { lambdaDU: number }).lambdaDU = -1;
    file.gates[0]!.inputs = ['LSH-A', 'LSH-C'];
    const { response } = await createModel('engineer', file);
    expect(response.status).toBe(400);
    expect(response.body.error.code).toBe('validation_failed');
    const paths = response.body.error.details.issues.map((issue: { path: string }) => issue.path);
    expect(paths).toContain('file.events[0].lambdaDU');
    const count = await database.db.execute(sql`select count(*)::int as n from models`);
    expect(count.rows[0]).toEqual({ n: 0 });
  });

  it('refuses a body without a file', async () => {
    const agent = await signedInAgent(app, 'engineer');
    const response = await agent.post(`/api/projects/${world.projectA}/sifs/${world.sifDraft}/models`).send({});
    expect(response.status).toBe(400);
    expect(response.body.error.details.issues[0].path).toBe('file');
  });

  it('imports a file over the draft, and refuses one of the other kind', async () => {
    const { agent, response } = await createModel();
    const id = response.body.id as string;
    const changed = levelSwitchPair('Imported from the vendor study');
    const imported = await agent.post(`/api/projects/${world.projectA}/models/${id}/import`).send({ version: 1, file: changed });
    expect(imported.status).toBe(200);
    expect(modelDraft.parse(imported.body)).toMatchObject({ version: 2, issues: [] });
    expect(imported.body.content.name).toBe('Imported from the vendor study');

    const markov = {
      format: 'proofline/model',
      version: 1,
      name: 'Chain',
      kind: 'markov',
      mission: { hours: 8760, demand: 'low' },
      states: [{ id: 'OK', initial: 1 }, { id: 'DU', down: true }],
      transitions: [{ from: 'OK', to: 'DU', rate: 1e-6 }],
    };
    expect(modelFile.safeParse(markov).success).toBe(true);
    const wrongKind = await agent.post(`/api/projects/${world.projectA}/models/${id}/import`).send({ version: 2, file: markov });
    expect(wrongKind.status).toBe(400);
    expect(wrongKind.body.error.details.issues).toContainEqual({ path: 'file.kind', message: 'must be "fault-tree", the kind of this model' });
  });

  it('exports the draft and a revision as model files', async () => {
    const { agent, response } = await createModel();
    const id = response.body.id as string;
    const draft = await agent.get(`/api/projects/${world.projectA}/models/${id}/export`);
    expect(draft.status).toBe(200);
    expect(draft.headers['content-disposition']).toContain('ko-drum-high-level-1oo2-switches-draft.json');
    expect(modelFile.parse(draft.body)).toEqual(levelSwitchPair());

    await agent.post(`/api/projects/${world.projectA}/models/${id}/revisions`).send({ draftVersion: 1, reason: 'First issue for review' }).expect(201);
    const revision = await agent.get(`/api/projects/${world.projectA}/models/${id}/export?revision=1`);
    expect(revision.status).toBe(200);
    expect(revision.headers['content-disposition']).toContain('-rev-1.json');
    expect(revision.body).toEqual(levelSwitchPair());
    expect((await agent.get(`/api/projects/${world.projectA}/models/${id}/export?revision=2`)).status).toBe(404);
    expect((await agent.get(`/api/projects/${world.projectA}/models/${id}/export?revision=x`)).status).toBe(400);
  });
});

describe('models: drafts', () => {
  it('autosaves an unfinished draft with its issues, so nothing typed is lost', async () => {
    const { agent, response } = await createModel();
    const id = response.body.id as string;
    const unfinished = { ...levelSwitchPair(), gates: [{ id: 'TOP', type: 'and', inputs: ['LSH-A', 'LSH-X'] }] };
    const saved = await agent.put(`/api/projects/${world.projectA}/models/${id}/draft`).send({ version: 1, content: unfinished });
    expect(saved.status).toBe(200);
    const draft = modelDraft.parse(saved.body);
    expect(draft.version).toBe(2);
    expect(draft.content).toEqual(unfinished);
    expect(draft.issues).toContainEqual({ path: 'gates[0].inputs[1]', message: 'gate "TOP" has unknown input "LSH-X"' });

    const read = await agent.get(`/api/projects/${world.projectA}/models/${id}`);
    expect(read.body.draft.content).toEqual(unfinished);
    const issue = await agent.post(`/api/projects/${world.projectA}/models/${id}/revisions`).send({ draftVersion: 2, reason: 'Try to issue' });
    expect(issue.status).toBe(400);
    expect(issue.body.error.details.issues.map((item: { path: string }) => item.path)).toContain('draft.gates[0].inputs[1]');
  });

  it('answers a stale save with 409 and the stored draft, and keeps the stored draft', async () => {
    const { response } = await createModel();
    const id = response.body.id as string;
    const engineer = await signedInAgent(app, 'engineer');
    const lead = await signedInAgent(app, 'lead');
    const leadsEdit = levelSwitchPair('Lead edit');
    await lead.put(`/api/projects/${world.projectA}/models/${id}/draft`).send({ version: 1, content: leadsEdit }).expect(200);

    const stale = await engineer.put(`/api/projects/${world.projectA}/models/${id}/draft`).send({ version: 1, content: levelSwitchPair('Engineer edit') });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('version_conflict');
    const details = draftConflictDetails.parse(stale.body.error.details);
    expect(details.current.version).toBe(2);
    expect(details.current.content).toEqual(leadsEdit);
    expect(details.current.updatedByDisplayName).toBe('Lead (test)');

    const read = await engineer.get(`/api/projects/${world.projectA}/models/${id}`);
    expect(read.body.draft.content.name).toBe('Lead edit');
  });

  it('lets exactly one of two concurrent saves of the same version win', async () => {
    const { response } = await createModel();
    const id = response.body.id as string;
    const engineer = await signedInAgent(app, 'engineer');
    const lead = await signedInAgent(app, 'lead');
    const results = await Promise.all([
      engineer.put(`/api/projects/${world.projectA}/models/${id}/draft`).send({ version: 1, content: levelSwitchPair('Engineer edit') }),
      lead.put(`/api/projects/${world.projectA}/models/${id}/draft`).send({ version: 1, content: levelSwitchPair('Lead edit') }),
    ]);
    expect(results.map((result) => result.status).sort()).toEqual([200, 409]);
    const winner = results.find((result) => result.status === 200)!;
    const loser = results.find((result) => result.status === 409)!;
    expect(loser.body.error.details.current.content).toEqual(winner.body.content);
    const read = await engineer.get(`/api/projects/${world.projectA}/models/${id}`);
    expect(read.body.draft).toMatchObject({ version: 2, content: winner.body.content });
  });

  it('refuses a draft that is not a JSON object, naming the field', async () => {
    const { agent, response } = await createModel();
    const saved = await agent.put(`/api/projects/${world.projectA}/models/${response.body.id}/draft`).send({ version: 1, content: [1, 2] });
    expect(saved.status).toBe(400);
    expect(saved.body.error.details.issues[0].path).toBe('content');
  });
});

describe('models: revisions', () => {
  it('issues numbered, immutable revisions with who, when and why', async () => {
    const { agent, response } = await createModel();
    const id = response.body.id as string;
    const first = await agent.post(`/api/projects/${world.projectA}/models/${id}/revisions`).send({ draftVersion: 1, reason: 'Issued for review' });
    expect(first.status).toBe(201);
    const rev1 = modelRevisionDetail.parse(first.body);
    expect(rev1).toMatchObject({ number: 1, reason: 'Issued for review', issuedById: world.userId.engineer, issuedByDisplayName: 'Engineer (test)' });
    expect(rev1.contentHash).toMatch(/^[0-9a-f]{64}$/);

    await agent.put(`/api/projects/${world.projectA}/models/${id}/draft`).send({ version: 1, content: levelSwitchPair('After review') }).expect(200);
    const stale = await agent.post(`/api/projects/${world.projectA}/models/${id}/revisions`).send({ draftVersion: 1, reason: 'Stale' });
    expect(stale.status).toBe(409);
    expect(stale.body.error.details.current.version).toBe(2);
    const second = await agent.post(`/api/projects/${world.projectA}/models/${id}/revisions`).send({ draftVersion: 2, reason: 'Review comments taken in' });
    expect(second.status).toBe(201);
    expect(second.body.number).toBe(2);
    expect(second.body.contentHash).not.toBe(rev1.contentHash);

    const list = modelRevisionList.parse((await agent.get(`/api/projects/${world.projectA}/models/${id}/revisions`)).body);
    expect(list.map((revision) => revision.number)).toEqual([2, 1]);
    const again = await agent.get(`/api/projects/${world.projectA}/models/${id}/revisions/1`);
    expect(again.body.content.name).toBe('KO drum high level, 1oo2 switches');
    expect((await agent.get(`/api/projects/${world.projectA}/models/${id}`)).body.latestRevision).toBe(2);
  });

  it('needs a reason', async () => {
    const { agent, response } = await createModel();
    const issued = await agent.post(`/api/projects/${world.projectA}/models/${response.body.id}/revisions`).send({ draftVersion: 1, reason: '  ' });
    expect(issued.status).toBe(400);
    expect(issued.body.error.details.issues[0].path).toBe('reason');
  });

  it('gives a layout-only change the same content hash (layout changes no number)', async () => {
    const { agent, response } = await createModel();
    const id = response.body.id as string;
    const rev1 = await agent.post(`/api/projects/${world.projectA}/models/${id}/revisions`).send({ draftVersion: 1, reason: 'One' });
    const moved = { ...levelSwitchPair(), layout: { 'LSH-A': { x: 400, y: 20 } } };
    await agent.put(`/api/projects/${world.projectA}/models/${id}/draft`).send({ version: 1, content: moved }).expect(200);
    const rev2 = await agent.post(`/api/projects/${world.projectA}/models/${id}/revisions`).send({ draftVersion: 2, reason: 'Moved a box' });
    expect(rev2.body.contentHash).toBe(rev1.body.contentHash);
  });
});

describe('models: roles', () => {
  it('lets every member read, and only leads and engineers change', async () => {
    const { response } = await createModel('lead');
    expect(response.status).toBe(201);
    const id = response.body.id as string;
    for (const username of ['reviewer', 'viewer']) {
      const agent = await signedInAgent(app, username);
      expect((await agent.get(`/api/projects/${world.projectA}/models/${id}`)).status).toBe(200);
      expect((await agent.get(`/api/projects/${world.projectA}/models/${id}/revisions`)).status).toBe(200);
      expect((await agent.get(`/api/projects/${world.projectA}/models/${id}/export`)).status).toBe(200);
      const save = await agent.put(`/api/projects/${world.projectA}/models/${id}/draft`).send({ version: 1, content: levelSwitchPair('No') });
      expect(save.status).toBe(403);
      expect(save.body.error.message).toContain(`as a ${username} of this project you may not`);
      expect((await agent.post(`/api/projects/${world.projectA}/models/${id}/revisions`).send({ draftVersion: 1, reason: 'No' })).status).toBe(403);
      expect((await agent.post(`/api/projects/${world.projectA}/sifs/${world.sifDraft}/models`).send({ file: levelSwitchPair() })).status).toBe(403);
    }
    const admin = await signedInAgent(app, 'admin');
    expect((await admin.get(`/api/projects/${world.projectA}/models/${id}`)).status).toBe(200);
    expect((await admin.put(`/api/projects/${world.projectA}/models/${id}/draft`).send({ version: 1, content: levelSwitchPair() })).status).toBe(403);
  });

  it('hides the models of project A from a member of project B only', async () => {
    const { response } = await createModel();
    const id = response.body.id as string;
    const outsider = await signedInAgent(app, 'outsider');
    expect((await outsider.get(`/api/projects/${world.projectA}/models/${id}`)).status).toBe(404);
    expect((await outsider.get(`/api/projects/${world.projectB}/models/${id}`)).status).toBe(404);
    expect((await outsider.get(`/api/projects/${world.projectB}/sifs/${world.sifDraft}/models`)).status).toBe(404);
    expect((await outsider.post(`/api/projects/${world.projectB}/sifs/${world.sifOfB}/models`).send({ file: levelSwitchPair() })).status).toBe(201);
  });

  it('keeps the models of an archived SIF or project read-only (409) until restored', async () => {
    const { agent, response } = await createModel();
    const id = response.body.id as string;
    await database.db.update(sifs).set({ archived: true }).where(eq(sifs.id, world.sifDraft));
    const save = await agent.put(`/api/projects/${world.projectA}/models/${id}/draft`).send({ version: 1, content: levelSwitchPair('Late edit') });
    expect(save.status).toBe(409);
    expect(save.body.error.message).toContain('archived');
    expect((await agent.get(`/api/projects/${world.projectA}/models/${id}`)).status).toBe(200);
    await database.db.update(sifs).set({ archived: false }).where(eq(sifs.id, world.sifDraft));
    await database.db.update(projects).set({ archived: true }).where(eq(projects.id, world.projectA));
    const issue = await agent.post(`/api/projects/${world.projectA}/models/${id}/revisions`).send({ draftVersion: 1, reason: 'Late issue' });
    expect(issue.status).toBe(409);
    await database.db.update(projects).set({ archived: false }).where(eq(projects.id, world.projectA));
    expect((await agent.put(`/api/projects/${world.projectA}/models/${id}/draft`).send({ version: 1, content: levelSwitchPair('Late edit') })).status).toBe(200);
  });

  it('asks for sign-in and checks ids', async () => {
    const { agent } = await createModel();
    const request = (await import('supertest')).default;
    expect((await request(app).get(`/api/projects/${world.projectA}/sifs/${world.sifDraft}/models`)).status).toBe(401);
    const badId = await agent.get(`/api/projects/${world.projectA}/models/not-an-id`);
    expect(badId.status).toBe(400);
    expect(badId.body.error.details.issues[0].path).toBe('modelId');
  });
});
