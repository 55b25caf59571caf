import { createReadStream, existsSync, statSync } from 'node:fs';
import { createServer } from 'node:http';
import { cpus, loadavg } from 'node:os';
import { extname, join, normalize } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type Page } from 'playwright-core';

// Results chart benchmark: serves the production build, opens /chart-bench (the PFD(t) chart of the
// results page with a synthetic 10,000-point curve) in Debian's chromium, and prints the first-render
// time and the frame times while the chart is zoomed with the wheel and panned by dragging. Each figure
// is taken over several runs, each in a fresh page; the best run is the figure, the others show the
// spread (the machine is shared). Run `npx ng build --configuration production` first.
// Usage: npx tsx scripts/bench-chart.ts [--runs 5] [--variant unsampled] [--screenshot path.png]

const ROOT = fileURLToPath(new URL('../dist/proofline/browser/', import.meta.url));
const TYPES: Record<string, string> = { '.html': 'text/html', '.js': 'text/javascript', '.css': 'text/css', '.woff2': 'font/woff2', '.ico': 'image/x-icon', '.svg': 'image/svg+xml' };
const WHEEL_STEPS = 12;
const PAN_STROKES = 6;

function argument(name: string): string | undefined {
  const index = process.argv.indexOf(name);
  return index > 0 ? process.argv[index + 1] : undefined;
}

const runs = Math.max(1, Number(argument('--runs') ?? 5));
const variant = argument('--variant') === 'unsampled' ? 'unsampled' : 'shipped';

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

type Stats = { frames: number; meanMs: number; p95Ms: number; maxMs: number };
interface Run {
  readonly firstRenderMs: number;
  readonly zoom: Stats;
  readonly pan: Stats;
  readonly load: number;
}

async function record(page: Page, gesture: () => Promise<void>): Promise<Stats> {
  await page.evaluate(() => (window as unknown as { plChartBench: { startFrames(): void } }).plChartBench.startFrames());
  await gesture();
  await page.waitForTimeout(100);
  return page.evaluate(() => (window as unknown as { plChartBench: { stopFrames(): Stats } }).plChartBench.stopFrames());
}

const browser = await chromium.launch({
  executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
  args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
});
const results: Run[] = [];
try {
  for (let run = 0; run < runs; run++) {
    const page = await browser.newPage({ viewport: { width: 1300, height: 600 } });
    await page.goto(`http://127.0.0.1:${port}/chart-bench${variant === 'unsampled' ? '?variant=unsampled' : ''}`);
    await page.waitForFunction(() => (window as unknown as { plChartBench?: { firstRenderMs: number | null } }).plChartBench?.firstRenderMs != null, undefined, { timeout: 120_000 });
    const firstRenderMs = await page.evaluate(() => (window as unknown as { plChartBench: { firstRenderMs: number } }).plChartBench.firstRenderMs);
    const chart = await page.locator('.chart').boundingBox();
    if (!chart) throw new Error('no chart on the benchmark page');
    // Inside the plot area (grid: 72 px left, 72 px bottom): the wheel zooms in step by step around the
    // middle, then drags pan the zoomed window left and right.
    const middle = { x: chart.x + chart.width / 2, y: chart.y + (chart.height - 72) / 2 };
    await page.mouse.move(middle.x, middle.y);
    const zoom = await record(page, async () => {
      for (let step = 0; step < WHEEL_STEPS; step++) {
        await page.mouse.wheel(0, -120);
        await page.waitForTimeout(30);
      }
    });
    const pan = await record(page, async () => {
      for (let stroke = 0; stroke < PAN_STROKES; stroke++) {
        await page.mouse.move(middle.x, middle.y);
        await page.mouse.down();
        await page.mouse.move(middle.x + (stroke % 2 === 0 ? 300 : -300), middle.y, { steps: 40 });
        await page.mouse.up();
      }
    });
    const screenshot = argument('--screenshot');
    if (screenshot && run === 0) await page.screenshot({ path: screenshot });
    results.push({ firstRenderMs, zoom, pan, load: loadavg()[0] });
    await page.close();
  }
} finally {
  await browser.close();
  server.close();
}

const best = <T>(items: readonly T[], key: (item: T) => number): T => [...items].sort((a, b) => key(a) - key(b))[0];
const frames = (stats: Stats) => `${stats.frames} frames, mean ${stats.meanMs.toFixed(1)} ms, p95 ${stats.p95Ms.toFixed(1)} ms, max ${stats.maxMs.toFixed(1)} ms per frame`;
console.log(`chart benchmark: the PFD(t) chart with 10,000 points (${variant === 'shipped' ? 'options as shipped: LTTB sampling, no animation' : 'LTTB sampling off'}), chromium headless, software rendering (--disable-gpu), ${runs} runs`);
console.log(`first render (options built, drawn, ECharts finished), best of ${runs}: ${best(results, (item) => item.firstRenderMs).firstRenderMs.toFixed(0)} ms; all: ${results.map((item) => item.firstRenderMs.toFixed(0)).join(', ')} ms`);
const zoom = best(results, (item) => item.zoom.p95Ms).zoom;
const pan = best(results, (item) => item.pan.p95Ms).pan;
console.log(`zoom (${WHEEL_STEPS} wheel steps), best run by p95: ${frames(zoom)}; p95 of all runs: ${results.map((item) => item.zoom.p95Ms.toFixed(1)).join(', ')} ms`);
console.log(`pan (${PAN_STROKES} drags on the zoomed chart), best run by p95: ${frames(pan)}; p95 of all runs: ${results.map((item) => item.pan.p95Ms.toFixed(1)).join(', ')} ms`);
console.log(`load average (1 min) at each run: ${results.map((item) => item.load.toFixed(1)).join(', ')} on ${cpus().length} cores`);
