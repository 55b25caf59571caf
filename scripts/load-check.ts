import type { AddressInfo } from 'node:net';
import { availableParallelism, loadavg } from 'node:os';
import { performance } from 'node:perf_hooks';
import { sql } from 'drizzle-orm';
import type { FaultTreeModel } from '../shared/model-file.js';
import { solveList, solve as solveSchema, type SolveSummary } from '../shared/api/solves.js';
import { SOLVER_VERSION } from '../solver/index.js';
import { createApp } from '../server/app.js';
import { hashPassword } from '../server/auth/passwords.js';
import { createDatabase, createPool } from '../server/db/client.js';
import { runMigrations } from '../server/db/migrate.js';
import { projectMembers, projects } from '../server/db/schema/projects.js';
import { sifs } from '../server/db/schema/sifs.js';
import { users } from '../server/db/schema/users.js';
import { consoleLogger } from '../server/logger.js';
import { solvingConfigFromEnv, startSolving } from '../server/solves/solving.js';

/*
 * Load check (npm run load-check): the API and one solver process in one Node process, as `npm start`
 * runs them, on a database of its own (proofline_load, emptied first). It measures the latency of 200
 * reads (the SIF register page and a model with its draft, 4 at a time) first with no solve running,
 * then while 20 solves of a mid-size fault tree (36 transmitters in 12 2oo3 groups with common cause,
 * staggered proof tests and partial tests) are queued at once. Target: read p99 under 100 ms.
 */
const READS = 200;
const READ_CONCURRENCY = 4;
const SOLVES = 20;
const GROUPS = 12;

/** An invented gas detection function: GROUPS groups of three transmitters voting 2oo3, any group trips. */
function midSizeModel(variant: number): FaultTreeModel {
  const events: FaultTreeModel['events'] = [];
  const gates: FaultTreeModel['gates'] = [];
  const ccf: NonNullable<FaultTreeModel['ccf']> = [];
  for (let group = 0; group < GROUPS; group++) {
    const ids = [0, 1, 2].map((channel) => `GT-${String(group + 1).padStart(2, '0')}${String.fromCharCode(65 + channel)}`);
    ids.forEach((id, channel) =>
      events.push({
        id,
        lambdaDU: (2.0e-7 + 1.0e-8 * group) * (1 + 0.01 * variant),
        lambdaDD: 1.0e-6,
        mttrHours: 8,
        proofTest: { intervalHours: 8760, firstHours: 8760 - 2920 * channel, coverage: 0.95 },
        partialTest: { intervalHours: 2190, coverage: 0.6 },
      }),
    );
    gates.push({ id: `VOTE-${group + 1}`, type: 'atLeast', k: 2, inputs: ids });
    ccf.push({ id: `CCF-${group + 1}`, members: ids, beta: 0.05, betaD: 0.02, model: 'beta' });
  }
  gates.push({ id: 'TOP', label: 'Gas detection fails on demand', type: 'or', inputs: gates.map((gate) => gate.id) });
  return { format: 'proofline/model', version: 1, name: `Load check variant ${variant}`, kind: 'fault-tree', mission: { hours: 87_600, demand: 'low' }, events, gates, ccf, top: 'TOP' };
}

function percentile(sorted: number[], fraction: number): number {
  return sorted[Math.min(sorted.length - 1, Math.ceil(fraction * sorted.length) - 1)]!;
}

function describe(latencies: number[]): string {
  const sorted = [...latencies].sort((a, b) => a - b);
  const format = (ms: number) => `${ms.toFixed(1)} ms`;
  return `p50 ${format(percentile(sorted, 0.5))}, p99 ${format(percentile(sorted, 0.99))}, max ${format(sorted.at(-1)!)} (${sorted.length} reads)`;
}

async function main(): Promise<void> {
  const databaseUrl = process.env['DATABASE_URL'];
  if (!databaseUrl) throw new Error('DATABASE_URL must name the load-check database (npm run load-check sets it)');
  const logger = { ...consoleLogger, info: () => undefined };
  const pool = createPool(databaseUrl, logger);
  const db = createDatabase(pool);
  await runMigrations(db);
  await db.execute(sql`truncate table users, projects, solve_results restart identity cascade`);

  const [engineer] = await db
    .insert(users)
    .values({ username: 'load-engineer', displayName: 'Load Engineer', passwordHash: await hashPassword('load-check-password') })
    .returning();
  const [project] = await db.insert(projects).values({ name: 'Load check terminal', site: 'Invented site' }).returning();
  await db.insert(projectMembers).values({ projectId: project!.id, userId: engineer!.id, role: 'engineer' });
  const [sif] = await db
    .insert(sifs)
    .values({
      projectId: project!.id,
      tag: 'GD-0001',
      title: 'Gas detection trips the compressor',
      hazardousEvent: 'Gas release ignites in the compressor house.',
      demandMode: 'low',
      targetKind: 'sil',
      targetValue: 2,
      targetSil: 2,
      missionHours: 87_600,
      ownerId: engineer!.id,
    })
    .returning();

  const config = solvingConfigFromEnv();
  const solving = await startSolving({
    connectionString: databaseUrl,
    db,
    pool,
    logger,
    solverVersion: SOLVER_VERSION,
    timeLimitMs: config.timeLimitMs,
    solverThreads: config.threads,
  });
  const app = createApp({ db, pool, logger, sessionSecret: 'load-check-session-secret-of-32-characters', signInLimit: { failures: 1000, windowMinutes: 15 }, solving: solving.deps });
  const server = app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', resolve));
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}/api`;

  const signIn = await fetch(`${base}/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ username: 'load-engineer', password: 'load-check-password' }),
  });
  const cookie = signIn.headers.get('set-cookie')!.split(';')[0]!;
  const call = async (path: string, init: RequestInit = {}) => {
    const response = await fetch(`${base}${path}`, { ...init, headers: { cookie, 'content-type': 'application/json', ...init.headers } });
    const body: unknown = await response.json();
    if (!response.ok) throw new Error(`${init.method ?? 'GET'} ${path}: ${response.status} ${JSON.stringify(body)}`);
    return body as { id: string };
  };

  const modelIds: string[] = [];
  for (let variant = 0; variant < SOLVES; variant++) {
    const created = await call(`/projects/${project!.id}/sifs/${sif!.id}/models`, { method: 'POST', body: JSON.stringify({ file: midSizeModel(variant) }) });
    modelIds.push(created.id);
  }

  const readPaths = [`/projects/${project!.id}/sifs`, `/projects/${project!.id}/models/${modelIds[0]}`];
  const runReads = async (): Promise<number[]> => {
    const latencies: number[] = [];
    let next = 0;
    const reader = async () => {
      while (next < READS) {
        const path = readPaths[next++ % readPaths.length]!;
        const started = performance.now();
        await call(path);
        latencies.push(performance.now() - started);
      }
    };
    await Promise.all(Array.from({ length: READ_CONCURRENCY }, reader));
    return latencies;
  };

  const loadBefore = loadavg()[0]!;
  await runReads();
  const cpuBefore = process.cpuUsage();
  const idle = await runReads();
  const cpu = process.cpuUsage(cpuBefore);
  const cpuPerReadMs = (cpu.user + cpu.system) / 1000 / READS;

  const solvesStarted = performance.now();
  const queued = await Promise.all(
    modelIds.map((modelId) => call(`/projects/${project!.id}/models/${modelId}/solves`, { method: 'POST', body: JSON.stringify({ source: { kind: 'draft', version: 1 } }) })),
  );
  const queueMs = performance.now() - solvesStarted;
  const busy = await runReads();
  const readsDoneMs = performance.now() - solvesStarted;
  const states = await Promise.all(queued.map((solve) => call(`/projects/${project!.id}/solves/${solve.id}`)));
  const unfinishedAfterReads = states.filter((state) => ['queued', 'running'].includes(solveSchema.parse(state).status)).length;

  // Polls the summaries (without results) so that the waiting costs the API little.
  let finished: SolveSummary[] = states.map((state) => solveSchema.parse(state));
  while (finished.some((solve) => solve.status === 'queued' || solve.status === 'running')) {
    await new Promise((resolve) => setTimeout(resolve, 500));
    finished = (await Promise.all(modelIds.map(async (modelId) => solveList.parse(await call(`/projects/${project!.id}/models/${modelId}/solves`))))).flat();
  }
  const allSolvedMs = performance.now() - solvesStarted;
  const runTimes = finished.map((solve) => Date.parse(solve.finishedAt!) - Date.parse(solve.startedAt!)).sort((a, b) => a - b);

  console.log(`Load check: API + 1 solver process (${config.threads} worker thread(s)), solver ${SOLVER_VERSION}, Node ${process.version}`);
  console.log(`Machine: ${availableParallelism()} cores; 1-minute load average ${loadBefore.toFixed(1)} at the start, ${loadavg()[0]!.toFixed(1)} at the end (other work on the machine skews the figures)`);
  console.log(`Model: ${GROUPS * 3} events, ${GROUPS + 1} gates, ${GROUPS} common-cause groups; ${SOLVES} variants (no stored result reused)`);
  console.log(`Reads without solves: ${describe(idle)}; CPU ${cpuPerReadMs.toFixed(2)} ms per read (API and this script's HTTP client together)`);
  console.log(`Reads during solves:  ${describe(busy)}`);
  console.log(`  ${SOLVES} solves queued in ${queueMs.toFixed(0)} ms; reads done after ${readsDoneMs.toFixed(0)} ms with ${unfinishedAfterReads} solves still queued or running`);
  console.log(`  all solves finished after ${allSolvedMs.toFixed(0)} ms: ${finished.filter((solve) => solve.status === 'succeeded').length} succeeded; run time per solve p50 ${percentile(runTimes, 0.5)} ms, max ${runTimes.at(-1)} ms`);
  const p99 = percentile([...busy].sort((a, b) => a - b), 0.99);
  console.log(`Target read p99 under 100 ms during solves: ${p99 < 100 ? 'met' : 'NOT met'} (${p99.toFixed(1)} ms)`);

  server.close();
  await solving.stop(5000);
  await pool.end();
}

main().catch((error: unknown) => {
  console.error('The load check failed:', error);
  process.exit(1);
});
