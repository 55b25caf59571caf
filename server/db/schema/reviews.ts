import { sql } from 'drizzle-orm';
import { boolean, check, index, integer, jsonb, pgTable, primaryKey, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { ANNOTATION_SEVERITIES, ANNOTATION_STATUSES, ANNOTATION_TARGET_KINDS } from '../../../shared/api/annotations.js';
import { AUDIT_ACTIONS, MAIL_KINDS } from '../../../shared/api/audit.js';
import { REVIEW_ROUND_STATUSES } from '../../../shared/api/reviews.js';
import { oneOf } from './checks.js';
import { models } from './models.js';
import { projects } from './projects.js';
import { sifs } from './sifs.js';
import { users } from './users.js';

const at = (name: string) => timestamp(name, { withTimezone: true, mode: 'date' });

/** A request to review one issued revision; it ends approved or returned by one of its reviewers. */
export const reviewRounds = pgTable(
  'review_rounds',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    projectId: uuid('project_id').notNull().references(() => projects.id, { onDelete: 'cascade' }),
    sifId: uuid('sif_id').notNull().references(() => sifs.id, { onDelete: 'cascade' }),
    modelId: uuid('model_id').notNull().references(() => models.id, { onDelete: 'cascade' }),
    revision: integer('revision').notNull(),
    message: text('message').notNull(),
    status: text('status', { enum: REVIEW_ROUND_STATUSES }).notNull().default('open'),
    requestedById: uuid('requested_by_id').notNull().references(() => users.id, { onDelete: 'restrict' }),
    requestedAt: at('requested_at').notNull().defaultNow(),
    decidedById: uuid('decided_by_id').references(() => users.id, { onDelete: 'restrict' }),
    decidedAt: at('decided_at'),
    decisionComment: text('decision_comment').notNull().default(''),
  },
  (table) => [
    index('review_rounds_sif_idx').on(table.sifId),
    index('review_rounds_model_idx').on(table.modelId),
    check('review_rounds_status_valid', oneOf(table.status, REVIEW_ROUND_STATUSES)),
  ],
);

export const reviewRoundReviewers = pgTable(
  'review_round_reviewers',
  {
    roundId: uuid('round_id').notNull().references(() => reviewRounds.id, { onDelete: 'cascade' }),
    userId: uuid('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  },
  (table) => [
    primaryKey({ name: 'review_round_reviewers_pk', columns: [table.roundId, table.userId] }),
    index('review_round_reviewers_user_idx').on(table.userId),
  ],
);

/**
 * Threads pinned to a model item. item_snapshot is the item's content in the revision the thread was written
 * on, so a later revision shows the thread as outdated when its item differs.
 */
export const annotations = pgTable(
  'annotations',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    projectId: uuid('project_id').notNull().references(() => projects.id, { onDelete: 'cascade' }),
    sifId: uuid('sif_id').notNull().references(() => sifs.id, { onDelete: 'cascade' }),
    modelId: uuid('model_id').notNull().references(() => models.id, { onDelete: 'cascade' }),
    revision: integer('revision').notNull(),
    targetKind: text('target_kind', { enum: ANNOTATION_TARGET_KINDS }).notNull(),
    itemId: text('item_id'),
    itemSnapshot: jsonb('item_snapshot'),
    severity: text('severity', { enum: ANNOTATION_SEVERITIES }).notNull(),
    status: text('status', { enum: ANNOTATION_STATUSES }).notNull().default('open'),
    body: text('body').notNull(),
    authorId: uuid('author_id').notNull().references(() => users.id, { onDelete: 'restrict' }),
    createdAt: at('created_at').notNull().defaultNow(),
    resolvedById: uuid('resolved_by_id').references(() => users.id, { onDelete: 'restrict' }),
    resolvedAt: at('resolved_at'),
  },
  (table) => [
    index('annotations_model_idx').on(table.modelId),
    check('annotations_target_kind_valid', oneOf(table.targetKind, ANNOTATION_TARGET_KINDS)),
    check('annotations_severity_valid', oneOf(table.severity, ANNOTATION_SEVERITIES)),
    check('annotations_status_valid', oneOf(table.status, ANNOTATION_STATUSES)),
    check('annotations_revision_positive', sql`${table.revision} >= 1`),
  ],
);

export const annotationReplies = pgTable(
  'annotation_replies',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    annotationId: uuid('annotation_id').notNull().references(() => annotations.id, { onDelete: 'cascade' }),
    authorId: uuid('author_id').notNull().references(() => users.id, { onDelete: 'restrict' }),
    body: text('body').notNull(),
    createdAt: at('created_at').notNull().defaultNow(),
  },
  (table) => [index('annotation_replies_annotation_idx').on(table.annotationId)],
);

/** Who did what and when, per project (and SIF where there is one). Rows are only ever inserted. */
export const auditEvents = pgTable(
  'audit_events',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    projectId: uuid('project_id').notNull().references(() => projects.id, { onDelete: 'cascade' }),
    sifId: uuid('sif_id').references(() => sifs.id, { onDelete: 'cascade' }),
    actorId: uuid('actor_id').references(() => users.id, { onDelete: 'set null' }),
    actorName: text('actor_name').notNull(),
    action: text('action', { enum: AUDIT_ACTIONS }).notNull(),
    summary: text('summary').notNull(),
    details: jsonb('details').$type<Record<string, unknown>>().notNull(),
    at: at('at').notNull().defaultNow(),
  },
  (table) => [
    index('audit_events_project_at_idx').on(table.projectId, table.at),
    index('audit_events_sif_at_idx').on(table.sifId, table.at),
    check('audit_events_action_valid', oneOf(table.action, AUDIT_ACTIONS)),
  ],
);

/** Every notice the server handed to the SMTP host (error set when it refused). */
export const mailMessages = pgTable(
  'mail_messages',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    kind: text('kind', { enum: MAIL_KINDS }).notNull(),
    toUserId: uuid('to_user_id').references(() => users.id, { onDelete: 'set null' }),
    toAddress: text('to_address').notNull(),
    subject: text('subject').notNull(),
    text: text('text').notNull(),
    sentAt: at('sent_at').notNull().defaultNow(),
    error: text('error'),
  },
  (table) => [index('mail_messages_sent_idx').on(table.sentAt), check('mail_messages_kind_valid', oneOf(table.kind, MAIL_KINDS))],
);

/** A user's choice to receive notices by e-mail; no row means yes. */
export const noticeSettings = pgTable('notice_settings', {
  userId: uuid('user_id').primaryKey().references(() => users.id, { onDelete: 'cascade' }),
  notices: boolean('notices').notNull().default(true),
});

export type ReviewRoundRow = typeof reviewRounds.$inferSelect;
export type NewReviewRoundRow = typeof reviewRounds.$inferInsert;
export type AnnotationRow = typeof annotations.$inferSelect;
export type NewAnnotationRow = typeof annotations.$inferInsert;
export type AnnotationReplyRow = typeof annotationReplies.$inferSelect;
export type AuditEventRow = typeof auditEvents.$inferSelect;
export type NewAuditEventRow = typeof auditEvents.$inferInsert;
export type MailMessageRow = typeof mailMessages.$inferSelect;
