import { mysqlTable, varchar, mysqlEnum, int, index, text, uniqueIndex, json, primaryKey } from 'drizzle-orm/mysql-core';
import { sql } from 'drizzle-orm';
import { fk, utc, timestamps, id } from './_shared';
import { workspaces, users } from './accounts';
import { stills } from './production';
import { FEED_SCOPES } from '../../lib/vocabulary';

/** Calendar subscriptions: a read-only capability token (stored hashed) for one scope. */
export const calendarFeeds = mysqlTable(
  'calendar_feeds',
  {
    id: id(),
    workspaceId: fk('workspace_id')
      .notNull()
      .references(() => workspaces.id, { onDelete: 'cascade' }),
    scope: mysqlEnum('scope', FEED_SCOPES).notNull(),
    stillId: fk('still_id').references(() => stills.id, { onDelete: 'cascade' }),
    personId: fk('person_id').references(() => users.id, { onDelete: 'cascade' }),
    name: varchar('name', { length: 120 }).notNull(),
    tokenHash: varchar('token_hash', { length: 64 }).notNull(),
    createdBy: fk('created_by').references(() => users.id, { onDelete: 'set null' }),
    revokedAt: utc('revoked_at'),
    lastFetchedAt: utc('last_fetched_at'),
    ...timestamps,
  },
  (t) => [uniqueIndex('calendar_feeds_token_uq').on(t.tokenHash), index('calendar_feeds_ws_idx').on(t.workspaceId)],
);

/** Outgoing mail, written in the same transaction as the change that causes it. */
export const mailOutbox = mysqlTable(
  'mail_outbox',
  {
    id: id(),
    workspaceId: fk('workspace_id').references(() => workspaces.id, { onDelete: 'cascade' }),
    kind: varchar('kind', { length: 40 }).notNull(),
    toAddress: varchar('to_address', { length: 254 }).notNull(),
    subject: varchar('subject', { length: 250 }).notNull(),
    textBody: text('text_body').notNull(),
    htmlBody: text('html_body').notNull(),
    /** Stable Message-ID so a rare repeat delivery is recognisable. */
    messageId: varchar('message_id', { length: 200 }).notNull(),
    status: mysqlEnum('status', ['pending', 'sent', 'failed']).notNull().default('pending'),
    attempts: int('attempts').notNull().default(0),
    nextAttemptAt: utc('next_attempt_at').notNull(),
    /** A committed claim with a lease: holds across Galera nodes, unlike row locks. */
    claimedBy: varchar('claimed_by', { length: 80 }),
    claimUntil: utc('claim_until'),
    lastError: varchar('last_error', { length: 500 }),
    sentAt: utc('sent_at'),
    ...timestamps,
  },
  (t) => [uniqueIndex('mail_outbox_msgid_uq').on(t.messageId), index('mail_outbox_due_idx').on(t.status, t.nextAttemptAt)],
);

export const auditLog = mysqlTable(
  'audit_log',
  {
    id: id(),
    workspaceId: fk('workspace_id').references(() => workspaces.id, { onDelete: 'cascade' }),
    userId: fk('user_id').references(() => users.id, { onDelete: 'set null' }),
    action: varchar('action', { length: 60 }).notNull(),
    entityType: varchar('entity_type', { length: 40 }),
    entityId: varchar('entity_id', { length: 64 }),
    details: json('details'),
    ip: varchar('ip', { length: 64 }),
    createdAt: utc('created_at').notNull(),
  },
  (t) => [index('audit_ws_time_idx').on(t.workspaceId, t.createdAt), index('audit_action_idx').on(t.workspaceId, t.action)],
);

/**
 * "Do this once" claims shared by every app instance: the daily digest of a workspace for
 * one local date, a notification about one ferment's status on one day. A claim is an
 * INSERT committed together with the work it guards; the unique key makes a second
 * instance's INSERT fail (duplicate key on one node, certification failure on Galera),
 * so the work happens once even with several instances.
 */
export const jobClaims = mysqlTable(
  'job_claims',
  {
    id: id(),
    workspaceId: fk('workspace_id')
      .notNull()
      .references(() => workspaces.id, { onDelete: 'cascade' }),
    job: varchar('job', { length: 40 }).notNull(),
    jobKey: varchar('job_key', { length: 120 }).notNull(),
    claimedBy: varchar('claimed_by', { length: 80 }).notNull(),
    createdAt: utc('created_at')
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [uniqueIndex('job_claims_uq').on(t.workspaceId, t.job, t.jobKey)],
);

/**
 * Calendar event blocks (the VEVENT text the `ics` package wrote), kept so that the first
 * feed build after a restart, or on another instance, does not write every event again.
 * Content-addressed: the key hashes the workspace and everything written into the event,
 * so a block is never stale, only unused; old ones are pruned.
 */
export const calendarEventBlocks = mysqlTable(
  'calendar_event_blocks',
  {
    workspaceId: fk('workspace_id')
      .notNull()
      .references(() => workspaces.id, { onDelete: 'cascade' }),
    keyHash: varchar('key_hash', { length: 64 }).notNull(),
    body: text('body').notNull(),
    createdAt: utc('created_at')
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [primaryKey({ columns: [t.workspaceId, t.keyHash] }), index('calendar_event_blocks_age_idx').on(t.workspaceId, t.createdAt)],
);
