import PgBoss from 'pg-boss';

/** The pg-boss queue every solve goes through; any solver process on the same database takes from it. */
export const SOLVE_QUEUE = 'proofline-solve';

export interface SolveJob {
  readonly solveId: string;
}

export interface SolveQueueOptions {
  readonly connectionString: string;
  /** Shown in pg_stat_activity, e.g. "proofline-api" or "proofline-solver". */
  readonly applicationName: string;
  readonly log: (message: string, error?: unknown) => void;
  /** Connections pg-boss may open. Default 4. */
  readonly maxConnections?: number;
}

export interface SolveQueue {
  /** Queues a solve; a job active longer than `expireInSeconds` is failed by pg-boss. Returns the job id. */
  send(job: SolveJob, expireInSeconds: number): Promise<string>;
  /** Drops a job that no solver process has taken yet. */
  cancel(jobId: string): Promise<void>;
  /**
   * Starts `concurrency` pollers, each taking one job at a time, so this process holds at most that many
   * jobs; the others stay queued for other processes.
   */
  work(concurrency: number, handler: (job: SolveJob) => Promise<void>): Promise<void>;
  /** Makes idle pollers fetch now instead of at their next polling interval. */
  wake(): void;
  /** Stops taking jobs and waits for the running handlers (up to `timeoutMs`), then closes. */
  stop(timeoutMs?: number): Promise<void>;
}

/** Polling interval of an idle poller; pg-boss 10 allows 0.5 s at the least. */
const POLLING_INTERVAL_SECONDS = 0.5;

/** Starts pg-boss on the database (it keeps its tables in the pgboss schema) and makes sure the queue exists. */
export async function startSolveQueue(options: SolveQueueOptions): Promise<SolveQueue> {
  const boss = new PgBoss({
    connectionString: options.connectionString,
    application_name: options.applicationName,
    max: options.maxConnections ?? 4,
    schedule: false,
  });
  boss.on('error', (error) => options.log('job queue error', error));
  await boss.start();
  await boss.createQueue(SOLVE_QUEUE, { name: SOLVE_QUEUE });
  const workerIds: string[] = [];

  return {
    async send(job, expireInSeconds) {
      // Retries are safe: a handler only claims a solve that is still queued, so a retry after a database
      // outage runs it, and a retry of a solve already taken does nothing.
      const id = await boss.send(SOLVE_QUEUE, { ...job }, { retryLimit: 3, retryDelay: 5, expireInSeconds: Math.max(1, Math.ceil(expireInSeconds)) });
      if (id === null) throw new Error('the job queue refused the solve job');
      return id;
    },
    async cancel(jobId) {
      await boss.cancel(SOLVE_QUEUE, jobId);
    },
    async work(concurrency, handler) {
      for (let index = 0; index < concurrency; index++) {
        const id = await boss.work<SolveJob>(SOLVE_QUEUE, { batchSize: 1, pollingIntervalSeconds: POLLING_INTERVAL_SECONDS }, async (jobs) => {
          for (const job of jobs) await handler(job.data);
        });
        workerIds.push(id);
      }
    },
    wake() {
      for (const id of workerIds) boss.notifyWorker(id);
    },
    async stop(timeoutMs = 30_000) {
      await boss.stop({ graceful: true, wait: true, timeout: timeoutMs });
    },
  };
}
