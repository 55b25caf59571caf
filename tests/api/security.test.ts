import type { Express } from 'express';
import request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import type { Database } from '../../server/db/client.js';
import { ROUTE_PERMISSIONS, routeTable } from '../../server/security/route-permissions.js';
import { transmitterFields } from './devices-helpers.js';
import { createTestApp, sessionCookie, signedInAgent } from './helpers/test-app.js';
import { openTestDatabase, resetDatabase, type TestDatabase } from './helpers/test-database.js';
import { passwordOf, seedWorld, WORLD_USERNAMES, type World } from './helpers/world.js';

// Security hardening of the HTTP layer. The expectations are ours (issue 10 and shared/api/index.ts);
// the CSRF defence follows the OWASP CSRF Prevention Cheat Sheet (Fetch Metadata, standard origin headers,
// SameSite=Strict cookies).

let database: TestDatabase;
let app: Express;
let world: World;
// A route with a body that changes state, for the CSRF checks.
const createProject = { name: 'Hardening check project', description: '' };

beforeAll(async () => {
  database = await openTestDatabase();
  app = createTestApp(database, { solving: { queue: null } as never });
});

afterAll(async () => {
  await database.close();
});

beforeEach(async () => {
  await resetDatabase(database.db);
  world = await seedWorld(database.db);
});

describe('headers', () => {
  it('sends the Content-Security-Policy the built client works with, and helmet headers, on pages and API', async () => {
    for (const path of ['/', '/api/health']) {
      const response = await request(app).get(path);
      const policy = String(response.headers['content-security-policy']);
      // STACK.md trap 14: the policy that works with Angular's inline styles and @foblex's blob: worker.
      expect(policy).toContain("default-src 'self'");
      expect(policy).toContain("style-src 'self' 'unsafe-inline'");
      expect(policy).toContain("worker-src 'self' blob:");
      expect(policy).toContain("img-src 'self' data:");
      expect(policy).toContain("script-src 'self'");
      expect(policy).not.toContain("'unsafe-eval'");
      expect(policy).toContain("frame-ancestors 'self'");
      expect(response.headers['x-content-type-options']).toBe('nosniff');
      expect(response.headers['x-frame-options']).toBe('SAMEORIGIN');
      expect(response.headers['referrer-policy']).toBe('no-referrer');
      expect(response.headers['x-powered-by']).toBeUndefined();
    }
  });

  it('sets the session cookie httpOnly and SameSite=Strict', async () => {
    const response = await request(app).post('/api/auth/sign-in').send({ username: 'lead', password: passwordOf('lead') });
    expect(response.status).toBe(200);
    const header = (response.headers['set-cookie'] as unknown as string[]).find((value) => value.startsWith('proofline.sid='));
    expect(header).toMatch(/HttpOnly/i);
    expect(header).toMatch(/SameSite=Strict/i);
  });
});

describe('CSRF', () => {
  it('refuses a change sent from another site, even with a valid session, and changes nothing', async () => {
    const agent = await signedInAgent(app, 'lead');
    const before = (await agent.get('/api/projects')).body;
    const crossSite = await agent.post('/api/projects').set('Sec-Fetch-Site', 'cross-site').send(createProject);
    expect(crossSite.status).toBe(403);
    expect(crossSite.body.error.message).toContain('another site');
    const sameSiteOtherOrigin = await agent.post('/api/projects').set('Sec-Fetch-Site', 'same-site').send(createProject);
    expect(sameSiteOtherOrigin.status).toBe(403);
    const foreignOrigin = await agent.post('/api/projects').set('Origin', 'http://attacker.invalid').send(createProject);
    expect(foreignOrigin.status).toBe(403);
    expect(foreignOrigin.body.error.message).toContain('another origin');
    const opaqueOrigin = await agent.delete(`/api/projects/${world.projectA}/members/${world.userId.viewer}`).set('Origin', 'null');
    expect(opaqueOrigin.status).toBe(403);
    expect((await agent.get('/api/projects')).body).toEqual(before);
  });

  it('refuses a cross-site sign-in (login CSRF) and sign-out', async () => {
    const signIn = await request(app)
      .post('/api/auth/sign-in')
      .set('Sec-Fetch-Site', 'cross-site')
      .send({ username: 'lead', password: passwordOf('lead') });
    expect(signIn.status).toBe(403);
    expect(sessionCookie(signIn)).toBeNull();
  });

  it('lets the same origin change things, and reads from anywhere', async () => {
    const agent = await signedInAgent(app, 'lead');
    const sameOrigin = await agent.post('/api/projects').set('Sec-Fetch-Site', 'same-origin').set('Origin', 'http://127.0.0.1').set('Host', '127.0.0.1').send(createProject);
    expect(sameOrigin.status).toBe(201);
    const read = await agent.get('/api/projects').set('Sec-Fetch-Site', 'cross-site');
    expect(read.status).toBe(200);
  });
});

describe('sign-in', () => {
  it('gives a new session id at sign-in (no session fixation), and the old one stops working', async () => {
    const agent = request.agent(app);
    const first = sessionCookie(await agent.post('/api/auth/sign-in').send({ username: 'viewer', password: passwordOf('viewer') }));
    const second = sessionCookie(await agent.post('/api/auth/sign-in').send({ username: 'engineer', password: passwordOf('engineer') }));
    expect(first).not.toBeNull();
    expect(second).not.toBeNull();
    expect(second).not.toBe(first);
    expect((await request(app).get('/api/auth/me').set('Cookie', first!)).status).toBe(401);
  });

  it('answers a wrong password and an unknown account alike, also once locked out', async () => {
    const limited = createTestApp(database, { signInLimit: { failures: 2, windowMinutes: 15 } });
    const attempt = (username: string) => request(limited).post('/api/auth/sign-in').send({ username, password: 'not-the-password' });
    const wrong = await attempt('lead');
    const unknown = await attempt('nobody-here');
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(unknown.body).toEqual(wrong.body);
    await attempt('lead');
    await attempt('nobody-here');
    const lockedExisting = await attempt('lead');
    const lockedUnknown = await attempt('nobody-here');
    expect(lockedExisting.status).toBe(429);
    expect(lockedUnknown.status).toBe(429);
    expect(lockedUnknown.body).toEqual(lockedExisting.body);
    expect(JSON.stringify(lockedExisting.body)).not.toContain('lead');
  });
});

describe('errors and limits', () => {
  it('shows no stack trace or internal message when a handler fails unexpectedly', async () => {
    const internals = 'internal detail at /srv/proofline/server/secret.ts:42:7';
    const failing = new Proxy({}, { get: () => () => { throw new Error(internals); } }) as Database;
    const logged: string[] = [];
    const logger = { info: () => undefined, warn: () => undefined, error: (message: string) => void logged.push(message) };
    const broken = createTestApp({ ...database, db: failing }, { logger });
    const response = await request(broken).post('/api/auth/sign-in').send({ username: 'lead', password: passwordOf('lead') });
    expect(response.status).toBe(500);
    expect(response.body.error.code).toBe('internal_error');
    expect(JSON.stringify(response.body)).not.toContain('secret.ts');
    expect(JSON.stringify(response.body)).not.toMatch(/\bat \S+:\d+/);
    expect(logged).toEqual(['POST /api/auth/sign-in failed']);
  });

  it('answers malformed JSON with a 400 that names the body and no parser internals', async () => {
    const agent = await signedInAgent(app, 'lead');
    const response = await agent.post('/api/projects').set('Content-Type', 'application/json').send('{"name": ');
    expect(response.status).toBe(400);
    expect(response.body.error.message).toContain('body');
    expect(JSON.stringify(response.body)).not.toMatch(/SyntaxError|node_modules/);
  });

  it('refuses a JSON body over 1 MB with 413 and stores nothing', async () => {
    const agent = await signedInAgent(app, 'lead');
    const response = await agent.post('/api/projects').send({ name: 'Big', description: 'x'.repeat(1_100_000) });
    expect(response.status).toBe(413);
    expect(response.body.error.message).toContain('1 MB');
    expect((await agent.get('/api/projects')).body).not.toContain('Big');
  });

  it('refuses an evidence upload over 10 MB with 413', async () => {
    const agent = await signedInAgent(app, 'admin');
    const device = await agent.post('/api/devices').send(transmitterFields());
    expect(device.status).toBe(201);
    const tooBig = Buffer.concat([Buffer.from('%PDF-1.4\n'), Buffer.alloc(10 * 1024 * 1024 + 10, 0x20)]);
    const response = await agent.post(`/api/devices/${device.body.id}/evidence`).attach('file', tooBig, { filename: 'big.pdf', contentType: 'application/pdf' });
    expect(response.status).toBe(413);
    expect(response.body.error.message).toMatch(/10 MB/);
  });
});

describe('route permissions', () => {
  const table = () => routeTable(createTestApp(database, { solving: { queue: null } as never }));

  it('finds every route of the router table, and each one has an explicit permission', () => {
    const routes = table();
    expect(routes.length).toBeGreaterThan(60);
    const undeclared = routes.filter((route) => !(route in ROUTE_PERMISSIONS));
    expect(undeclared, `routes without an entry in server/security/route-permissions.ts: ${undeclared.join(', ')}`).toEqual([]);
    const stale = Object.keys(ROUTE_PERMISSIONS).filter((route) => !routes.includes(route));
    expect(stale, `declared routes the app does not have: ${stale.join(', ')}`).toEqual([]);
  });

  it('walks every route for each role: anonymous callers get 401 off public routes, non-admins 403 or 404 on admin ones', async () => {
    const agents = Object.fromEntries(
      await Promise.all(WORLD_USERNAMES.map(async (username) => [username, await signedInAgent(app, username)] as const)),
    );
    const someId = '00000000-0000-4000-8000-000000000000';
    for (const route of table()) {
      const [method, pattern] = route.split(' ') as [string, string];
      if (pattern.includes('{*splat}')) continue;
      const path = pattern
        .replace(':projectId', world.projectA)
        .replace(':sifId', world.sifDraft)
        .replace(/:version|:number/, '1')
        .replace(/:\w+/g, someId);
      const verb = method.toLowerCase() as 'get' | 'post' | 'put' | 'patch' | 'delete';
      const permission = ROUTE_PERMISSIONS[route]!;
      const anonymous = await request(app)[verb](path).send({});
      if (permission.kind === 'public') expect(anonymous.status, route).not.toBe(401);
      // A few routes check the body before the session (an empty body is 400 there); none may answer anything else.
      else expect([400, 401], `${route} without a session`).toContain(anonymous.status);
      // Signing in or out again would end the agents' sessions; the sign-in tests above cover those routes.
      if (pattern === '/api/auth/sign-out' || pattern === '/api/auth/sign-in') continue;
      // An empty body may be refused as invalid before the permission check; it must never succeed
      // (tests/api/role-matrix.test.ts sends valid bodies).
      for (const username of WORLD_USERNAMES) {
        const response = await agents[username]![verb](path).send({});
        expect(response.status, `${route} as ${username}`).not.toBe(500);
        expect(response.status, `${route} as ${username}`).not.toBe(401);
        if (permission.kind === 'admin' && username !== 'admin') expect([403, 404], `${route} as ${username}`).toContain(response.status);
        if (permission.kind === 'project' && username === 'outsider') expect([400, 404], `${route} as ${username}`).toContain(response.status);
        if (permission.kind === 'project' && permission.action !== 'project.read' && username === 'viewer') {
          expect([400, 403], `${route} as ${username}`).toContain(response.status);
        }
      }
    }
  }, 60_000);
});
