import { spawn, type ChildProcess } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));

/** The e2e server runs without a solver (PROOFLINE_SOLVER=off); a test that solves starts one on the same database. */
export function startSolverProcess(): ChildProcess {
  const databaseUrl = process.env.E2E_DATABASE_URL;
  if (!databaseUrl) throw new Error('E2E_DATABASE_URL is not set (see tests/e2e/global-setup.ts)');
  return spawn(process.execPath, ['--import', 'tsx', 'server/solve-worker-main.ts'], {
    cwd: ROOT,
    env: { ...process.env, DATABASE_URL: databaseUrl },
    stdio: ['ignore', 'inherit', 'inherit'],
  });
}
