import type { AddressInfo } from 'node:net';
import { createApp } from './app.js';
import { createSessionStore } from './auth/session.js';
import { storedSessionSecret } from './auth/session-secret.js';
import { ConfigError, readConfig } from './config.js';
import { createDatabase, createPool, isDatabaseUnavailable } from './db/client.js';
import { runMigrations } from './db/migrate.js';
import { consoleLogger as logger } from './logger.js';
import { DEMO_USERS, seedDemoWorkspace } from './seed/demo-workspace.js';
import { SOLVER_VERSION } from '../solver/index.js';
import { solvingConfigFromEnv, startSolving } from './solves/solving.js';
import { setUpMail } from './mail/mail-setup.js';

// Wires config, database, migrations and the demo seed, then listens. Everything else is in createApp.
async function main(): Promise<void> {
  const config = readConfig(process.env);
  const pool = createPool(config.databaseUrl, logger);
  const db = createDatabase(pool);
  await runMigrations(db);
  const seeded = await seedDemoWorkspace(db);
  const sessionSecret = config.sessionSecret ?? (await storedSessionSecret(db));
  const sessionStore = createSessionStore(pool, logger, 15 * 60);
  const solvingConfig = solvingConfigFromEnv();
  const solving = await startSolving({
    connectionString: config.databaseUrl,
    db,
    pool,
    logger,
    solverVersion: SOLVER_VERSION,
    timeLimitMs: solvingConfig.timeLimitMs,
    solverThreads: solvingConfig.inProcessSolver ? solvingConfig.threads : 0,
  });
  const mail = await setUpMail(process.env, logger);
  const app = createApp({ db, pool, sessionSecret, sessionStore, clientDir: config.clientDir, secureCookie: config.secureCookie, solving: solving.deps, mail: mail.deps });

  const server = app.listen(config.port, config.host);
  await new Promise<void>((resolve, reject) => {
    server.once('listening', resolve);
    server.once('error', reject);
  });
  const { port } = server.address() as AddressInfo;
  const url = `http://${config.host}:${port}`;
  logger.info(`Proofline is running at ${url}`);
  logger.info(seeded ? 'Seeded the demo workspace (Brackwater Point Gas Terminal).' : 'Using the existing workspace.');
  logger.info('Demo sign-ins (as seeded; a changed password is not shown here):');
  for (const user of DEMO_USERS) logger.info(`  ${user.username.padEnd(9)} ${user.password.padEnd(20)} ${user.isAdmin ? 'site admin' : user.role}`);
  logger.info(
    solving.solver
      ? `Solver process ${solving.solver.name} runs here with ${solvingConfig.threads} worker thread(s); more machines can join with npm run worker.`
      : 'PROOFLINE_SOLVER=off: no solver process here; solves wait for npm run worker on the same database.',
  );
  logger.info('Press Ctrl+C to stop.');

  let stopping = false;
  const stop = (signal: string) => {
    if (stopping) return;
    stopping = true;
    logger.info(`${signal}: stopping Proofline...`);
    const force = setTimeout(() => process.exit(1), 5_000);
    force.unref();
    server.close(() => {
      sessionStore.close();
      void mail.close();
      solving
        .stop(3_000)
        .then(() => pool.end())
        .then(
          () => process.exit(0),
          () => process.exit(1),
        );
    });
    server.closeAllConnections();
  };
  process.on('SIGINT', () => stop('SIGINT'));
  process.on('SIGTERM', () => stop('SIGTERM'));
}

main().catch((error: unknown) => {
  if (error instanceof ConfigError) {
    console.error(`Proofline cannot start:\n${error.message}`);
  } else if (isDatabaseUnavailable(error)) {
    console.error('Proofline cannot start: the database at DATABASE_URL does not answer (is PostgreSQL running? npm start starts it).');
  } else {
    console.error('Proofline could not start:', error);
  }
  process.exit(1);
});
