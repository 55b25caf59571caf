import { mkdtempSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import express from 'express';
import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { serveClient } from './client-files.js';

const dir = mkdtempSync(path.join(tmpdir(), 'proofline-client-'));
mkdirSync(path.join(dir, 'media'));
writeFileSync(path.join(dir, 'index.html'), '<!doctype html><title>Proofline</title><app-root></app-root>');
writeFileSync(path.join(dir, 'main-ABCDEF12.js'), 'console.log(1)');
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('serveClient', () => {
  const app = express();
  serveClient(app, dir);

  it('serves index.html for deep links (single-page fallback), never cached', async () => {
    const response = await request(app).get('/projects/abc/sifs');
    expect(response.status).toBe(200);
    expect(response.text).toContain('<app-root>');
    expect(response.headers['cache-control']).toBe('no-cache');
  });

  it('serves hashed bundles with a long cache', async () => {
    const response = await request(app).get('/main-ABCDEF12.js');
    expect(response.status).toBe(200);
    expect(response.headers['cache-control']).toContain('immutable');
  });

  it('shows a clear page when the build is missing', async () => {
    const bare = express();
    serveClient(bare, path.join(dir, 'missing'));
    const response = await request(bare).get('/');
    expect(response.status).toBe(503);
    expect(response.text).toContain('npm start');
  });
});
