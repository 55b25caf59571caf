import { eq } from 'drizzle-orm';
import type { Express } from 'express';
import request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { projectMembers, projects } from '../../server/db/schema/projects.js';
import { sifs } from '../../server/db/schema/sifs.js';
import { users } from '../../server/db/schema/users.js';
import { createTestApp, signedInAgent } from './helpers/test-app.js';
import { openTestDatabase, resetDatabase, type TestDatabase } from './helpers/test-database.js';
import { passwordOf, seedWorld, type World, type WorldUsername } from './helpers/world.js';

// Every API route for every role, allowed and refused. The role rules are ours (shared/api/index.ts);
// "outsider" is a signed-in user who is not a member of project A (leads project B) and must get 404.

type Caller = WorldUsername | 'anonymous';
const CALLERS: readonly Caller[] = ['anonymous', 'admin', 'lead', 'engineer', 'reviewer', 'viewer', 'outsider'];

interface RouteCase {
  readonly name: string;
  readonly method: 'get' | 'post' | 'patch' | 'put' | 'delete';
  readonly path: (world: World) => string;
  readonly body?: (world: World, caller: WorldUsername) => object;
  /** Status for each signed-in caller. */
  readonly expected: Record<WorldUsername, number>;
  /** Status without a session; 401 unless stated. */
  readonly anonymous?: number;
  /** Reads the state the route changes: it must differ after an allowed call and not after a refused one. */
  readonly probe?: (database: TestDatabase, world: World) => Promise<unknown>;
}

const everyone = (status: number): Record<WorldUsername, number> => ({
  admin: status, lead: status, engineer: status, reviewer: status, viewer: status, outsider: status,
});
const inProjectA = (allowed: WorldUsername[], status: number): Record<WorldUsername, number> => ({
  admin: allowed.includes('admin') ? status : 403,
  lead: allowed.includes('lead') ? status : 403,
  engineer: allowed.includes('engineer') ? status : 403,
  reviewer: allowed.includes('reviewer') ? status : 403,
  viewer: allowed.includes('viewer') ? status : 403,
  outsider: 404,
});
const readersOfA: WorldUsername[] = ['admin', 'lead', 'engineer', 'reviewer', 'viewer'];

const sifOf = async ({ db }: TestDatabase, id: string) => (await db.select().from(sifs).where(eq(sifs.id, id)))[0];

const ROUTES: readonly RouteCase[] = [
  { name: 'GET /api/health', method: 'get', path: () => '/api/health', expected: everyone(200), anonymous: 200 },
  {
    name: 'POST /api/auth/sign-in',
    method: 'post',
    path: () => '/api/auth/sign-in',
    body: (_world, caller) => ({ username: caller, password: passwordOf(caller) }),
    expected: everyone(200),
    anonymous: 200,
  },
  { name: 'POST /api/auth/sign-out', method: 'post', path: () => '/api/auth/sign-out', expected: everyone(204), anonymous: 204 },
  { name: 'GET /api/auth/me', method: 'get', path: () => '/api/auth/me', expected: everyone(200) },
  {
    name: 'POST /api/auth/password',
    method: 'post',
    path: () => '/api/auth/password',
    body: (_world, caller) => ({ currentPassword: passwordOf(caller), newPassword: 'a-brand-new-password' }),
    expected: everyone(204),
  },
  { name: 'GET /api/users', method: 'get', path: () => '/api/users', expected: everyone(200) },
  {
    name: 'POST /api/users',
    method: 'post',
    path: () => '/api/users',
    body: () => ({ username: 'newcomer', displayName: 'New Comer', password: 'newcomer-password' }),
    expected: { ...everyone(403), admin: 201 },
    probe: async ({ db }) => (await db.select().from(users).where(eq(users.username, 'newcomer'))).length,
  },
  {
    name: 'PATCH /api/users/:userId',
    method: 'patch',
    path: (world) => `/api/users/${world.userId.viewer}`,
    body: () => ({ displayName: 'Renamed Viewer' }),
    expected: { ...everyone(403), admin: 200 },
    probe: async ({ db }, world) => (await db.select().from(users).where(eq(users.id, world.userId.viewer)))[0].displayName,
  },
  { name: 'GET /api/projects', method: 'get', path: () => '/api/projects', expected: everyone(200) },
  {
    name: 'POST /api/projects',
    method: 'post',
    path: () => '/api/projects',
    body: () => ({ name: 'A new project' }),
    expected: everyone(201),
    probe: async ({ db }) => (await db.select().from(projects)).length,
  },
  { name: 'GET /api/projects/:projectId', method: 'get', path: (w) => `/api/projects/${w.projectA}`, expected: inProjectA(readersOfA, 200) },
  {
    name: 'PATCH /api/projects/:projectId',
    method: 'patch',
    path: (w) => `/api/projects/${w.projectA}`,
    body: () => ({ name: 'Project A, renamed' }),
    expected: inProjectA(['admin', 'lead'], 200),
    probe: async ({ db }, w) => (await db.select().from(projects).where(eq(projects.id, w.projectA)))[0].name,
  },
  {
    name: 'POST /api/projects/:projectId/archive',
    method: 'post',
    path: (w) => `/api/projects/${w.projectA}/archive`,
    expected: inProjectA(['admin', 'lead'], 200),
    probe: async ({ db }, w) => (await db.select().from(projects).where(eq(projects.id, w.projectA)))[0].archived,
  },
  {
    name: 'GET /api/projects/:projectId/members',
    method: 'get',
    path: (w) => `/api/projects/${w.projectA}/members`,
    expected: inProjectA(readersOfA, 200),
  },
  {
    name: 'PUT /api/projects/:projectId/members/:userId',
    method: 'put',
    path: (w) => `/api/projects/${w.projectA}/members/${w.userId.outsider}`,
    body: () => ({ role: 'viewer' }),
    expected: inProjectA(['admin', 'lead'], 200),
    probe: async ({ db }, w) => (await db.select().from(projectMembers).where(eq(projectMembers.projectId, w.projectA))).length,
  },
  {
    name: 'DELETE /api/projects/:projectId/members/:userId',
    method: 'delete',
    path: (w) => `/api/projects/${w.projectA}/members/${w.userId.engineer}`,
    expected: inProjectA(['admin', 'lead'], 204),
    probe: async ({ db }, w) => (await db.select().from(projectMembers).where(eq(projectMembers.projectId, w.projectA))).length,
  },
  {
    name: 'GET /api/projects/:projectId/sifs',
    method: 'get',
    path: (w) => `/api/projects/${w.projectA}/sifs`,
    expected: inProjectA(readersOfA, 200),
  },
  {
    name: 'POST /api/projects/:projectId/sifs',
    method: 'post',
    path: (w) => `/api/projects/${w.projectA}/sifs`,
    body: () => ({
      tag: 'FZT-1505',
      title: 'Low flow trip',
      hazardousEvent: 'Loss of cooling flow',
      demandMode: 'low',
      target: { kind: 'rrf', value: 200 },
      missionHours: 87_600,
    }),
    expected: inProjectA(['lead', 'engineer'], 201),
    probe: async ({ db }, w) => (await db.select().from(sifs).where(eq(sifs.projectId, w.projectA))).length,
  },
  {
    name: 'GET /api/projects/:projectId/sifs/:sifId',
    method: 'get',
    path: (w) => `/api/projects/${w.projectA}/sifs/${w.sifDraft}`,
    expected: inProjectA(readersOfA, 200),
  },
  {
    name: 'PATCH /api/projects/:projectId/sifs/:sifId (content)',
    method: 'patch',
    path: (w) => `/api/projects/${w.projectA}/sifs/${w.sifDraft}`,
    body: () => ({ version: 1, title: 'Separator high-pressure shutdown, revised' }),
    expected: inProjectA(['lead', 'engineer'], 200),
    probe: async (database, w) => (await sifOf(database, w.sifDraft)).title,
  },
  {
    name: 'PATCH /api/projects/:projectId/sifs/:sifId (approve)',
    method: 'patch',
    path: (w) => `/api/projects/${w.projectA}/sifs/${w.sifInReview}`,
    body: () => ({ version: 1, status: 'approved' }),
    expected: inProjectA(['lead', 'reviewer'], 200),
    probe: async (database, w) => (await sifOf(database, w.sifInReview)).status,
  },
  {
    name: 'POST /api/projects/:projectId/sifs/:sifId/archive',
    method: 'post',
    path: (w) => `/api/projects/${w.projectA}/sifs/${w.sifDraft}/archive`,
    expected: inProjectA(['lead', 'engineer'], 200),
    probe: async (database, w) => (await sifOf(database, w.sifDraft)).archived,
  },
];

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

describe.each(ROUTES)('$name', (route) => {
  it.each(CALLERS)('as %s', async (caller) => {
    const client = caller === 'anonymous' ? request(app) : await signedInAgent(app, caller);
    const before = await route.probe?.(database, world);
    let call = client[route.method](route.path(world));
    if (route.body) call = call.send(route.body(world, caller === 'anonymous' ? 'viewer' : caller));
    const response = await call;
    const expected = caller === 'anonymous' ? (route.anonymous ?? 401) : route.expected[caller];
    expect(response.status, JSON.stringify(response.body)).toBe(expected);
    if (expected >= 400) {
      expect(response.body.error.code).toBe({ 401: 'unauthenticated', 403: 'forbidden', 404: 'not_found' }[expected]);
      expect(response.body.error.message).toMatch(/\w/);
    }
    if (route.probe) {
      const after = await route.probe(database, world);
      if (expected < 400) expect(after).not.toEqual(before);
      else expect(after).toEqual(before);
    }
  });
});
