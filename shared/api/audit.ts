import { z } from 'zod';
import { recordId, timestamp } from './common.js';

export const AUDIT_ACTIONS = [
  'revision.issued',
  'review.requested',
  'review.approved',
  'review.returned',
  'annotation.created',
  'annotation.replied',
  'annotation.resolved',
  'annotation.reopened',
  'member.role-changed',
  'member.removed',
] as const;
export const auditAction = z.enum(AUDIT_ACTIONS);
export type AuditAction = z.infer<typeof auditAction>;

export const auditQuery = z.object({ sifId: recordId.optional() });
export type AuditQuery = z.input<typeof auditQuery>;

export const auditEntry = z.object({
  id: recordId,
  projectId: recordId,
  sifId: recordId.nullable(),
  actorId: recordId.nullable(),
  actorDisplayName: z.string(),
  action: auditAction,
  summary: z.string(),
  details: z.record(z.string(), z.unknown()),
  at: timestamp,
});
export type AuditEntry = z.infer<typeof auditEntry>;
export const auditList = z.array(auditEntry);
export type AuditList = z.infer<typeof auditList>;

export const MAIL_KINDS = ['review-requested', 'comment', 'review-approved', 'review-returned'] as const;
export const mailKind = z.enum(MAIL_KINDS);
export type MailKind = z.infer<typeof mailKind>;

/** A notice as the server sent it (admin list). */
export const sentMail = z.object({
  id: recordId,
  kind: mailKind,
  toUserId: recordId.nullable(),
  toAddress: z.string(),
  subject: z.string(),
  text: z.string(),
  sentAt: timestamp,
  error: z.string().nullable(),
});
export type SentMail = z.infer<typeof sentMail>;
export const sentMailList = z.array(sentMail);

export const noticeSettings = z.object({ notices: z.boolean() });
export type NoticeSettings = z.infer<typeof noticeSettings>;
export const noticeSettingsBody = z.strictObject({ notices: z.boolean({ message: 'must be true or false' }) });
