import { createHash } from 'node:crypto';
import { eq, sql } from 'drizzle-orm';
import { getDb } from '../db/client';
import { signInThrottle } from '../db/schema';
import { HttpError } from './http';
import { isRetryableTxError } from './db-errors';

/**
 * Attempts at sign-in and the other account routes are counted per key (e-mail, person,
 * client address) and bucket. After a bucket's free allowance in its window, each further
 * attempt blocks for a doubling delay (capped), so an attacker is slowed while the real owner
 * is never locked out for longer than the window and the cap allow.
 */
export const FREE_FAILURES = 5;
export const WINDOW_MS = 15 * 60 * 1000;
export const BASE_BLOCK_MS = 30 * 1000;
export const MAX_BLOCK_MS = 15 * 60 * 1000;

// ---------------------------------------------------------------------------
// Attempt counting: every attempt is counted BEFORE the expensive or revealing work (a
// password hash, a mail), in one atomic statement per key, so parallel requests cannot all
// slip under the limit. A success may forgive a key afterwards (sign-in forgives the e-mail).
// ---------------------------------------------------------------------------

export type ThrottleBucket = 'sign_in' | 'sign_up' | 'forgot_password' | 'confirm' | 'accept_invitation' | 'reset_password' | 'password_change';

/** Attempts allowed per window for one key, and the block once they are used up. */
export interface ThrottleRule {
  /** Attempts that pass in one window; the next one blocks. */
  free: number;
  windowMs: number;
  /** First block; each further attempt in the window doubles it, up to maxBlockMs. */
  baseBlockMs: number;
  maxBlockMs: number;
}

/** A key is `kind:value` (`email:a@b.example`, `ip:203.0.113.9`, `user:42`); its kind picks the rule. */
export type BucketRules = { default: ThrottleRule } & Partial<Record<'email' | 'ip' | 'user' | 'token', ThrottleRule>>;

const MINUTE = 60_000;
const HOUR = 60 * MINUTE;

export const THROTTLE_RULES: Readonly<Record<ThrottleBucket, BucketRules>> = {
  // One account: a handful of guesses per quarter hour (a success forgives the e-mail). One
  // address: more, for an office behind one NAT (a success refunds its attempt, never clears the key).
  sign_in: {
    email: { free: FREE_FAILURES, windowMs: WINDOW_MS, baseBlockMs: BASE_BLOCK_MS, maxBlockMs: MAX_BLOCK_MS },
    default: { free: 10, windowMs: WINDOW_MS, baseBlockMs: MINUTE, maxBlockMs: MAX_BLOCK_MS },
  },
  // Each of these sends a mail to an address anyone may type: few per hour.
  sign_up: {
    email: { free: 3, windowMs: HOUR, baseBlockMs: 10 * MINUTE, maxBlockMs: HOUR },
    default: { free: 10, windowMs: HOUR, baseBlockMs: 10 * MINUTE, maxBlockMs: HOUR },
  },
  forgot_password: {
    email: { free: 3, windowMs: HOUR, baseBlockMs: 10 * MINUTE, maxBlockMs: HOUR },
    default: { free: 10, windowMs: HOUR, baseBlockMs: 10 * MINUTE, maxBlockMs: HOUR },
  },
  // Token routes: tokens are 256-bit, so this bounds load and noise rather than guessing.
  confirm: { default: { free: 20, windowMs: 15 * MINUTE, baseBlockMs: MINUTE, maxBlockMs: 15 * MINUTE } },
  accept_invitation: { default: { free: 10, windowMs: 15 * MINUTE, baseBlockMs: MINUTE, maxBlockMs: 15 * MINUTE } },
  reset_password: { default: { free: 10, windowMs: 15 * MINUTE, baseBlockMs: MINUTE, maxBlockMs: 15 * MINUTE } },
  // A signed-in person re-entering the current password: as strict as sign-in per person.
  password_change: {
    user: { free: FREE_FAILURES, windowMs: WINDOW_MS, baseBlockMs: BASE_BLOCK_MS, maxBlockMs: MAX_BLOCK_MS },
    default: { free: 20, windowMs: WINDOW_MS, baseBlockMs: MINUTE, maxBlockMs: MAX_BLOCK_MS },
  },
};

const THROTTLE_MESSAGES: Record<ThrottleBucket, string> = {
  sign_in: 'Too many sign-in attempts.',
  sign_up: 'Too many sign-ups from here.',
  forgot_password: 'Too many password reset requests.',
  confirm: 'Too many confirmation attempts.',
  accept_invitation: 'Too many invitation attempts.',
  reset_password: 'Too many password reset attempts.',
  password_change: 'Too many password change attempts.',
};

/** The longest window of any rule: a row older than this with no running block is dead. */
export const LONGEST_THROTTLE_WINDOW_MS = Math.max(WINDOW_MS, ...Object.values(THROTTLE_RULES).flatMap((rules) => Object.values(rules).map((r) => r.windowMs)));

const KEY_COLUMN_LENGTH = 300;

export function ruleFor(bucket: ThrottleBucket, key: string): ThrottleRule {
  const rules = THROTTLE_RULES[bucket];
  const colon = key.indexOf(':');
  const kind = colon > 0 ? key.slice(0, colon) : '';
  return (rules as Record<string, ThrottleRule | undefined>)[kind] ?? rules.default;
}

/** The stored key: the bucket as a prefix (one table, no migration); an over-long key is hashed. */
export function storedThrottleKey(bucket: ThrottleBucket, key: string): string {
  const stored = `${bucket}|${key}`;
  return stored.length <= KEY_COLUMN_LENGTH ? stored : `${bucket}|sha256:${createHash('sha256').update(key).digest('hex')}`;
}

/** Pruning runs from takeAttempt at most this often per process, without holding the caller up. */
export const PRUNE_EVERY_MS = 10 * MINUTE;
let lastPrunedAt = 0;

function sleep(ms: number): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, ms));
}

/**
 * Counts one attempt against every key of the bucket and throws the 429 HttpError (with
 * retryAfter, in seconds) when any key is now blocked. For each key, one INSERT ... ON DUPLICATE
 * KEY UPDATE counts the attempt, starts a new window when the old one has expired, and sets
 * blocked_until once the count passes the rule's free allowance; the row is then read back in
 * the same transaction, which still holds its lock, so each caller sees its own count: of 30
 * parallel calls exactly `free` pass. Attempts made while blocked are counted too (the block
 * doubles, up to its cap). Keys are taken in sorted order so two callers cannot deadlock; a
 * deadlock or Galera certification failure replays the transaction.
 */
export async function takeAttempt(bucket: ThrottleBucket, keys: readonly string[], opts: { now?: Date; message?: string } = {}): Promise<void> {
  const now = opts.now ?? new Date();
  const stored = [...new Set(keys.map((k) => storedThrottleKey(bucket, k)))].sort();
  if (stored.length === 0) return;
  const ruleOf = new Map(keys.map((k) => [storedThrottleKey(bucket, k), ruleFor(bucket, k)]));

  let waitMs = 0;
  for (let attempt = 1; ; attempt++) {
    try {
      waitMs = await getDb().transaction(
        async (tx) => {
          for (const key of stored) {
            const r = ruleOf.get(key)!;
            const windowStartedBefore = new Date(now.getTime() - r.windowMs);
            const firstBlock = r.free < 1 ? new Date(now.getTime() + Math.min(r.maxBlockMs, r.baseBlockMs)) : null;
            // Assignments run left to right and each sees the columns already assigned: blocked_until
            // reads the old count and window, failures the old window, the window itself goes last.
            await tx.execute(sql`INSERT INTO sign_in_throttle (throttle_key, failures, window_started_at, blocked_until)
            VALUES (${key}, 1, ${now}, ${firstBlock})
            ON DUPLICATE KEY UPDATE
              blocked_until = IF(window_started_at <= ${windowStartedBefore},
                IF(blocked_until > ${now}, blocked_until, ${firstBlock}),
                IF(failures + 1 > ${r.free},
                  GREATEST(COALESCE(blocked_until, ${now}),
                    TIMESTAMPADD(MICROSECOND, 1000 * CAST(LEAST(${r.maxBlockMs}, ${r.baseBlockMs} * POW(2, LEAST(30, failures - ${r.free}))) AS SIGNED), ${now})),
                  blocked_until)),
              failures = IF(window_started_at <= ${windowStartedBefore}, 1, failures + 1),
              window_started_at = IF(window_started_at <= ${windowStartedBefore}, ${now}, window_started_at)`);
          }
          const [rows] = await tx.execute(sql`SELECT blocked_until FROM sign_in_throttle
          WHERE throttle_key IN (${sql.join(
            stored.map((k) => sql`${k}`),
            sql`, `,
          )}) AND blocked_until > ${now}`);
          let worst = 0;
          for (const row of rows as unknown as { blocked_until: Date }[]) worst = Math.max(worst, new Date(row.blocked_until).getTime() - now.getTime());
          return worst;
        },
        { isolationLevel: 'read committed' },
      );
      break;
    } catch (err) {
      if (attempt >= 6 || !isRetryableTxError(err)) throw err;
      await sleep(5 * attempt + Math.random() * 15 * attempt);
    }
  }

  if (now.getTime() - lastPrunedAt >= PRUNE_EVERY_MS) {
    lastPrunedAt = now.getTime();
    void pruneThrottle(now).catch(() => {
      /* best effort: the next prune takes what this one left */
    });
  }

  if (waitMs > 0) {
    const retryAfter = Math.max(1, Math.ceil(waitMs / 1000));
    throw new HttpError(429, 'throttled', `${opts.message ?? THROTTLE_MESSAGES[bucket]} Try again in ${retryAfter} seconds.`, undefined, { retryAfter });
  }
}

/** Clears one key of a bucket after a success (sign-in forgives the e-mail, never the address). */
export async function forgive(bucket: ThrottleBucket, key: string): Promise<void> {
  await getDb()
    .delete(signInThrottle)
    .where(eq(signInThrottle.key, storedThrottleKey(bucket, key)));
}

/**
 * Gives back the attempt a success used, without forgetting the others: sign-in refunds the
 * address key (an office behind one NAT signs in all day), but never clears it, so an attacker
 * who signs into an account of their own between guesses gains nothing (each success was counted
 * before it was refunded). A running block is left alone.
 */
export async function refund(bucket: ThrottleBucket, keys: readonly string[], opts: { now?: Date } = {}): Promise<void> {
  const now = opts.now ?? new Date();
  const stored = [...new Set(keys.map((k) => storedThrottleKey(bucket, k)))];
  if (stored.length === 0) return;
  await getDb().execute(sql`UPDATE sign_in_throttle SET failures = GREATEST(failures - 1, 0)
    WHERE throttle_key IN (${sql.join(
      stored.map((k) => sql`${k}`),
      sql`, `,
    )}) AND (blocked_until IS NULL OR blocked_until <= ${now})`);
}

/**
 * Deletes rows whose window and block have both run out, oldest first and at most `limit` per
 * call (one cheap statement; takeAttempt calls it now and then). Returns how many went.
 */
export async function pruneThrottle(now: Date = new Date(), limit = 1000): Promise<number> {
  const windowStartedBefore = new Date(now.getTime() - LONGEST_THROTTLE_WINDOW_MS);
  const [result] = await getDb().execute(sql`DELETE FROM sign_in_throttle
    WHERE window_started_at < ${windowStartedBefore} AND (blocked_until IS NULL OR blocked_until <= ${now})
    LIMIT ${limit}`);
  return (result as unknown as { affectedRows?: number }).affectedRows ?? 0;
}
