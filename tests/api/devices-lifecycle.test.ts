import type { Express } from 'express';
import { eq } from 'drizzle-orm';
import request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { deviceDetail, deviceList, deviceUsage, importPreview } from '../../shared/api/devices.js';
import { modelDetail } from '../../shared/api/models.js';
import { devices } from '../../server/db/schema/devices.js';
import { models } from '../../server/db/schema/models.js';
import { addUserWithoutProject, PDF_BYTES, transmitterFields } from './devices-helpers.js';
import { createTestApp, signedInAgent } from './helpers/test-app.js';
import { openTestDatabase, resetDatabase, type TestDatabase } from './helpers/test-database.js';
import { seedWorld, type World, type WorldUsername } from './helpers/world.js';
import { APP_REQUEST_HEADER } from '../../shared/api/request-header.js';

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
  await addUserWithoutProject(database.db);
});

async function createDevice(fields = transmitterFields()) {
  const agent = await signedInAgent(app, 'engineer');
  const response = await agent.post('/api/devices').send(fields);
  expect(response.status).toBe(201);
  return deviceDetail.parse(response.body);
}

/** A one-event fault tree whose event links to `version` of the record (figures as the link fills them). */
function linkedFile(name: string, deviceId: string, version: number, overrides?: { field: string; reason: string }[]) {
  const fields = transmitterFields();
  return {
    format: 'proofline/model',
    version: 1,
    name,
    kind: 'fault-tree',
    mission: { hours: 87_600, demand: 'low' },
    events: [
      {
        id: 'PT-A',
        label: 'Separator pressure transmitter A',
        lambdaDU: fields.lambdaDU,
        lambdaDD: fields.lambdaDD,
        lambdaS: fields.lambdaSU + fields.lambdaSD,
        deviceType: 'B',
        systematicCapability: 2,
        proofTest: { intervalHours: 8760, coverage: 0.9 },
        device: { id: deviceId, version, ...(overrides ? { overrides } : {}) },
      },
    ],
    gates: [],
    top: 'PT-A',
  };
}

async function createModel(username: WorldUsername, projectId: string, sifId: string, file: object) {
  const agent = await signedInAgent(app, username);
  const response = await agent.post(`/api/projects/${projectId}/sifs/${sifId}/models`).send({ file });
  expect(response.status, JSON.stringify(response.body)).toBe(201);
  return { agent, model: modelDetail.parse(response.body) };
}

const deviceRow = async (id: string) => (await database.db.select().from(devices).where(eq(devices.id, id)))[0];

describe('device library: where a record is used', () => {
  it('lists the drafts, issued revisions and events linking to each version, only in projects the caller may read', async () => {
    const device = await createDevice();
    const { agent, model } = await createModel('engineer', world.projectA, world.sifDraft, linkedFile('Separator PT, 1oo1', device.id, 1, [{ field: 'lambdaDU', reason: 'Site data (invented)' }]));
    const issued = await agent.post(`/api/projects/${world.projectA}/models/${model.id}/revisions`).send({ draftVersion: 1, reason: 'First issue' });
    expect(issued.status, JSON.stringify(issued.body)).toBe(201);
    await agent.put(`/api/devices/${device.id}`).send({ ...transmitterFields({ lambdaDU: 8e-8 }), basedOnVersion: 1, changeNote: 'New field data' });
    const saved = await agent.put(`/api/projects/${world.projectA}/models/${model.id}/draft`).send({ version: 1, content: linkedFile('Separator PT, 1oo1', device.id, 2) });
    expect(saved.status, JSON.stringify(saved.body)).toBe(200);
    await createModel('outsider', world.projectB, world.sifOfB, linkedFile('Project B secret model', device.id, 1));

    const forViewer = await (await signedInAgent(app, 'viewer')).get(`/api/devices/${device.id}/usage`);
    expect(forViewer.status).toBe(200);
    const usage = deviceUsage.parse(forViewer.body);
    expect(usage.currentVersion).toBe(2);
    expect(usage.entries.map((entry) => [entry.modelName, entry.place, entry.placeNumber, entry.eventId, entry.linkedVersion, entry.overriddenFields])).toEqual([
      ['Separator PT, 1oo1', 'draft', 2, 'PT-A', 2, []],
      ['Separator PT, 1oo1', 'revision', 1, 'PT-A', 1, ['lambdaDU']],
    ]);
    expect(usage.entries[0]).toMatchObject({ projectId: world.projectA, sifId: world.sifDraft, modelId: model.id, eventLabel: 'Separator pressure transmitter A' });
    // Nothing of project B reaches a member of A only: no id, no name.
    expect(JSON.stringify(forViewer.body)).not.toContain(world.projectB);
    expect(JSON.stringify(forViewer.body)).not.toContain('Project B secret model');

    const forOutsider = deviceUsage.parse((await (await signedInAgent(app, 'outsider')).get(`/api/devices/${device.id}/usage`)).body);
    expect(forOutsider.entries.map((entry) => [entry.projectId, entry.modelName])).toEqual([[world.projectB, 'Project B secret model']]);
    const forAdmin = deviceUsage.parse((await (await signedInAgent(app, 'admin')).get(`/api/devices/${device.id}/usage`)).body);
    expect(forAdmin.entries).toHaveLength(3);

    const loner = await signedInAgent(app, 'loner');
    expect((await loner.get(`/api/devices/${device.id}/usage`)).status).toBe(404);
    expect((await agent.get('/api/devices/0b7f6d1e-4c1a-4a53-9a53-6f0f3c2b1aff/usage')).status).toBe(404);
  });
});

describe('device library: archive, restore and delete', () => {
  it('hides an archived record from the list and pickers, still resolves it for links, and refuses changes until restored', async () => {
    const device = await createDevice();
    const engineer = await signedInAgent(app, 'engineer');
    const archived = await engineer.post(`/api/devices/${device.id}/archive`);
    expect(archived.status).toBe(200);
    expect(deviceDetail.parse(archived.body).archivedAt).not.toBeNull();
    expect((await deviceRow(device.id))!.archivedById).toBe(world.userId.engineer);

    const viewer = await signedInAgent(app, 'viewer');
    expect((await viewer.get('/api/devices')).body).toEqual([]);
    expect((await viewer.get('/api/devices').query({ search: 'QP-400' })).body).toEqual([]);
    expect(deviceList.parse((await viewer.get('/api/devices').query({ archived: 'archived' })).body).map((item) => item.id)).toEqual([device.id]);
    // A model's links resolve: by id, by the ids list, and its versions.
    expect(deviceList.parse((await viewer.get('/api/devices').query({ ids: device.id })).body)[0]!.archivedAt).not.toBeNull();
    expect((await viewer.get(`/api/devices/${device.id}`)).status).toBe(200);
    expect((await viewer.get(`/api/devices/${device.id}/versions/1`)).status).toBe(200);
    const bad = await viewer.get('/api/devices').query({ archived: 'sometimes' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.issues[0]).toEqual({ path: 'archived', message: 'must be one of active, all, archived' });

    const edit = await engineer.put(`/api/devices/${device.id}`).send({ ...transmitterFields({ lambdaDU: 9e-8 }), basedOnVersion: 1, changeNote: 'edit' });
    expect(edit.status).toBe(409);
    expect(edit.body.error.message).toContain('archived; restore it before you edit it');
    const upload = await engineer.post(`/api/devices/${device.id}/evidence`).set(APP_REQUEST_HEADER, '1').attach('file', PDF_BYTES, { filename: 'certificate.pdf', contentType: 'application/pdf' });
    expect(upload.status).toBe(409);
    const csv = `maker,model,category,lambdaDU,lambdaDD,lambdaSU,lambdaSD,architectureType,hardwareFaultTolerance,sourceKind,sourceReference\n${transmitterFields().maker},${transmitterFields().model},transmitter,9e-8,3.6e-7,1e-7,2e-7,B,0,assessment-report,Report (invented)\n`;
    const preview = importPreview.parse((await engineer.post('/api/devices/import/preview').send({ csv, rateUnit: 'perHour' })).body);
    expect(preview.rows[0]!.outcome).toBe('invalid');
    expect(preview.rows[0]!.errors).toContainEqual({ path: 'model', message: `"${transmitterFields().maker} ${transmitterFields().model}" is archived in the library; restore it before importing a new version` });
    expect((await deviceRow(device.id))!.currentVersion).toBe(1);

    const restored = await engineer.post(`/api/devices/${device.id}/restore`);
    expect(restored.status).toBe(200);
    expect(deviceDetail.parse(restored.body).archivedAt).toBeNull();
    expect(deviceList.parse((await viewer.get('/api/devices')).body).map((item) => item.id)).toEqual([device.id]);
    expect((await engineer.put(`/api/devices/${device.id}`).send({ ...transmitterFields({ lambdaDU: 9e-8 }), basedOnVersion: 1, changeNote: 'edit' })).status).toBe(200);
  });

  it('refuses to delete a record while any model links to it, naming only the models the caller may see', async () => {
    const device = await createDevice();
    const { agent } = await createModel('engineer', world.projectA, world.sifDraft, linkedFile('Separator PT, 1oo1', device.id, 1));
    const { agent: outsider, model: secret } = await createModel('outsider', world.projectB, world.sifOfB, linkedFile('Project B secret model', device.id, 1));

    const refused = await agent.delete(`/api/devices/${device.id}`);
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toBe(
      'this record cannot be deleted while models link to it (drafts or issued revisions): "Separator PT, 1oo1" of PZT-1101, models in projects you are not a member of; archive it instead, which hides it from the pickers and keeps those links',
    );
    expect(refused.body.error.message).not.toContain('secret');
    expect(await deviceRow(device.id)).toBeDefined();

    // Only project B's issued revision still links once its draft drops the link.
    await outsider.post(`/api/projects/${world.projectB}/models/${secret.id}/revisions`).send({ draftVersion: 1, reason: 'Issued with the link' });
    const unlinked = linkedFile('Project B secret model', device.id, 1);
    delete (unlinked.events[0] as { device?: unknown }).device;
    expect((await outsider.put(`/api/projects/${world.projectB}/models/${secret.id}/draft`).send({ version: 1, content: unlinked })).status).toBe(200);
    await database.db.delete(models).where(eq(models.projectId, world.projectA));
    const stillRefused = await outsider.delete(`/api/devices/${device.id}`);
    expect(stillRefused.status).toBe(409);
    expect(stillRefused.body.error.message).toContain('"Project B secret model" of PZT-9001');
  });

  it('deletes an unused record with its versions and evidence', async () => {
    const device = await createDevice();
    const engineer = await signedInAgent(app, 'engineer');
    const upload = await engineer.post(`/api/devices/${device.id}/evidence`).set(APP_REQUEST_HEADER, '1').attach('file', PDF_BYTES, { filename: 'certificate.pdf', contentType: 'application/pdf' });
    expect(upload.status).toBe(201);
    const removed = await engineer.delete(`/api/devices/${device.id}`);
    expect(removed.status).toBe(204);
    expect(await deviceRow(device.id)).toBeUndefined();
    expect((await engineer.get(`/api/devices/${device.id}/versions/1`)).status).toBe(404);
    expect((await engineer.delete(`/api/devices/${device.id}`)).status).toBe(404);
  });

  const CALLERS = ['admin', 'lead', 'engineer', 'reviewer', 'viewer', 'outsider', 'loner'] as const;
  // Editors: site admins and leads or engineers of an active project (outsider leads project B); readers
  // who may not edit get 403; a user of no project gets 404 (shared/api/devices.ts).
  const EXPECTED: Record<(typeof CALLERS)[number], 'allowed' | 403 | 404> = { admin: 'allowed', lead: 'allowed', engineer: 'allowed', reviewer: 403, viewer: 403, outsider: 'allowed', loner: 404 };

  it.each(CALLERS)('archive, restore and delete as %s: allowed to editors only, and a refused call changes nothing', async (caller) => {
    const device = await createDevice();
    const client = await signedInAgent(app, caller);
    const expected = EXPECTED[caller];
    const archive = await client.post(`/api/devices/${device.id}/archive`);
    expect(archive.status).toBe(expected === 'allowed' ? 200 : expected);
    expect((await deviceRow(device.id))!.archivedAt === null).toBe(expected !== 'allowed');
    if (expected !== 'allowed') {
      expect(archive.body.error.code).toBe(expected === 403 ? 'forbidden' : 'not_found');
      await (await signedInAgent(app, 'engineer')).post(`/api/devices/${device.id}/archive`);
    }
    const restore = await client.post(`/api/devices/${device.id}/restore`);
    expect(restore.status).toBe(expected === 'allowed' ? 200 : expected);
    expect((await deviceRow(device.id))!.archivedAt === null).toBe(expected === 'allowed');
    const remove = await client.delete(`/api/devices/${device.id}`);
    expect(remove.status).toBe(expected === 'allowed' ? 204 : expected);
    expect(await deviceRow(device.id)).toEqual(expected === 'allowed' ? undefined : expect.objectContaining({ id: device.id }));
    // Usage is open to every reader: 200 for those who could not delete it, 404 once deleted or for a user of no project.
    const usage = await client.get(`/api/devices/${device.id}/usage`);
    expect(usage.status).toBe(expected === 403 ? 200 : 404);
  });

  it('answers 401 without a session', async () => {
    const device = await createDevice();
    for (const call of [request(app).post(`/api/devices/${device.id}/archive`), request(app).delete(`/api/devices/${device.id}`), request(app).get(`/api/devices/${device.id}/usage`)]) {
      expect((await call).status).toBe(401);
    }
  });
});
