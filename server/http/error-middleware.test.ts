import express from 'express';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import type { Logger } from '../db/client.js';
import { apiErrors } from '../errors.js';
import { errorMiddleware, unknownApiRoute } from './error-middleware.js';
import { parseInput } from './validate.js';

function appThrowing(error: unknown, logged: string[]) {
  const logger: Logger = { info: () => undefined, warn: (message) => logged.push(message), error: (message) => logged.push(message) };
  const app = express();
  app.get('/boom', () => {
    throw error;
  });
  app.use('/api', unknownApiRoute);
  app.use(errorMiddleware(logger));
  return app;
}

describe('errorMiddleware', () => {
  it('hides the internals of an unexpected error and logs it', async () => {
    const logged: string[] = [];
    const response = await request(appThrowing(new Error('relation "secret_table" does not exist at /srv/app.ts:12'), logged)).get('/boom');
    expect(response.status).toBe(500);
    expect(response.body).toEqual({ error: { code: 'internal_error', message: 'something went wrong on the server; the error was logged' } });
    expect(response.text).not.toContain('secret_table');
    expect(logged).toEqual(['GET /boom failed']);
  });

  it('renders a typed error with its status, code and details', async () => {
    const response = await request(appThrowing(apiErrors.versionConflict('stale', { version: 3 }), [])).get('/boom');
    expect(response.status).toBe(409);
    expect(response.body).toEqual({ error: { code: 'version_conflict', message: 'stale', details: { current: { version: 3 } } } });
  });

  it('turns a refused database connection (also wrapped as a cause) into 503', async () => {
    const refused = Object.assign(new Error('connect ECONNREFUSED 127.0.0.1:1'), { code: 'ECONNREFUSED' });
    const wrapped = new Error('Failed query: select 1', { cause: refused });
    const response = await request(appThrowing(wrapped, [])).get('/boom');
    expect(response.status).toBe(503);
    expect(response.body.error.code).toBe('service_unavailable');
  });

  it('answers JSON 404 for unknown /api paths', async () => {
    const response = await request(appThrowing(new Error('unused'), [])).post('/api/unknown');
    expect(response.status).toBe(404);
    expect(response.body.error).toEqual({ code: 'not_found', message: 'no API route POST /api/unknown' });
  });
});

describe('parseInput', () => {
  const schema = z.strictObject({ name: z.string().min(1, 'must not be empty'), nested: z.strictObject({ count: z.number() }) });

  it('names every field at fault with dotted paths and never echoes the input', () => {
    try {
      parseInput(schema, { name: '', nested: { count: 'hunter2' }, extra: 1 }, 'body');
      expect.unreachable('parseInput accepted a bad body');
    } catch (error) {
      const details = (error as { details: { issues: { path: string; message: string }[] } }).details;
      expect(details.issues).toEqual([
        { path: 'name', message: 'must not be empty' },
        { path: 'nested.count', message: 'Invalid input: expected number, received string' },
        { path: 'extra', message: 'is not a known field' },
      ]);
      expect(JSON.stringify(details)).not.toContain('hunter2');
      expect((error as Error).message).toBe('name: must not be empty; nested.count: Invalid input: expected number, received string; extra: is not a known field');
    }
  });
});
