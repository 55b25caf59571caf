import { SMTPServer } from 'smtp-server';

/** A message as the fake received it: the SMTP envelope and the raw text with its Subject header read out. */
export interface ReceivedMail {
  readonly from: string;
  readonly to: readonly string[];
  readonly subject: string;
  readonly raw: string;
}

export interface SmtpFake {
  readonly port: number;
  readonly received: readonly ReceivedMail[];
  close(): Promise<void>;
}

/** The Subject header of a raw message, unfolded; encoded words are left as sent. */
function subjectOf(raw: string): string {
  const head = raw.split(/\r?\n\r?\n/, 1)[0] ?? '';
  const match = /^Subject:(.*(?:\r?\n[ \t].*)*)/im.exec(head);
  return match ? match[1]!.replace(/\r?\n[ \t]/g, ' ').trim() : '';
}

/**
 * A local SMTP server for development and tests: it accepts every message on 127.0.0.1 (no TLS, no
 * sign-in) and keeps it in memory. Port 0 picks a free port.
 */
export async function startSmtpFake(port = 0): Promise<SmtpFake> {
  const received: ReceivedMail[] = [];
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    logger: false,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (chunk: Buffer) => chunks.push(chunk));
      stream.on('end', () => {
        const raw = Buffer.concat(chunks).toString('utf8');
        received.push({
          from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
          to: session.envelope.rcptTo.map((recipient) => recipient.address),
          subject: subjectOf(raw),
          raw,
        });
        callback();
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, '127.0.0.1', () => resolve());
  });
  const address = server.server.address();
  const boundPort = typeof address === 'object' && address ? address.port : port;
  return {
    port: boundPort,
    received,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
