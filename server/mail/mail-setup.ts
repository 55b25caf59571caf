import nodemailer from 'nodemailer';
import type { Logger } from '../db/client.js';
import { ConfigError } from '../config.js';
import { smtpTransport, type MailDeps } from './notifier.js';
import { startSmtpFake, type SmtpFake } from './smtp-fake.js';

export interface MailSetup {
  readonly deps: MailDeps;
  /** The local fake when no SMTP host is configured (development); null with a real host. */
  readonly fake: SmtpFake | null;
  close(): Promise<void>;
}

/**
 * Mail from the environment: SMTP_HOST (with SMTP_PORT, default 587; SMTP_SECURE=true for TLS on connect;
 * SMTP_USER / SMTP_PASSWORD) sends through that host. Without SMTP_HOST, outside production, a local SMTP
 * fake on 127.0.0.1:SMTP_FAKE_PORT (default: a free port, so several servers never clash) receives everything; in production SMTP_HOST is required.
 * MAIL_FROM (default "Proofline <proofline@localhost>") and MAIL_DOMAIN (users' addresses are
 * username@MAIL_DOMAIN, default "localhost").
 */
export async function setUpMail(env: NodeJS.ProcessEnv, logger: Logger): Promise<MailSetup> {
  const from = env.MAIL_FROM ?? 'Proofline <proofline@localhost>';
  const domain = env.MAIL_DOMAIN ?? 'localhost';
  if (env.SMTP_HOST) {
    const portText = env.SMTP_PORT ?? '587';
    const port = Number(portText);
    if (!/^\d+$/.test(portText) || port < 1 || port > 65_535) throw new ConfigError(`SMTP_PORT must be a port number 1-65535 (got "${portText}")`);
    const transport = smtpTransport({ host: env.SMTP_HOST, port, secure: env.SMTP_SECURE === 'true', user: env.SMTP_USER ?? null, password: env.SMTP_PASSWORD ?? null });
    logger.info(`Mail goes through ${env.SMTP_HOST}:${port}.`);
    return { deps: { transport, from, domain }, fake: null, close: async () => transport.close() };
  }
  if (env.NODE_ENV === 'production') throw new ConfigError('SMTP_HOST must be set in production (the local mail fake is for development only)');
  const fakePortText = env.SMTP_FAKE_PORT ?? '0';
  if (!/^\d+$/.test(fakePortText) || Number(fakePortText) > 65_535) throw new ConfigError(`SMTP_FAKE_PORT must be a port number 0-65535 (got "${fakePortText}")`);
  const fake = await startSmtpFake(Number(fakePortText));
  const transport = nodemailer.createTransport({ host: '127.0.0.1', port: fake.port, secure: false, ignoreTLS: true });
  logger.info(`Mail goes to the local SMTP fake on 127.0.0.1:${fake.port} (set SMTP_HOST for a real one); the admin's Sent mail page lists it.`);
  return {
    deps: { transport, from, domain },
    fake,
    close: async () => {
      transport.close();
      await fake.close();
    },
  };
}
