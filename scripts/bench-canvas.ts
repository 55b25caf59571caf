import { createReadStream, existsSync, statSync } from 'node:fs';
import { createServer } from 'node:http';
import { extname, join, normalize } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from 'playwright-core';

// Canvas benchmark: serves the production build, opens /canvas-bench (a synthetic 300-card fault tree in
// the real canvas) in Debian's chromium, and prints the ELK layout time (in the web worker) and the frame
// times while the canvas is panned with the mouse. Run `npx ng build --configuration production` first.
// Usage: npx tsx scripts/bench-canvas.ts [--screenshot path.png] [--trace trace.json]
// (--screenshot writes path-fitted.png, path-actual-size.png and path-after.png; --trace records a
// Chromium performance trace of the panning at 100 %, to open in the browser's performance panel)

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
  type Stats = { frames: number; meanMs: number; p95Ms: number; maxMs: number; slowFrames: number };
  type Point = { x: number; y: number };
  /** Whether a press at the point lands on the canvas background (no card, no connection), so a drag pans. */
  const onBackground = (point: Point): Promise<boolean> =>
    page.evaluate(({ x, y }) => {
      const hit = document.elementFromPoint(x, y);
      return hit !== null && hit.closest('f-flow') !== null && hit.closest('[data-node], f-connection, f-minimap, .toolbar') === null;
    }, point);
  /** Pans by dragging the background back and forth from `start`, recording the frame times meanwhile. */
  const pan = async (start: Point, distance: number): Promise<Stats> => {
    for (const point of [start, { x: start.x + distance, y: start.y }]) {
      if (!(await onBackground(point))) throw new Error(`the drag at ${point.x}, ${point.y} would not start on the canvas background`);
    }
    await page.evaluate(() => (window as unknown as { plBench: { startFrames(): void } }).plBench.startFrames());
    for (let stroke = 0; stroke < PAN_STROKES; stroke++) {
      await page.mouse.move(start.x, start.y);
      await page.mouse.down();
      await page.mouse.move(start.x + (stroke % 2 === 0 ? distance : -distance), start.y, { steps: 60 });
      await page.mouse.up();
    }
    return page.evaluate(() => (window as unknown as { plBench: { stopFrames(): Stats } }).plBench.stopFrames());
  };
  const cardBoxes = (): Promise<{ left: number; top: number; right: number; bottom: number }[]> =>
    page.evaluate(() =>
      Array.from(document.querySelectorAll('[data-node]'), (card) => {
        const rect = card.getBoundingClientRect();
        return { left: rect.left, top: rect.top, right: rect.right, bottom: rect.bottom };
      }),
    );
  const screenshotIndex = process.argv.indexOf('--screenshot');
  const screenshotPath = (suffix: string): string | null => (screenshotIndex > 0 ? process.argv[screenshotIndex + 1].replace(/\.png$/, `-${suffix}.png`) : null);
  const shoot = async (suffix: string): Promise<void> => {
    const path = screenshotPath(suffix);
    if (path) await page.screenshot({ path });
  };

  // 1. The whole tree fitted in the view (every card on screen, small): the drag runs along the empty
  //    band above the cards.
  await shoot('fitted');
  const fittedTop = Math.min(...(await cardBoxes()).map((card) => card.top));
  const fittedStart = { x: flow.x + flow.width * 0.3, y: (flow.y + Math.max(flow.y, fittedTop)) / 2 };
  const fitted = fittedTop - flow.y > 40 ? await pan(fittedStart, 240) : null;

  // 2. At 100 % (the "0" command), the view full of readable cards: cards sit every 240 px in columns,
  //    so a drag that starts in the gap between two columns and moves by one column grabs no card, and
  //    the next stroke starts in a gap again.
  await page.mouse.click(fittedStart.x, fittedStart.y);
  await page.keyboard.press('0');
  await page.waitForTimeout(800);
  await shoot('actual-size');
  const cards = await cardBoxes();
  const inView = cards.filter((card) => card.left > flow.x + 20 && card.right < flow.x + flow.width / 2 && card.top > flow.y && card.bottom < flow.y + flow.height);
  if (inView.length === 0) throw new Error('no card fully in view at 100 %');
  // Connections cross the gaps here and there: the first height where both ends of the stroke are bare.
  let gapStart: Point | null = null;
  for (let y = flow.y + flow.height / 2; y < flow.y + flow.height - 20 && !gapStart; y += 5) {
    const candidate = { x: inView[0].right + 12, y };
    if ((await onBackground(candidate)) && (await onBackground({ x: candidate.x + 240, y }))) gapStart = candidate;
  }
  if (!gapStart) {
    const x = inView[0].right + 12;
    const hits = await page.evaluate(({ x, top }) => Array.from({ length: 12 }, (_, index) => { const hit = document.elementFromPoint(x, top + index * 40); return hit ? `${hit.tagName}.${hit.getAttribute('class')}` : 'none'; }), { x, top: flow.y + 20 });
    throw new Error(`no bare gap between the columns at 100 % (x ${x}: ${hits.join(' | ')})`);
  }
  const traceIndex = process.argv.indexOf('--trace');
  if (traceIndex > 0) await browser.startTracing(page, { path: process.argv[traceIndex + 1], categories: ['devtools.timeline', 'disabled-by-default-devtools.timeline', 'v8.execute', 'blink', 'cc', 'viz'] });
  const actual = await pan(gapStart, 240);
  if (traceIndex > 0) await browser.stopTracing();
  await shoot('after');

  const layout = info.layoutMs as number[];
  const os = await import('node:os');
  console.log(`canvas benchmark: ${info.nodeCount} cards (${info.cards} rendered), chromium headless, software rendering (--disable-gpu)`);
  console.log(`ELK layered layout in the web worker: ${layout.map((ms) => `${ms.toFixed(0)} ms`).join(', ')} (first run includes starting the worker)`);
  const line = (label: string, stats: Stats): string =>
    `${label} (${PAN_STROKES} mouse drags): ${stats.frames} frames, mean ${stats.meanMs.toFixed(1)} ms, p95 ${stats.p95Ms.toFixed(1)} ms, max ${stats.maxMs.toFixed(1)} ms per frame, ${stats.slowFrames} frames over 33.4 ms (${((100 * stats.slowFrames) / Math.max(1, stats.frames)).toFixed(1)} %)`;
  if (fitted) console.log(line('panning the whole tree fitted in the view', fitted));
  else console.log('panning the whole tree fitted in the view: skipped (no empty band above the cards to drag on)');
  console.log(line('panning at 100 %, the view full of cards', actual));
  console.log(`load average while measured: ${os.loadavg().map((value) => value.toFixed(1)).join(' ')} on ${os.cpus().length} cores`);
} finally {
  await browser.close();
  server.close();
}
