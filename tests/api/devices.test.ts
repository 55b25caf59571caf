import type { Express } from 'express';
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { deviceDetail, deviceList, deviceVersion, deviceVersionList, deviceLibraryAccess } from '../../shared/api/devices.js';
import { modelDetail } from '../../shared/api/models.js';
import { addUserWithoutProject, PDF_BYTES, PNG_BYTES, transmitterFields } from './devices-helpers.js';
import { createTestApp, signedInAgent } from './helpers/test-app.js';
import { openTestDatabase, resetDatabase, type TestDatabase } from './helpers/test-database.js';
import { seedWorld, type World } from './helpers/world.js';
import { APP_REQUEST_HEADER } from '../../shared/api/request-header.js';

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
  world = await seedWorld(database.db);
});

async function createDevice(username = 'engineer', fields = transmitterFields()) {
  const agent = await signedInAgent(app, username);
  const response = await agent.post('/api/devices').send(fields);
  return { agent, response };
}

describe('device library: records and who may use them', () => {
  it('creates version 1 with the derived DC and SFF, and lists it for a viewer', async () => {
    const { response } = await createDevice();
    expect(response.status).toBe(201);
    const created = deviceDetail.parse(response.body);
    expect(created).toMatchObject({ version: 1, maker: 'Quillfen Instruments (fictional)', evidenceCount: 0, createdByDisplayName: 'Engineer (test)' });
    // DC = lambdaDD / (lambdaDD + lambdaDU) and SFF = (lambdaS + lambdaDD) / lambda, IEC 61508-2:2010 Annex C:
    // 3.6e-7 / 4.0e-7 = 0.9 and (3.0e-7 + 3.6e-7) / 7.0e-7 = 0.942857...; tolerance 1e-12.
    expect(created.diagnosticCoverage).toBeCloseTo(0.9, 12);
    expect(created.safeFailureFraction).toBeCloseTo(6.6 / 7, 12);

    const viewer = await signedInAgent(app, 'viewer');
    const list = await viewer.get('/api/devices');
    expect(list.status).toBe(200);
    expect(deviceList.parse(list.body).map((item) => item.id)).toEqual([created.id]);
    const filtered = await viewer.get('/api/devices').query({ search: 'qp-400', category: 'transmitter' });
    expect(filtered.body).toHaveLength(1);
    const none = await viewer.get('/api/devices').query({ category: 'valve' });
    expect(none.body).toEqual([]);
  });

  it('lets leads, engineers and admins edit; reviewers and viewers get 403 naming who may', async () => {
    for (const username of ['reviewer', 'viewer']) {
      const { response } = await createDevice(username);
      expect(response.status).toBe(403);
      expect(response.body.error.message).toMatch(/leads and engineers/);
    }
    expect((await createDevice('admin')).response.status).toBe(201);
    expect((await createDevice('lead', transmitterFields({ model: 'QP-410' }))).response.status).toBe(201);
    // "outsider" leads project B only: still a lead of an active project, so an editor of the shared library.
    expect((await createDevice('outsider', transmitterFields({ model: 'QP-420' }))).response.status).toBe(201);
  });

  it('answers 404 on every library route to a user who is a member of no project', async () => {
    const { response } = await createDevice();
    const id = response.body.id as string;
    await addUserWithoutProject(database.db);
    const loner = await signedInAgent(app, 'loner');
    for (const path of ['/api/devices', `/api/devices/${id}`, `/api/devices/${id}/versions`, '/api/devices/export']) {
      const reply = await loner.get(path);
      expect(reply.status, path).toBe(404);
    }
    const access = deviceLibraryAccess.parse((await loner.get('/api/devices/access')).body);
    expect(access).toEqual({ canRead: false, canEdit: false });
    expect((await request(app).get('/api/devices')).status).toBe(401);
  });

  it('refuses bad figures with every field named, and a second record of the same maker and model', async () => {
    const bad = await createDevice('engineer', transmitterFields({ lambdaDU: -1, architectureType: 'C' as 'A', hardwareFaultTolerance: 5 }));
    expect(bad.response.status).toBe(400);
    const paths = bad.response.body.error.details.issues.map((issue: { path: string }) => issue.path);
    expect(paths).toEqual(expect.arrayContaining(['lambdaDU', 'architectureType', 'hardwareFaultTolerance']));

    expect((await createDevice()).response.status).toBe(201);
    const again = await createDevice('lead', transmitterFields({ maker: 'QUILLFEN INSTRUMENTS (FICTIONAL)' }));
    expect(again.response.status).toBe(409);
    expect(again.response.body.error.code).toBe('already_exists');
  });
  it('answers one of two simultaneous creations of the same device with 409, not 500', async () => {
    const [first, second] = await Promise.all([signedInAgent(app, 'engineer'), signedInAgent(app, 'lead')]);
    const replies = await Promise.all([first.post('/api/devices').send(transmitterFields()), second.post('/api/devices').send(transmitterFields())]);
    expect(replies.map((reply) => reply.status).sort()).toEqual([201, 409]);
  });
});

describe('device library: versions', () => {
  it('writes a new version on every edit, keeps the old one unchanged, and refuses a stale edit with the current record', async () => {
    const { agent, response } = await createDevice();
    const id = response.body.id as string;
    const edited = await agent.put(`/api/devices/${id}`).send({ ...transmitterFields({ lambdaDU: 5.0e-8 }), basedOnVersion: 1, changeNote: 'Revised report rev B' });
    expect(edited.status).toBe(200);
    expect(deviceDetail.parse(edited.body)).toMatchObject({ version: 2, lambdaDU: 5.0e-8, changeNote: 'Revised report rev B' });

    const versions = deviceVersionList.parse((await agent.get(`/api/devices/${id}/versions`)).body);
    expect(versions.map((item) => [item.version, item.lambdaDU])).toEqual([
      [2, 5.0e-8],
      [1, 4.0e-8],
    ]);
    const first = deviceVersion.parse((await agent.get(`/api/devices/${id}/versions/1`)).body);
    expect(first.lambdaDU).toBe(4.0e-8);

    const stale = await agent.put(`/api/devices/${id}`).send({ ...transmitterFields({ lambdaDU: 6.0e-8 }), basedOnVersion: 1, changeNote: 'late edit' });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('version_conflict');
    expect(stale.body.error.details.current.version).toBe(2);
    expect((await agent.get(`/api/devices/${id}/versions/3`)).status).toBe(404);
  });

  it('a model draft linked to version 1 keeps version 1 and its figures after the library moves to version 2', async () => {
    const { agent, response } = await createDevice();
    const device = deviceDetail.parse(response.body);
    const linkedEvent = {
      id: 'PT-A',
      label: 'Pressure transmitter A',
      lambdaDU: device.lambdaDU,
      lambdaDD: device.lambdaDD,
      // The link fills lambdaS = lambdaSU + lambdaSD; mttrHours is the event's own.
      lambdaS: device.lambdaSU + device.lambdaSD,
      deviceType: device.architectureType,
      systematicCapability: 1,
      proofTest: { intervalHours: 8760, coverage: 0.9 },
      device: { id: device.id, version: 1, overrides: [{ field: 'systematicCapability', reason: 'Site applies SC 1 to devices without prior use' }] },
    };
    const file = {
      format: 'proofline/model',
      version: 1,
      name: 'Separator PT, 1oo1',
      kind: 'fault-tree',
      mission: { hours: 87_600, demand: 'low' },
      events: [linkedEvent],
      gates: [],
      top: 'PT-A',
    };
    const created = await agent.post(`/api/projects/${world.projectA}/sifs/${world.sifDraft}/models`).send({ file });
    expect(created.status).toBe(201);
    const model = modelDetail.parse(created.body);
    expect(model.draft.issues).toEqual([]);

    await agent.put(`/api/devices/${device.id}`).send({ ...transmitterFields({ lambdaDU: 8.0e-8 }), basedOnVersion: 1, changeNote: 'New field data' });

    const reread = modelDetail.parse((await agent.get(`/api/projects/${world.projectA}/models/${model.id}`)).body);
    const event = (reread.draft.content['events'] as (typeof linkedEvent)[])[0]!;
    expect(event.device).toEqual(linkedEvent.device);
    expect(event.lambdaDU).toBe(4.0e-8);
    const current = deviceList.parse((await agent.get('/api/devices').query({ ids: device.id })).body);
    expect(current[0]!.version).toBe(2);
  });

  it('flags an override without a reason as an issue of the model draft', async () => {
    const { agent, response } = await createDevice();
    const id = response.body.id as string;
    const file = {
      format: 'proofline/model',
      version: 1,
      name: 'Unexplained override',
      kind: 'fault-tree',
      mission: { hours: 87_600, demand: 'low' },
      events: [{ id: 'PT-A', lambdaDU: 1e-6, device: { id, version: 1, overrides: [{ field: 'lambdaDU', reason: '  ' }] } }],
      gates: [],
      top: 'PT-A',
    };
    const created = await agent.post(`/api/projects/${world.projectA}/sifs/${world.sifDraft}/models`).send({ file });
    expect(created.status).toBe(400);
    const paths = created.body.error.details.issues.map((issue: { path: string }) => issue.path);
    expect(paths).toContain('file.events[0].device.overrides[0].reason');
  });
});

describe('device library: evidence files', () => {
  async function deviceWithAgent() {
    const { agent, response } = await createDevice();
    return { agent, id: response.body.id as string };
  }

  it('stores a PDF in the database and serves it back byte for byte with download headers', async () => {
    const { agent, id } = await deviceWithAgent();
    const upload = await agent
      .post(`/api/devices/${id}/evidence`)
      .field('description', 'SIL certificate (invented)')
      .set(APP_REQUEST_HEADER, '1').attach('file', PDF_BYTES, { filename: 'certificate "QP-400".pdf', contentType: 'application/pdf' });
    expect(upload.status).toBe(201);
    const detail = deviceDetail.parse(upload.body);
    expect(detail.evidence).toHaveLength(1);
    const evidence = detail.evidence[0]!;
    expect(evidence).toMatchObject({ contentType: 'application/pdf', byteSize: PDF_BYTES.length, deviceVersion: 1, fileName: 'certificate QP-400.pdf' });

    const viewer = await signedInAgent(app, 'viewer');
    const download = await viewer.get(`/api/devices/${id}/evidence/${evidence.id}`).buffer(true).parse((res, done) => {
      const chunks: Buffer[] = [];
      res.on('data', (chunk: Buffer) => chunks.push(chunk));
      res.on('end', () => done(null, Buffer.concat(chunks)));
    });
    expect(download.status).toBe(200);
    expect(download.headers['content-type']).toBe('application/pdf');
    expect(download.headers['x-content-type-options']).toBe('nosniff');
    expect(download.headers['content-disposition']).toBe('attachment; filename="certificate QP-400.pdf"');
    expect(Buffer.compare(download.body as Buffer, PDF_BYTES)).toBe(0);
    const rows = await database.db.execute(sql`select octet_length(content) as n from device_evidence`);
    expect(rows.rows[0]).toEqual({ n: PDF_BYTES.length });
  });

  it('refuses a file over 10 MB with 413 and stores nothing', async () => {
    const { agent, id } = await deviceWithAgent();
    const big = Buffer.concat([PDF_BYTES, Buffer.alloc(10 * 1024 * 1024, 0x20)]);
    const upload = await agent.post(`/api/devices/${id}/evidence`).set(APP_REQUEST_HEADER, '1').attach('file', big, { filename: 'big.pdf', contentType: 'application/pdf' });
    expect(upload.status).toBe(413);
    expect(upload.body.error.message).toMatch(/at most 10 MB/);
    const rows = await database.db.execute(sql`select count(*)::int as n from device_evidence`);
    expect(rows.rows[0]).toEqual({ n: 0 });
  });

  it('refuses a declared type outside PDF/PNG/JPEG, and content that does not match its declared type', async () => {
    const { agent, id } = await deviceWithAgent();
    const text = await agent.post(`/api/devices/${id}/evidence`).set(APP_REQUEST_HEADER, '1').attach('file', Buffer.from('plain text'), { filename: 'notes.txt', contentType: 'text/plain' });
    expect(text.status).toBe(400);
    expect(text.body.error.details.issues[0].path).toBe('file');

    const disguised = await agent
      .post(`/api/devices/${id}/evidence`)
      .set(APP_REQUEST_HEADER, '1').attach('file', Buffer.from('<html><script>alert(1)</script></html>'), { filename: 'report.pdf', contentType: 'application/pdf' });
    expect(disguised.status).toBe(400);
    expect(disguised.body.error.message).toMatch(/PDF, PNG or JPEG/);

    const pngAsPdf = await agent.post(`/api/devices/${id}/evidence`).set(APP_REQUEST_HEADER, '1').attach('file', PNG_BYTES, { filename: 'scan.pdf', contentType: 'application/pdf' });
    expect(pngAsPdf.status).toBe(400);
    expect(pngAsPdf.body.error.message).toMatch(/declared as application\/pdf but its content is image\/png/);

    const png = await agent.post(`/api/devices/${id}/evidence`).set(APP_REQUEST_HEADER, '1').attach('file', PNG_BYTES, { filename: 'scan.png', contentType: 'image/png' });
    expect(png.status).toBe(201);
  });

  it('hides evidence from a user of no project (404), refuses uploads by a viewer (403), and lets an engineer remove it', async () => {
    const { agent, id } = await deviceWithAgent();
    const upload = await agent.post(`/api/devices/${id}/evidence`).set(APP_REQUEST_HEADER, '1').attach('file', PDF_BYTES, { filename: 'c.pdf', contentType: 'application/pdf' });
    const evidenceId = deviceDetail.parse(upload.body).evidence[0]!.id;

    await addUserWithoutProject(database.db);
    const loner = await signedInAgent(app, 'loner');
    expect((await loner.get(`/api/devices/${id}/evidence/${evidenceId}`)).status).toBe(404);
    expect((await request(app).get(`/api/devices/${id}/evidence/${evidenceId}`)).status).toBe(401);

    const viewer = await signedInAgent(app, 'viewer');
    const refused = await viewer.post(`/api/devices/${id}/evidence`).set(APP_REQUEST_HEADER, '1').attach('file', PDF_BYTES, { filename: 'v.pdf', contentType: 'application/pdf' });
    expect(refused.status).toBe(403);
    expect((await viewer.delete(`/api/devices/${id}/evidence/${evidenceId}`)).status).toBe(403);

    expect((await agent.delete(`/api/devices/${id}/evidence/${evidenceId}`)).status).toBe(204);
    expect((await agent.get(`/api/devices/${id}/evidence/${evidenceId}`)).status).toBe(404);
  });
});
