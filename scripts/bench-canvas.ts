import { createReadStream, existsSync, statSync } from 'node:fs';
import { createServer } from 'node:http';
import { extname, join, normalize } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from 'playwright-core';

// Canvas benchmark: serves the production build, opens /canvas-bench (a synthetic 300-card fault tree in
// the real canvas) in Debian's chromium, and prints the ELK layout time (in the web worker) and the frame
// times while the canvas is panned with the mouse. Run `npx ng build --configuration production` first.
// Usage: npx tsx scripts/bench-canvas.ts [--screenshot path.png]

const ROOT = fileURLToPath(new URL('../dist/proofline/browser/', import.meta.url));
const TYPES: Record<string, string> = { '.html': 'text/html', '.js': 'text/javascript', '.css': 'text/css', '.woff2': 'font/woff2', '.ico': 'image/x-icon', '.svg': 'image/svg+xml' };
const PAN_STROKES = 6;

if (!existsSync(join(ROOT, 'index.html'))) {
  console.error('The client is not built: run `npx ng build --configuration production` first.');
  process.exit(1);
}

const server = createServer((request, response) => {
  const path = normalize(decodeURIComponent(new URL(request.url ?? '/', 'http://localhost').pathname)).replace(/^(\.\.[/\\])+/, '');
  let file = join(ROOT, path);
  if (!file.startsWith(ROOT) || !existsSync(file) || statSync(file).isDirectory()) file = join(ROOT, 'index.html');
  response.writeHead(200, { 'Content-Type': TYPES[extname(file)] ?? 'application/octet-stream' });
  createReadStream(file).pipe(response);
});
await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
const address = server.address();
const port = typeof address === 'object' && address ? address.port : 0;

const browser = await chromium.launch({
  executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
  args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
});
try {
  const page = await browser.newPage({ viewport: { width: 1600, height: 1000 } });
  await page.goto(`http://127.0.0.1:${port}/canvas-bench`);
  await page.waitForFunction(() => (window as unknown as { plBench?: { ready: boolean } }).plBench?.ready === true, undefined, { timeout: 120_000 });
  await page.waitForTimeout(500);
  const info = await page.evaluate(() => {
    const bench = (window as unknown as { plBench: { nodeCount: number; layoutMs: number[] } }).plBench;
    return { nodeCount: bench.nodeCount, layoutMs: bench.layoutMs, cards: document.querySelectorAll('[data-node]').length };
  });
  const flow = await page.locator('f-flow').boundingBox();
  if (!flow) throw new Error('no canvas on the benchmark page');
  type Stats = { frames: number; meanMs: number; p95Ms: number; maxMs: number };
  // Pans by dragging the canvas background back and forth, recording the frame times meanwhile.
  const pan = async (): Promise<Stats> => {
    await page.evaluate(() => (window as unknown as { plBench: { startFrames(): void } }).plBench.startFrames());
    // The page shows the grid at scale 1 from its corner: cards every 240 px, 216 px wide. A drag that
    // starts in the gap between two columns and moves by one column pans the canvas (it grabs no card),
    // and the next stroke starts in a gap again.
    const start = { x: flow.x + 228, y: flow.y + flow.height / 2 };
    for (let stroke = 0; stroke < PAN_STROKES; stroke++) {
      await page.mouse.move(start.x, start.y);
      await page.mouse.down();
      await page.mouse.move(start.x + (stroke % 2 === 0 ? 240 : -240), start.y, { steps: 60 });
      await page.mouse.up();
    }
    return page.evaluate(() => (window as unknown as { plBench: { stopFrames(): Stats } }).plBench.stopFrames());
  };
  const screenshotIndex = process.argv.indexOf('--screenshot');
  if (screenshotIndex > 0) await page.screenshot({ path: process.argv[screenshotIndex + 1].replace(/\.png$/, '-before.png') });
  const fitted = await pan();
  if (screenshotIndex > 0) await page.screenshot({ path: process.argv[screenshotIndex + 1] });
  const layout = info.layoutMs as number[];
  console.log(`canvas benchmark: ${info.nodeCount} cards (${info.cards} rendered), chromium headless, software rendering (--disable-gpu)`);
  console.log(`ELK layered layout in the web worker: ${layout.map((ms) => `${ms.toFixed(0)} ms`).join(', ')} (first run includes starting the worker)`);
  const line = (label: string, stats: Stats): string =>
    `${label} (${PAN_STROKES} mouse drags): ${stats.frames} frames, mean ${stats.meanMs.toFixed(1)} ms, p95 ${stats.p95Ms.toFixed(1)} ms, max ${stats.maxMs.toFixed(1)} ms per frame`;
  console.log(line('panning at scale 1, the view full of cards', fitted));
  console.log(`load average while measured: ${(await import('node:os')).loadavg().map((value) => value.toFixed(1)).join(' ')} on ${(await import('node:os')).cpus().length} cores`);
} finally {
  await browser.close();
  server.close();
}
