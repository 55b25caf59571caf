import type { Express } from 'express';
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

describe('isolation', () => {
  it('a member of project A cannot read project B or anything in it', async () => {
    const viewer = await signedInAgent(app, 'viewer');
    const listed = await viewer.get('/api/projects');
    expect(listed.body.map((project: { id: string }) => project.id)).toEqual([world.projectA]);
    for (const path of [
      `/api/projects/${world.projectB}`,
      `/api/projects/${world.projectB}/members`,
      `/api/projects/${world.projectB}/sifs`,
      `/api/projects/${world.projectB}/sifs/${world.sifOfB}`,
    ]) {
      const response = await viewer.get(path);
      expect(response.status, path).toBe(404);
      expect(response.body.error.code).toBe('not_found');
      expect(JSON.stringify(response.body)).not.toContain('PZT-9001');
    }
  });

  it('a lead of project A cannot write into project B', async () => {
    const lead = await signedInAgent(app, 'lead');
    expect((await lead.patch(`/api/projects/${world.projectB}`).send({ name: 'Taken over' })).status).toBe(404);
    expect((await lead.put(`/api/projects/${world.projectB}/members/${world.userId.lead}`).send({ role: 'lead' })).status).toBe(404);
    expect((await lead.patch(`/api/projects/${world.projectB}/sifs/${world.sifOfB}`).send({ version: 1, title: 'x' })).status).toBe(404);
    const outsider = await signedInAgent(app, 'outsider');
    expect((await outsider.get(`/api/projects/${world.projectB}`)).body.name).toBe('Project B');
  });

  it('a site admin sees every project, with myRole null where not a member', async () => {
    const admin = await signedInAgent(app, 'admin');
    const listed = await admin.get('/api/projects');
    expect(listed.body.map((project: { name: string; myRole: string | null }) => [project.name, project.myRole])).toEqual([
      ['Project A', null],
      ['Project B', null],
    ]);
  });
});

describe('projects', () => {
  it('any signed-in user creates a project and becomes its lead', async () => {
    const viewer = await signedInAgent(app, 'viewer');
    const created = await viewer.post('/api/projects').send({ name: '  Jetty upgrade  ', site: 'North jetty' });
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ name: 'Jetty upgrade', site: 'North jetty', unit: '', client: '', archived: false, myRole: 'lead' });
    const members = await viewer.get(`/api/projects/${created.body.id}/members`);
    expect(members.body).toEqual([{ userId: world.userId.viewer, username: 'viewer', displayName: 'Viewer (test)', role: 'lead' }]);
  });

  it('names the field of a bad project body', async () => {
    const lead = await signedInAgent(app, 'lead');
    const response = await lead.post('/api/projects').send({ name: '', description: 'x'.repeat(2001) });
    expect(response.status).toBe(400);
    expect(response.body.error.details.issues.map((issue: { path: string }) => issue.path).sort()).toEqual(['description', 'name']);
    const empty = await lead.patch(`/api/projects/${world.projectA}`).send({});
    expect(empty.status).toBe(400);
    expect(empty.body.error.message).toContain('at least one field');
  });

  it('leaves archived projects out of the list unless asked', async () => {
    const lead = await signedInAgent(app, 'lead');
    await lead.post(`/api/projects/${world.projectA}/archive`);
    expect((await lead.get('/api/projects')).body).toEqual([]);
    const all = await lead.get('/api/projects?includeArchived=true');
    expect(all.body.map((project: { archived: boolean }) => project.archived)).toEqual([true]);
    expect((await lead.patch(`/api/projects/${world.projectA}`).send({ name: 'Renamed' })).status).toBe(409);
  });
});

describe('members', () => {
  it('a lead adds a member, changes the role and removes them', async () => {
    const lead = await signedInAgent(app, 'lead');
    const added = await lead.put(`/api/projects/${world.projectA}/members/${world.userId.outsider}`).send({ role: 'reviewer' });
    expect(added.body).toEqual({ userId: world.userId.outsider, username: 'outsider', displayName: 'Outsider (test)', role: 'reviewer' });
    const outsider = await signedInAgent(app, 'outsider');
    expect((await outsider.get(`/api/projects/${world.projectA}`)).body.myRole).toBe('reviewer');
    await lead.put(`/api/projects/${world.projectA}/members/${world.userId.outsider}`).send({ role: 'engineer' });
    expect((await outsider.get(`/api/projects/${world.projectA}`)).body.myRole).toBe('engineer');
    expect((await lead.delete(`/api/projects/${world.projectA}/members/${world.userId.outsider}`)).status).toBe(204);
    expect((await outsider.get(`/api/projects/${world.projectA}`)).status).toBe(404);
  });

  it('keeps at least one lead', async () => {
    const lead = await signedInAgent(app, 'lead');
    const demote = await lead.put(`/api/projects/${world.projectA}/members/${world.userId.lead}`).send({ role: 'engineer' });
    expect(demote.status).toBe(409);
    expect(demote.body.error.message).toContain('at least one lead');
    expect((await lead.delete(`/api/projects/${world.projectA}/members/${world.userId.lead}`)).status).toBe(409);
    await lead.put(`/api/projects/${world.projectA}/members/${world.userId.engineer}`).send({ role: 'lead' });
    expect((await lead.put(`/api/projects/${world.projectA}/members/${world.userId.lead}`).send({ role: 'engineer' })).status).toBe(200);
  });

  it('keeps a lead when two leads step down at the same time (exactly one succeeds)', async () => {
    const lead = await signedInAgent(app, 'lead');
    await lead.put(`/api/projects/${world.projectA}/members/${world.userId.engineer}`).send({ role: 'lead' });
    const engineer = await signedInAgent(app, 'engineer');
    const results = await Promise.all([
      lead.put(`/api/projects/${world.projectA}/members/${world.userId.lead}`).send({ role: 'engineer' }),
      engineer.delete(`/api/projects/${world.projectA}/members/${world.userId.engineer}`),
    ]);
    const statuses = results.map((response) => response.status);
    expect(statuses.filter((status) => status === 409)).toHaveLength(1);
    expect(statuses.filter((status) => status === 200 || status === 204)).toHaveLength(1);
    const members = await lead.get(`/api/projects/${world.projectA}/members`);
    const leads = (members.body as { role: string }[]).filter((member) => member.role === 'lead');
    expect(leads).toHaveLength(1);
  });

  it('names a bad role and answers 404 for an unknown user', async () => {
    const lead = await signedInAgent(app, 'lead');
    const badRole = await lead.put(`/api/projects/${world.projectA}/members/${world.userId.outsider}`).send({ role: 'owner' });
    expect(badRole.status).toBe(400);
    expect(badRole.body.error.details.issues[0]).toEqual({ path: 'role', message: 'must be one of lead, engineer, reviewer, viewer' });
    const unknown = await lead.put(`/api/projects/${world.projectA}/members/00000000-0000-4000-8000-000000000000`).send({ role: 'viewer' });
    expect(unknown.status).toBe(404);
    const badId = await lead.put(`/api/projects/${world.projectA}/members/not-an-id`).send({ role: 'viewer' });
    expect(badId.status).toBe(400);
    expect(badId.body.error.details.issues[0].path).toBe('userId');
  });
});

describe('users', () => {
  it('an admin creates a user who can then sign in; a taken username is a 409 naming the field', async () => {
    const admin = await signedInAgent(app, 'admin');
    const created = await admin.post('/api/users').send({ username: 'Nova.Tech', displayName: 'Nova Tech', password: 'nova-password-1' });
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ username: 'nova.tech', displayName: 'Nova Tech', isAdmin: false, disabled: false });
    expect(created.body).not.toHaveProperty('passwordHash');
    await signedInAgent(app, 'nova.tech', 'nova-password-1');
    const again = await admin.post('/api/users').send({ username: 'nova.tech', displayName: 'Other', password: 'nova-password-2' });
    expect(again.status).toBe(409);
    expect(again.body.error.details.issues[0].path).toBe('username');
  });

  it('names the fields of a bad user body', async () => {
    const admin = await signedInAgent(app, 'admin');
    const response = await admin.post('/api/users').send({ username: 'x', displayName: '', password: 'short' });
    expect(response.status).toBe(400);
    expect(response.body.error.details.issues.map((issue: { path: string }) => issue.path).sort()).toEqual(['displayName', 'password', 'username']);
    expect(JSON.stringify(response.body)).not.toContain('short');
  });

  it('an admin cannot remove their own admin rights or disable themselves', async () => {
    const admin = await signedInAgent(app, 'admin');
    const demote = await admin.patch(`/api/users/${world.userId.admin}`).send({ isAdmin: false });
    expect(demote.status).toBe(409);
    expect((await admin.patch(`/api/users/${world.userId.admin}`).send({ disabled: true })).status).toBe(409);
    expect((await admin.get('/api/auth/me')).body.isAdmin).toBe(true);
  });

  it('a new admin right takes effect on the next request', async () => {
    const admin = await signedInAgent(app, 'admin');
    const viewer = await signedInAgent(app, 'viewer');
    expect((await viewer.get('/api/projects')).body).toHaveLength(1);
    await admin.patch(`/api/users/${world.userId.viewer}`).send({ isAdmin: true });
    expect((await viewer.get('/api/projects')).body).toHaveLength(2);
  });
});
