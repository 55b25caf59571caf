import { desc, eq } from 'drizzle-orm';
import nodemailer, { type Transporter } from 'nodemailer';
import type { MailKind, SentMail } from '../../shared/api/audit.js';
import type { Database, Logger } from '../db/client.js';
import { mailMessages, noticeSettings } from '../db/schema/reviews.js';
import { users } from '../db/schema/users.js';

/** How notices leave the server. */
export interface MailDeps {
  readonly transport: Transporter;
  /** The From address, e.g. "Proofline <proofline@plant.example>". */
  readonly from: string;
  /** Accounts carry a username only: a user's address is username@domain. */
  readonly domain: string;
}

/** SMTP settings from the environment; null host means "use the local fake" (development and tests only). */
export interface SmtpSettings {
  readonly host: string;
  readonly port: number;
  readonly secure: boolean;
  readonly user: string | null;
  readonly password: string | null;
}

/** A nodemailer SMTP transport for the configured host. */
export function smtpTransport(settings: SmtpSettings): Transporter {
  return nodemailer.createTransport({
    host: settings.host,
    port: settings.port,
    secure: settings.secure,
    ...(settings.user !== null ? { auth: { user: settings.user, pass: settings.password ?? '' } } : {}),
  });
}

export interface Notice {
  readonly kind: MailKind;
  readonly toUserId: string;
  readonly subject: string;
  readonly text: string;
}

/**
 * Sends notices to users who have not switched them off and records each one (with the SMTP host's refusal,
 * if any) for the admin list. A failed delivery never fails the action that caused it.
 */
export function createNotifier(db: Database, logger: Logger, mail: MailDeps | null) {
  return {
    async send(notices: readonly Notice[]): Promise<void> {
      for (const notice of notices) {
        const [recipient] = await db
          .select({ username: users.username, displayName: users.displayName, disabled: users.disabled, notices: noticeSettings.notices })
          .from(users)
          .leftJoin(noticeSettings, eq(noticeSettings.userId, users.id))
          .where(eq(users.id, notice.toUserId));
        if (!recipient || recipient.disabled || recipient.notices === false || mail === null) continue;
        const toAddress = `${recipient.username}@${mail.domain}`;
        let error: string | null = null;
        try {
          await mail.transport.sendMail({ from: mail.from, to: `"${recipient.displayName.replaceAll('"', '')}" <${toAddress}>`, subject: notice.subject, text: notice.text });
        } catch (failure) {
          error = failure instanceof Error ? failure.message : String(failure);
          logger.warn(`mail to ${toAddress} failed: ${error}`);
        }
        await db.insert(mailMessages).values({ kind: notice.kind, toUserId: notice.toUserId, toAddress, subject: notice.subject, text: notice.text, error });
      }
    },

    async sent(limit = 200): Promise<SentMail[]> {
      const rows = await db.select().from(mailMessages).orderBy(desc(mailMessages.sentAt)).limit(limit);
      return rows.map((row) => ({ id: row.id, kind: row.kind, toUserId: row.toUserId, toAddress: row.toAddress, subject: row.subject, text: row.text, sentAt: row.sentAt.toISOString(), error: row.error }));
    },

    async settings(userId: string): Promise<{ notices: boolean }> {
      const [row] = await db.select().from(noticeSettings).where(eq(noticeSettings.userId, userId));
      return { notices: row?.notices ?? true };
    },

    async saveSettings(userId: string, notices: boolean): Promise<{ notices: boolean }> {
      await db.insert(noticeSettings).values({ userId, notices }).onConflictDoUpdate({ target: noticeSettings.userId, set: { notices } });
      return { notices };
    },
  };
}

export type Notifier = ReturnType<typeof createNotifier>;
