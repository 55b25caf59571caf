import { fileURLToPath } from 'node:url';

export interface ServerConfig {
  readonly port: number;
  readonly host: string;
  readonly databaseUrl: string;
  /** From SESSION_SECRET when set (at least 32 characters), else generated once and stored in the database. */
  readonly sessionSecret: string | null;
  readonly clientDir: string;
  readonly secureCookie: boolean;
}

export class ConfigError extends Error {}

/** Reads the server's settings from the environment; every wrong value is named in the error. */
export function readConfig(env: NodeJS.ProcessEnv): ServerConfig {
  const problems: string[] = [];
  const portText = env.PORT ?? '4300';
  const port = Number(portText);
  if (!/^\d+$/.test(portText) || port < 1 || port > 65_535) problems.push(`PORT must be a port number 1-65535 (got "${portText}")`);
  const databaseUrl = env.DATABASE_URL ?? '';
  if (!/^postgres(ql)?:\/\//.test(databaseUrl)) {
    problems.push('DATABASE_URL must be set to a postgres:// URL (npm start sets it for the private cluster)');
  }
  const sessionSecret = env.SESSION_SECRET ?? null;
  if (sessionSecret !== null && sessionSecret.length < 32) problems.push('SESSION_SECRET must have at least 32 characters');
  if (problems.length > 0) throw new ConfigError(problems.join('\n'));
  return {
    port,
    host: env.HOST ?? '127.0.0.1',
    databaseUrl,
    sessionSecret,
    clientDir: env.PROOFLINE_CLIENT_DIR ?? fileURLToPath(new URL('../dist/proofline/browser', import.meta.url)),
    secureCookie: env.SECURE_COOKIES === 'true',
  };
}
