import type { Express } from 'express';
import request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { createTestApp, sessionCookie, signedInAgent } from './helpers/test-app.js';
import { openTestDatabase, resetDatabase, type TestDatabase } from './helpers/test-database.js';
import { passwordOf, seedWorld, type World } from './helpers/world.js';

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

describe('sign-in', () => {
  it('signs in with the right password, case-insensitive username, and sets a strict httpOnly cookie', async () => {
    const response = await request(app).post('/api/auth/sign-in').send({ username: ' Lead ', password: passwordOf('lead') });
    expect(response.status).toBe(200);
    expect(response.body).toEqual({ id: world.userId.lead, username: 'lead', displayName: 'Lead (test)', isAdmin: false, disabled: false });
    const header = (response.headers['set-cookie'] as unknown as string[]).join(';');
    expect(header).toMatch(/proofline\.sid=/);
    expect(header).toMatch(/HttpOnly/i);
    expect(header).toMatch(/SameSite=Strict/i);
    expect(response.body).not.toHaveProperty('passwordHash');
  });

  it('refuses a wrong password and an unknown user with the same answer', async () => {
    const wrong = await request(app).post('/api/auth/sign-in').send({ username: 'lead', password: 'not-the-password' });
    const unknown = await request(app).post('/api/auth/sign-in').send({ username: 'nobody', password: 'not-the-password' });
    for (const response of [wrong, unknown]) {
      expect(response.status).toBe(401);
      expect(response.body.error).toEqual({ code: 'invalid_credentials', message: 'wrong username or password' });
      expect(sessionCookie(response)).toBeNull();
    }
  });

  it('names the missing field', async () => {
    const response = await request(app).post('/api/auth/sign-in').send({ username: 'lead' });
    expect(response.status).toBe(400);
    expect(response.body.error.code).toBe('validation_failed');
    expect(response.body.error.message).toContain('password');
    expect(response.body.error.details.issues).toEqual([{ path: 'password', message: 'is required' }]);
  });

  it('refuses a disabled account, and ends its open sessions', async () => {
    const viewer = await signedInAgent(app, 'viewer');
    const admin = await signedInAgent(app, 'admin');
    expect((await admin.patch(`/api/users/${world.userId.viewer}`).send({ disabled: true })).status).toBe(200);
    expect((await viewer.get('/api/auth/me')).status).toBe(401);
    const again = await request(app).post('/api/auth/sign-in').send({ username: 'viewer', password: passwordOf('viewer') });
    expect(again.status).toBe(401);
  });

  it('gives a new session id at sign-in and the old one stops working (no session fixation)', async () => {
    const agent = request.agent(app);
    const first = await agent.post('/api/auth/sign-in').send({ username: 'viewer', password: passwordOf('viewer') });
    const second = await agent.post('/api/auth/sign-in').send({ username: 'lead', password: passwordOf('lead') });
    const firstCookie = sessionCookie(first);
    const secondCookie = sessionCookie(second);
    expect(firstCookie).not.toBeNull();
    expect(secondCookie).not.toBeNull();
    expect(secondCookie).not.toEqual(firstCookie);
    expect((await request(app).get('/api/auth/me').set('Cookie', firstCookie as string)).status).toBe(401);
    const me = await request(app).get('/api/auth/me').set('Cookie', secondCookie as string);
    expect(me.body.username).toBe('lead');
  });

  it('limits repeated failed sign-ins per address and username (429), counting failures only', async () => {
    const limited = createTestApp(database, { signInLimit: { failures: 3, windowMinutes: 15 } });
    for (let attempt = 0; attempt < 3; attempt += 1) {
      expect((await request(limited).post('/api/auth/sign-in').send({ username: 'lead', password: 'wrong-one' })).status).toBe(401);
    }
    const blocked = await request(limited).post('/api/auth/sign-in').send({ username: 'lead', password: passwordOf('lead') });
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.code).toBe('rate_limited');
    const otherUser = await request(limited).post('/api/auth/sign-in').send({ username: 'viewer', password: passwordOf('viewer') });
    expect(otherUser.status).toBe(200);
  });
});

describe('session', () => {
  it('answers 401 on /me before sign-in and after sign-out', async () => {
    expect((await request(app).get('/api/auth/me')).body.error.code).toBe('unauthenticated');
    const agent = await signedInAgent(app, 'engineer');
    expect((await agent.get('/api/auth/me')).status).toBe(200);
    const out = await agent.post('/api/auth/sign-out');
    expect(out.status).toBe(204);
    expect((await agent.get('/api/auth/me')).status).toBe(401);
    const [{ count }] = (await database.db.execute(sql`select count(*)::int as count from sessions`)).rows as { count: number }[];
    expect(count).toBe(0);
  });

  it('survives an app restart: a second app on the same database accepts the first one\'s cookie', async () => {
    const signIn = await request(app).post('/api/auth/sign-in').send({ username: 'reviewer', password: passwordOf('reviewer') });
    const cookie = sessionCookie(signIn) as string;
    const second = await openTestDatabase();
    try {
      const restarted = createTestApp(second);
      const me = await request(restarted).get('/api/auth/me').set('Cookie', cookie);
      expect(me.status).toBe(200);
      expect(me.body.username).toBe('reviewer');
      const other = createTestApp(second, { sessionSecret: 'a-different-secret-of-at-least-32-characters' });
      expect((await request(other).get('/api/auth/me').set('Cookie', cookie)).status).toBe(401);
    } finally {
      await second.close();
    }
  });
});

describe('change password', () => {
  it('needs the current password, names the field, and keeps the old password when refused', async () => {
    const agent = await signedInAgent(app, 'engineer');
    const wrong = await agent.post('/api/auth/password').send({ currentPassword: 'not-mine', newPassword: 'a-new-password-1' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.details.issues).toEqual([{ path: 'currentPassword', message: 'is not your current password' }]);
    const short = await agent.post('/api/auth/password').send({ currentPassword: passwordOf('engineer'), newPassword: 'short' });
    expect(short.status).toBe(400);
    expect(short.body.error.details.issues[0].path).toBe('newPassword');
    expect((await request(app).post('/api/auth/sign-in').send({ username: 'engineer', password: passwordOf('engineer') })).status).toBe(200);
  });

  it('switches to the new password, keeps this session and ends the others', async () => {
    const here = await signedInAgent(app, 'engineer');
    const elsewhere = await signedInAgent(app, 'engineer');
    const lead = await signedInAgent(app, 'lead');
    const changed = await here.post('/api/auth/password').send({ currentPassword: passwordOf('engineer'), newPassword: 'engineer-new-password' });
    expect(changed.status).toBe(204);
    expect((await here.get('/api/auth/me')).status).toBe(200);
    expect((await elsewhere.get('/api/auth/me')).status).toBe(401);
    expect((await lead.get('/api/auth/me')).status).toBe(200);
    expect((await request(app).post('/api/auth/sign-in').send({ username: 'engineer', password: passwordOf('engineer') })).status).toBe(401);
    expect((await request(app).post('/api/auth/sign-in').send({ username: 'engineer', password: 'engineer-new-password' })).status).toBe(200);
  });

  it('lets an admin set a password, which ends that user\'s sessions', async () => {
    const viewer = await signedInAgent(app, 'viewer');
    const admin = await signedInAgent(app, 'admin');
    expect((await admin.patch(`/api/users/${world.userId.viewer}`).send({ password: 'viewer-reset-password' })).status).toBe(200);
    expect((await viewer.get('/api/auth/me')).status).toBe(401);
    expect((await request(app).post('/api/auth/sign-in').send({ username: 'viewer', password: 'viewer-reset-password' })).status).toBe(200);
  });
});
