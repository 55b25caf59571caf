import { existsSync } from 'node:fs';
import path from 'node:path';
import express, { type Express } from 'express';

const MISSING_BUILD_PAGE = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>Proofline: client not built</title></head>
<body style="font-family: sans-serif; max-width: 40rem; margin: 4rem auto; line-height: 1.5">
<h1>The Proofline client is not built</h1>
<p>The API is running, but there is no built client in <code>dist/proofline/browser</code>.</p>
<p>Run <code>npm start</code> (it builds the client), or <code>npx ng build</code> and restart the server.</p>
</body></html>`;

/**
 * Serves the built Angular client with a single-page fallback: any GET outside /api that is not a file
 * gets index.html, so deep links like /projects/123 load the app. Hashed bundles are cached for a year;
 * index.html never, so a new build is picked up at once.
 */
export function serveClient(app: Express, clientDir: string | null): void {
  const index = clientDir ? path.join(clientDir, 'index.html') : null;
  if (clientDir && index && existsSync(index)) {
    app.use(
      express.static(clientDir, {
        index: false,
        setHeaders: (res, filePath) => {
          const hashed = /-[A-Z0-9]{8,}\.(js|css|woff2?)$/i.test(filePath);
          res.setHeader('Cache-Control', hashed ? 'public, max-age=31536000, immutable' : 'no-cache');
        },
      }),
    );
    app.get('/{*splat}', (_req, res) => {
      res.setHeader('Cache-Control', 'no-cache');
      res.sendFile(index);
    });
    return;
  }
  app.get('/{*splat}', (_req, res) => {
    res.status(503).type('html').send(MISSING_BUILD_PAGE);
  });
}
