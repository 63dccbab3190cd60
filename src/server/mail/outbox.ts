/**
 * The mail outbox. Mail is written to mail_outbox in the same transaction as the change
 * that causes it, and a sender loop delivers it. Claims are committed writes with a lease
 * (claimed_by + claim_until), not row locks, so two app instances — even on different
 * Galera nodes — never send the same row twice while a lease holds.
 */
import { randomUUID } from 'node:crypto';
import { sql, and, eq } from 'drizzle-orm';
import nodemailer, { type Transporter } from 'nodemailer';
import { getDb, type Db } from '../../db/client';
import { mailOutbox } from '../../db/schema';
import { env } from '../../config';
import { announceDemoLinks } from '../mailbox';

export type OutboxTx = Pick<Db, 'insert'>;

export interface OutgoingMail {
  workspaceId: number | null;
  kind: string;
  to: string;
  subject: string;
  text: string;
  html: string;
}

export const CLAIM_LEASE_MS = 60_000;
export const MAX_ATTEMPTS = 12;
export const BACKOFF_BASE_MS = 10_000;
export const BACKOFF_CAP_MS = 10 * 60_000;
export const BATCH_SIZE = 20;

/** Delay before attempt n+1 after n failed attempts: 10 s, 20 s, 40 s ... capped at 10 min. */
export function backoffMs(attempts: number): number {
  return Math.min(BACKOFF_CAP_MS, BACKOFF_BASE_MS * 2 ** Math.max(0, attempts - 1));
}

/** Queue a message inside the caller's transaction. Returns its Message-ID. */
export async function enqueue(tx: OutboxTx, mail: OutgoingMail): Promise<string> {
  const messageId = `<outbox-${randomUUID()}@plateau.local>`;
  await tx.insert(mailOutbox).values({
    workspaceId: mail.workspaceId,
    kind: mail.kind.slice(0, 40),
    toAddress: mail.to.trim().toLowerCase(),
    subject: mail.subject.slice(0, 250),
    textBody: mail.text,
    htmlBody: mail.html,
    messageId,
    status: 'pending',
    attempts: 0,
    nextAttemptAt: new Date(),
  });
  return messageId;
}

export interface DeliverOptions {
  smtpUrl: string;
  instanceId: string;
  now?: Date;
  from?: string;
  batch?: number;
  /** Only rows of this workspace (tests use it to keep to their own rows). */
  workspaceId?: number;
}

export interface DeliverResult {
  claimed: number;
  sent: number;
  retried: number;
  failed: number;
}

const transports = new Map<string, Transporter>();
function transportFor(url: string): Transporter {
  let t = transports.get(url);
  if (!t) {
    // Timeouts go in the transport options (a second argument would only set message defaults),
    // so a hung SMTP server cannot block the sender loop.
    const u = new URL(url);
    t = nodemailer.createTransport({
      host: u.hostname,
      port: Number(u.port || (u.protocol === 'smtps:' ? 465 : 25)),
      secure: u.protocol === 'smtps:',
      auth: u.username ? { user: decodeURIComponent(u.username), pass: decodeURIComponent(u.password) } : undefined,
      ignoreTLS: u.searchParams.get('ignoreTLS') === 'true',
      connectionTimeout: 5000,
      greetingTimeout: 5000,
      socketTimeout: 10000,
    });
    transports.set(url, t);
  }
  return t;
}

/** Claim the due rows with a committed lease, send each, record the outcome. */
export async function deliverDue(opts: DeliverOptions): Promise<DeliverResult> {
  const db = getDb();
  const now = opts.now ?? new Date();
  const leaseUntil = new Date(now.getTime() + CLAIM_LEASE_MS);
  const limit = opts.batch ?? BATCH_SIZE;
  const scope = opts.workspaceId != null ? sql` AND workspace_id = ${opts.workspaceId}` : sql``;
  await db.execute(sql`UPDATE mail_outbox SET claimed_by = ${opts.instanceId}, claim_until = ${leaseUntil}
    WHERE status = 'pending' AND next_attempt_at <= ${now} AND (claim_until IS NULL OR claim_until < ${now})${scope}
    ORDER BY next_attempt_at, id LIMIT ${limit}`);
  const rows = await db
    .select()
    .from(mailOutbox)
    .where(and(eq(mailOutbox.claimedBy, opts.instanceId), eq(mailOutbox.status, 'pending'), sql`${mailOutbox.claimUntil} = ${leaseUntil}`));
  const result: DeliverResult = { claimed: rows.length, sent: 0, retried: 0, failed: 0 };
  if (!rows.length) return result;
  const transport = transportFor(opts.smtpUrl);
  const from = opts.from ?? env().MAIL_FROM;
  for (const row of rows) {
    const mine = and(eq(mailOutbox.id, row.id), eq(mailOutbox.claimedBy, opts.instanceId));
    try {
      await transport.sendMail({ from, to: row.toAddress, subject: row.subject, text: row.textBody, html: row.htmlBody, messageId: row.messageId });
      // claimed_by stays on a sent row: it names the instance that delivered it.
      await db.update(mailOutbox).set({ status: 'sent', sentAt: new Date(), claimUntil: null, lastError: null }).where(mine);
      result.sent++;
      announceDemoLinks({ kind: row.kind, to: row.toAddress, text: row.textBody });
    } catch (err) {
      const attempts = row.attempts + 1;
      const message = (err instanceof Error ? err.message : String(err)).slice(0, 480);
      if (attempts >= MAX_ATTEMPTS) {
        await db.update(mailOutbox).set({ status: 'failed', attempts, lastError: message, claimedBy: null, claimUntil: null }).where(mine);
        result.failed++;
      } else {
        await db
          .update(mailOutbox)
          .set({ attempts, lastError: message, nextAttemptAt: new Date(now.getTime() + backoffMs(attempts)), claimedBy: null, claimUntil: null })
          .where(mine);
        result.retried++;
      }
    }
  }
  return result;
}

const SENDER_KEY = Symbol.for('plateau.outboxSender');
type SenderState = { timer: NodeJS.Timeout; running: boolean };

/** Start the sender loop once per process (no-op when OUTBOX_DISABLED=1). Poll every OUTBOX_POLL_MS (default 2000). */
export function ensureOutboxSender(): void {
  const g = globalThis as unknown as Record<symbol, SenderState | undefined>;
  if (g[SENDER_KEY]) return;
  if (env().OUTBOX_DISABLED === '1') return;
  const pollMs = env().OUTBOX_POLL_MS;
  const instanceId = `${env().PLATEAU_INSTANCE}-${process.pid}-${randomUUID().slice(0, 8)}`;
  const state: SenderState = { running: false, timer: setInterval(() => void tick(), pollMs) };
  state.timer.unref?.();
  g[SENDER_KEY] = state;
  async function tick() {
    if (state.running) return;
    state.running = true;
    try {
      // Drain in batches while there is work.
      for (let i = 0; i < 10; i++) {
        const r = await deliverDue({ smtpUrl: env().SMTP_URL, instanceId });
        if (r.claimed < BATCH_SIZE) break;
      }
    } catch (err) {
      console.error('[plateau] outbox:', err instanceof Error ? err.message : String(err));
    } finally {
      state.running = false;
    }
  }
}
