import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { Router, type Express } from 'express';
import request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import type { Database } from '../../server/db/client.js';
import { createPermissionGuard } from '../../server/security/permission-guard.js';
import { ROUTE_PERMISSIONS, routeTable, type RoutePermission } from '../../server/security/route-permissions.js';
import { canDo } from '../../shared/api/permissions.js';
import { APP_REQUEST_HEADER, APP_REQUEST_HEADER_VALUE } from '../../shared/api/request-header.js';
import type { ProjectRole } from '../../shared/api/projects.js';
import { transmitterFields } from './devices-helpers.js';
import { createTestApp, sessionCookie, signedInAgent } from './helpers/test-app.js';
import { openTestDatabase, resetDatabase, type TestDatabase } from './helpers/test-database.js';
import { passwordOf, seedWorld, WORLD_USERNAMES, type World, type WorldUsername } from './helpers/world.js';

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

describe('CSRF in depth: form-like bodies need the client header', () => {
  // A cross-site page can send text/plain, urlencoded and multipart bodies without a CORS preflight (the
  // Fetch standard's CORS-safelisted request headers), but not a custom header; OWASP CSRF Prevention Cheat
  // Sheet, "custom request headers". These requests carry no Sec-Fetch-Site or Origin, as an old browser's would.
  it('refuses a text/plain or urlencoded change without the header, and changes nothing', async () => {
    const agent = await signedInAgent(app, 'lead');
    const before = (await agent.get('/api/projects')).body;
    // The classic trick: JSON sent as text/plain by a cross-site form.
    const asText = await agent.post('/api/projects').set('Content-Type', 'text/plain;charset=UTF-8').send(JSON.stringify(createProject));
    expect(asText.status).toBe(403);
    expect(asText.body.error.message).toContain(APP_REQUEST_HEADER);
    expect(asText.body.error.message).toContain('text/plain');
    const asForm = await agent.post('/api/projects').type('form').send('name=Hardening+check+project&description=');
    expect(asForm.status).toBe(403);
    expect(asForm.body.error.message).toContain('application/x-www-form-urlencoded');
    const deleteAsForm = await agent.delete(`/api/projects/${world.projectA}/members/${world.userId.viewer}`).type('form').send('x=1');
    expect(deleteAsForm.status).toBe(403);
    expect((await agent.get('/api/projects')).body).toEqual(before);
    expect((await agent.get(`/api/projects/${world.projectA}/members`)).body.map((member: { userId: string }) => member.userId)).toContain(world.userId.viewer);
  });

  it('refuses a multipart upload without the header and takes the same upload with it, as the client sends it', async () => {
    const agent = await signedInAgent(app, 'admin');
    const device = await agent.post('/api/devices').send(transmitterFields());
    expect(device.status).toBe(201);
    const pdf = Buffer.from('%PDF-1.4\n%%EOF\n');
    const url = `/api/devices/${device.body.id}/evidence`;
    const bare = await agent.post(url).attach('file', pdf, { filename: 'c.pdf', contentType: 'application/pdf' });
    expect(bare.status).toBe(403);
    expect(bare.body.error.message).toContain('multipart/form-data');
    expect((await agent.get(`/api/devices/${device.body.id}`)).body.evidence).toEqual([]);
    const marked = await agent.post(url).set(APP_REQUEST_HEADER, APP_REQUEST_HEADER_VALUE).attach('file', pdf, { filename: 'c.pdf', contentType: 'application/pdf' });
    expect(marked.status).toBe(201);
    expect(marked.body.evidence).toHaveLength(1);
  });

  it('lets JSON changes and reads through without the header, and a marked text body on to its validation', async () => {
    const agent = await signedInAgent(app, 'lead');
    expect((await agent.post('/api/projects').send(createProject)).status).toBe(201);
    expect((await agent.get('/api/projects').set('Content-Type', 'text/plain')).status).toBe(200);
    const markedText = await agent.post('/api/projects').set(APP_REQUEST_HEADER, '1').set('Content-Type', 'text/plain').send('name=x');
    // Past the CSRF check; refused as not JSON by the route, naming the body.
    expect(markedText.status).toBe(400);
    expect(markedText.body.error.details.issues[0]).toEqual({ path: 'body', message: 'is required' });
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
    const response = await agent.post(`/api/devices/${device.body.id}/evidence`).set(APP_REQUEST_HEADER, '1').attach('file', tooBig, { filename: 'big.pdf', contentType: 'application/pdf' });
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

  it('refuses to guard a router holding a route without a declared permission, so such a server never starts', () => {
    const api = Router();
    api.get('/projects', () => undefined);
    api.post('/projects/:projectId/undeclared-action', () => undefined);
    const guard = createPermissionGuard(database.db);
    expect(() => guard.cover(api, '/api')).toThrow('POST /api/projects/:projectId/undeclared-action has no permission');
  });

  // Bodies a caller without the right may send: whatever they hold, the answer is the refusal (401, 403 or
  // 404), never a 400 about the body, so the body is not read before the permission is checked.
  const GARBAGE: readonly { readonly name: string; readonly type: string; readonly body: string }[] = [
    { name: 'malformed JSON', type: 'application/json', body: '{"name": [1, {' },
    { name: 'JSON of the wrong shape', type: 'application/json', body: JSON.stringify({ zzz: [null, { deep: -1 }], version: 'x', file: 42 }) },
  ];
  type Caller = 'anonymous' | WorldUsername | 'loner';
  const CALLERS: readonly Caller[] = ['anonymous', ...WORLD_USERNAMES, 'loner'];
  // Each caller's role in project A (the path's :projectId); 'hidden' = may not see it (404). From
  // tests/api/helpers/world.ts: the admin is no member, the outsider leads project B, the loner is in no project.
  const roleInA: Record<Exclude<Caller, 'anonymous'>, ProjectRole | null | 'hidden'> = {
    admin: null, lead: 'lead', engineer: 'engineer', reviewer: 'reviewer', viewer: 'viewer', outsider: 'hidden', loner: 'hidden',
  };
  // Library readers are admins and members of any project; editors admins and leads or engineers of an active
  // project (shared/api/index.ts, device library).
  const libraryRole: Record<Exclude<Caller, 'anonymous'>, 'editor' | 'reader' | 'none'> = {
    admin: 'editor', lead: 'editor', engineer: 'editor', reviewer: 'reader', viewer: 'reader', outsider: 'editor', loner: 'none',
  };

  /** The refusal the guard must answer with, or null when the caller may call the route. */
  function refusal(permission: RoutePermission, caller: Caller): 401 | 403 | 404 | null {
    if (permission.kind === 'public') return null;
    if (caller === 'anonymous') return 401;
    const isAdmin = caller === 'admin';
    const role = roleInA[caller];
    switch (permission.kind) {
      case 'signed-in':
        return null;
      case 'admin':
        return isAdmin ? null : 403;
      case 'device-reader':
        return libraryRole[caller] === 'none' ? 404 : null;
      case 'device-editor':
        return libraryRole[caller] === 'none' ? 404 : libraryRole[caller] === 'reader' ? 403 : null;
      case 'project':
        if (role === 'hidden') return 404;
        return permission.actions.some((action) => canDo(role, isAdmin, action)) ? null : 403;
      case 'review-decider':
        if (role === 'hidden') return 404;
        return role === 'lead' || role === 'reviewer' ? null : 403;
      case 'annotator':
        if (role === 'hidden') return 404;
        return role === 'lead' || role === 'engineer' || role === 'reviewer' ? null : 403;
    }
  }

  it('walks every route of the router table for each role with garbage bodies: 401, 403 or 404 before the body is read', async () => {
    const admin = await signedInAgent(app, 'admin');
    const loner = await admin.post('/api/users').send({ username: 'loner', displayName: 'Loner (test)', password: passwordOf('loner') });
    expect(loner.status).toBe(201);
    const agents = new Map<Caller, ReturnType<typeof request.agent> | null>([['anonymous', null]]);
    for (const username of [...WORLD_USERNAMES, 'loner'] as const) agents.set(username, await signedInAgent(app, username));
    const someId = '00000000-0000-4000-8000-000000000000';
    const routes = table().filter((route) => !route.endsWith('/{*splat}'));
    const failures: string[] = [];
    let checked = 0;
    for (const route of routes) {
      const [method, pattern] = route.split(' ') as [string, string];
      const permission = ROUTE_PERMISSIONS[route];
      if (!permission) {
        failures.push(`${route}: no permission declared`);
        continue;
      }
      const path = pattern
        .replace(':projectId', world.projectA)
        .replace(':sifId', world.sifDraft)
        .replace(/:version|:number/, '1')
        .replace(/:\w+/g, someId);
      const verb = method.toLowerCase() as 'get' | 'post' | 'put' | 'patch' | 'delete';
      for (const caller of CALLERS) {
        // Signing in or out again would end the agents' sessions; the sign-in tests above cover those routes.
        if (caller !== 'anonymous' && pattern.startsWith('/api/auth/sign-')) continue;
        for (const garbage of verb === 'get' ? [GARBAGE[1]!] : GARBAGE) {
          const agent = agents.get(caller) ?? request(app);
          const sent = verb === 'get' ? agent.get(`${path}?zzz=%ff&limit=-1`) : agent[verb](path).set('Content-Type', garbage.type).send(garbage.body);
          const response = await sent;
          checked += 1;
          const expected = refusal(permission, caller);
          const what = `${route} as ${caller} with ${garbage.name}: ${response.status} ${JSON.stringify(response.body?.error ?? '')}`;
          if (response.status >= 500) failures.push(`${what} (a server error)`);
          else if (expected !== null && response.status !== expected) failures.push(`${what} (expected ${expected})`);
          else if (expected !== null && !response.body?.error?.message) failures.push(`${what} (no message)`);
          else if (expected === 403 && !/may not|only/.test(response.body.error.message)) failures.push(`${what} (the message names no right)`);
          // Allowed callers get past the guard: no refusal of the caller (a 404 for a record that does not exist is fine).
          else if (expected === null && (response.status === 401 || response.status === 403)) failures.push(`${what} (refused an allowed caller)`);
          else if (expected === null && response.status === 404 && /no project with this id|open to project members only/.test(response.body.error.message)) {
            failures.push(`${what} (refused an allowed caller)`);
          }
        }
      }
    }
    expect(failures, failures.join('\n')).toEqual([]);
    // Every route for each of the eight callers, with one or two bodies.
    expect(checked).toBeGreaterThan(routes.length * 6);
  }, 120_000);
});

describe('SQL only through Drizzle parameters', () => {
  // Issue 10: every value reaches PostgreSQL as a bound parameter. Drizzle's sql`` template and query builder
  // bind every interpolated value; what could splice text into SQL is sql.raw, sql.identifier and a pool or
  // client .query() with a template string. Each such place is listed here with why it is safe.
  const ALLOWED: readonly { readonly file: string; readonly text: string; readonly why: string }[] = [
    { file: 'server/db/schema/checks.ts', text: 'sql.raw(', why: 'CHECK constraints of the schema, from the shared enum constants, quotes doubled' },
    { file: 'server/solves/solve-events.ts', text: 'query(`LISTEN ${SOLVE_EVENTS_CHANNEL}`)', why: 'a constant channel name; LISTEN takes no parameters' },
  ];
  const RISKY = [/sql\.raw\(/, /sql\.identifier\(/, /\.query\(\s*`[^`]*\$\{/, /\.query\(\s*['"][^'"]*['"]\s*\+/, /\.unsafe\(/];

  it('finds no raw SQL text in the server beyond the listed, constant cases', () => {
    const root = fileURLToPath(new URL('../../', import.meta.url));
    const files: string[] = [];
    const walk = (folder: string) => {
      for (const entry of readdirSync(join(root, folder), { withFileTypes: true })) {
        const path = `${folder}/${entry.name}`;
        if (entry.isDirectory()) walk(path);
        else if (entry.name.endsWith('.ts') && !entry.name.endsWith('.test.ts')) files.push(path);
      }
    };
    walk('server');
    expect(files.length).toBeGreaterThan(50);
    const found: string[] = [];
    for (const file of files) {
      const lines = readFileSync(join(root, file), 'utf8').split('\n');
      lines.forEach((line, index) => {
        if (!RISKY.some((pattern) => pattern.test(line))) return;
        if (ALLOWED.some((allowed) => allowed.file === file && line.includes(allowed.text))) return;
        found.push(`${file}:${index + 1}: ${line.trim()}`);
      });
    }
    expect(found, `raw SQL outside the listed cases:\n${found.join('\n')}`).toEqual([]);
    // The scan itself finds what it looks for: each listed case is still there.
    for (const allowed of ALLOWED) expect(readFileSync(join(root, allowed.file), 'utf8')).toContain(allowed.text);
  });

  it('stores and finds SQL-looking text as plain text, and the tables stay as they were', async () => {
    const agent = await signedInAgent(app, 'lead');
    const payloads = ["'; DROP TABLE users; --", "x' OR '1'='1", '%_\\', '"; SELECT pg_sleep(5); --', "Robert'); DELETE FROM sifs; --"];
    const usersBefore = (await agent.get('/api/users')).body.length;
    const sifsBefore = (await agent.get(`/api/projects/${world.projectA}/sifs`)).body.total;
    expect(usersBefore).toBeGreaterThan(0);
    expect(sifsBefore).toBeGreaterThan(0);
    for (const payload of payloads) {
      const search = await agent.get(`/api/projects/${world.projectA}/sifs`).query({ search: payload });
      expect(search.status, payload).toBe(200);
      expect(search.body.items, payload).toEqual([]);
      const created = await agent.post('/api/projects').send({ name: `Check ${payload}`, description: payload });
      expect(created.status, payload).toBe(201);
      expect(created.body.name).toBe(`Check ${payload}`);
      const devices = await agent.get('/api/devices').query({ search: payload });
      expect(devices.status, payload).toBe(200);
    }
    // "%" and "_" are matched literally, not as LIKE wildcards: the search for "%_\" found nothing above.
    expect((await agent.get('/api/users')).body.length).toBe(usersBefore);
    expect((await agent.get(`/api/projects/${world.projectA}/sifs`)).body.total).toBe(sifsBefore);
    const names = (await agent.get('/api/projects')).body.map((project: { name: string }) => project.name);
    for (const payload of payloads) expect(names).toContain(`Check ${payload}`);
  });
});
