import { sql } from 'drizzle-orm';
import { ConfigError, readConfig } from './config.js';
import { createDatabase, createPool } from './db/client.js';
import { consoleLogger as logger } from './logger.js';
import { solvingConfigFromEnv } from './solves/solving.js';
import { startSolverProcess } from './solves/solver-process.js';

// `npm run worker`: one solver process on this machine, taking solve jobs from the shared database's
// queue. Start as many as there are machines to spare; the API (npm start) migrates the database.
async function main(): Promise<void> {
  const config = readConfig(process.env);
  const solving = solvingConfigFromEnv();
  const pool = createPool(config.databaseUrl, logger);
  const db = createDatabase(pool);
  try {
    await db.execute(sql`select 1 from solves limit 1`);
  } catch (error) {
    if ((error as { cause?: { code?: string } }).cause?.code === '42P01' || (error as { code?: string }).code === '42P01') {
      throw new ConfigError('the database has no solves table yet: start the API once (npm start) so that it migrates the database');
    }
    throw error;
  }
  const solver = await startSolverProcess({
    db,
    pool,
    connectionString: config.databaseUrl,
    threads: solving.threads,
    timeLimitMs: solving.timeLimitMs,
    log: (message, error) => logger.error(message, error),
  });
  logger.info(`Solver process ${solver.name} is taking solve jobs with ${solving.threads} worker thread(s); time limit ${solving.timeLimitMs / 1000} s.`);

  let stopping = false;
  const stop = (signal: string) => {
    if (stopping) return;
    stopping = true;
    logger.info(`${signal}: letting running solves finish (up to 30 s), then stopping...`);
    solver
      .stop(30_000)
      .then(() => pool.end())
      .then(
        () => process.exit(0),
        () => process.exit(1),
      );
  };
  process.on('SIGINT', () => stop('SIGINT'));
  process.on('SIGTERM', () => stop('SIGTERM'));
}

main().catch((error: unknown) => {
  if (error instanceof ConfigError) {
    console.error(`The solver process cannot start:\n${error.message}`);
  } else {
    console.error('The solver process could not start:', error);
  }
  process.exit(1);
});
