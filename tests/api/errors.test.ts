import type { Express } from 'express';
import request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, signedInAgent } from './helpers/test-app.js';
import { openTestDatabase, resetDatabase, type TestDatabase } from './helpers/test-database.js';
import { seedWorld } from './helpers/world.js';
import { APP_REQUEST_HEADER } from '../../shared/api/request-header.js';

let database: TestDatabase;
let app: Express;

beforeAll(async () => {
  database = await openTestDatabase();
  app = createTestApp(database);
});
afterAll(async () => database.close());
beforeEach(async () => {
  await resetDatabase(database.db);
  await seedWorld(database.db);
});

describe('error bodies', () => {
  it('answers an unknown /api route with a JSON 404, signed in or not', async () => {
    for (const client of [request(app), await signedInAgent(app, 'lead')]) {
      const response = await client.delete('/api/no-such-thing?x=1');
      expect(response.status).toBe(404);
      expect(response.headers['content-type']).toMatch(/application\/json/);
      expect(response.body).toEqual({ error: { code: 'not_found', message: 'no API route DELETE /api/no-such-thing' } });
    }
  });

  it('answers malformed JSON with 400 naming the body', async () => {
    const response = await request(app).post('/api/auth/sign-in').set('Content-Type', 'application/json').send('{"username": ');
    expect(response.status).toBe(400);
    expect(response.body.error).toMatchObject({ code: 'validation_failed', message: 'body: is not valid JSON' });
  });

  it('answers a body that is not JSON with 400 naming the fields', async () => {
    // With the client's header (a form body without it is refused as possible CSRF, tests/api/security.test.ts).
    const response = await request(app).post('/api/auth/sign-in').set(APP_REQUEST_HEADER, '1').type('form').send('username=lead&password=x');
    expect(response.status).toBe(400);
    expect(response.body.error.details.issues[0]).toEqual({ path: 'body', message: 'is required' });
  });

  it('answers an oversized body with 413', async () => {
    const response = await request(app).post('/api/auth/sign-in').send({ username: 'lead', password: 'x'.repeat(1_100_000) });
    expect(response.status).toBe(413);
    expect(response.body.error.code).toBe('payload_too_large');
  });

  it('sets security headers and never caches API answers', async () => {
    const response = await request(app).get('/api/health');
    expect(response.status).toBe(200);
    expect(response.body).toEqual({ status: 'ok' });
    expect(response.headers['content-security-policy']).toContain("default-src 'self'");
    expect(response.headers['x-content-type-options']).toBe('nosniff');
    expect(response.headers['cache-control']).toBe('no-store');
    expect(response.headers['x-powered-by']).toBeUndefined();
  });

  it('serves a clear page for browser paths when the client is not built', async () => {
    const response = await request(app).get('/projects/123');
    expect(response.status).toBe(503);
    expect(response.text).toContain('The Proofline client is not built');
  });
});
