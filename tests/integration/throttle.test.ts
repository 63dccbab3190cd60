import { describe, it, expect } from 'vitest';
import { randomBytes } from 'node:crypto';
import { eq, inArray } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import { signInThrottle } from '../../src/db/schema';
import { HttpError } from '../../src/server/http';
import {
  takeAttempt,
  forgive,
  refund,
  pruneThrottle,
  storedThrottleKey,
  THROTTLE_RULES,
  LONGEST_THROTTLE_WINDOW_MS,
  type ThrottleBucket,
} from '../../src/server/throttle';

// The attempt counter on the real MariaDB: one atomic statement per key, so parallel callers
// cannot all slip under the limit. Keys are unique per run; the database is shared.
const run = randomBytes(4).toString('hex');
const email = (name: string) => `email:${name}-${run}@throttle.example`;
const ip = (n: number) => `ip:198.51.100.${n}-${run}`;

async function settle(bucket: ThrottleBucket, keys: string[], times: number, now?: Date) {
  const results = await Promise.allSettled(Array.from({ length: times }, () => takeAttempt(bucket, keys, { now })));
  const passed = results.filter((r) => r.status === 'fulfilled').length;
  const refused = results.flatMap((r) => (r.status === 'rejected' ? [r.reason as unknown] : []));
  return { passed, refused };
}

async function row(bucket: ThrottleBucket, key: string) {
  const [r] = await getDb()
    .select()
    .from(signInThrottle)
    .where(eq(signInThrottle.key, storedThrottleKey(bucket, key)));
  return r;
}

describe('takeAttempt', () => {
  it('lets exactly the free allowance through when 30 attempts arrive at once (one e-mail)', async () => {
    const { free } = THROTTLE_RULES.sign_in.email!;
    const { passed, refused } = await settle('sign_in', [email('parallel')], 30);
    expect(passed).toBe(free);
    expect(refused).toHaveLength(30 - free);
    for (const err of refused) {
      expect(err).toBeInstanceOf(HttpError);
      expect((err as HttpError).status).toBe(429);
      expect((err as HttpError).code).toBe('throttled');
      expect((err as HttpError).extra?.retryAfter).toBeGreaterThan(0);
    }
    expect((await row('sign_in', email('parallel')))?.failures).toBe(30);
  });

  it('lets exactly the address allowance through when 30 sign-ups arrive at once from one address', async () => {
    const { free } = THROTTLE_RULES.sign_up.default;
    expect(free).toBeLessThan(30);
    const { passed } = await settle('sign_up', [ip(1)], 30);
    expect(passed).toBe(free);
  });

  it('with two keys, the stricter one decides, and every attempt is counted on both', async () => {
    const keys = [email('both'), ip(2)];
    const { passed } = await settle('sign_in', keys, 30);
    expect(passed).toBe(Math.min(THROTTLE_RULES.sign_in.email!.free, THROTTLE_RULES.sign_in.default.free));
    expect((await row('sign_in', ip(2)))?.failures).toBe(30);
  });

  it('keeps buckets apart: the same key in another bucket starts from zero', async () => {
    const key = email('apart');
    await settle('sign_in', [key], 30);
    await expect(takeAttempt('forgot_password', [key])).resolves.toBeUndefined();
  });

  it('blocks with a growing, capped delay and starts a new window once the old one is over', async () => {
    const key = email('window');
    const rule = THROTTLE_RULES.sign_in.email!;
    const t0 = new Date(Date.now() - 2 * rule.windowMs);
    for (let i = 0; i < rule.free; i++) await takeAttempt('sign_in', [key], { now: t0 });
    const first = await takeAttempt('sign_in', [key], { now: t0 }).catch((e: HttpError) => e);
    expect((first as HttpError).extra?.retryAfter).toBe(rule.baseBlockMs / 1000);
    const second = await takeAttempt('sign_in', [key], { now: t0 }).catch((e: HttpError) => e);
    expect((second as HttpError).extra?.retryAfter).toBe((2 * rule.baseBlockMs) / 1000);
    for (let i = 0; i < 20; i++) await takeAttempt('sign_in', [key], { now: t0 }).catch(() => undefined);
    const capped = await takeAttempt('sign_in', [key], { now: t0 }).catch((e: HttpError) => e);
    expect((capped as HttpError).extra?.retryAfter).toBe(rule.maxBlockMs / 1000);

    // After the window and the block: a fresh window, counted from one.
    const later = new Date(t0.getTime() + Math.max(rule.windowMs, rule.maxBlockMs) + 1000);
    await expect(takeAttempt('sign_in', [key], { now: later })).resolves.toBeUndefined();
    const r = await row('sign_in', key);
    expect(r?.failures).toBe(1);
    expect(r?.windowStartedAt.getTime()).toBe(later.getTime());
    expect(r?.blockedUntil).toBeNull();
  });

  it('does not lift a block that outlasts its window', async () => {
    const key = email('outlast');
    const rule = THROTTLE_RULES.sign_in.email!;
    const t0 = new Date(Date.now() - 3 * rule.windowMs);
    for (let i = 0; i < rule.free + 1; i++) await takeAttempt('sign_in', [key], { now: t0 }).catch(() => undefined);
    const blockedUntil = new Date(t0.getTime() + rule.windowMs + 60_000);
    await getDb()
      .update(signInThrottle)
      .set({ blockedUntil })
      .where(eq(signInThrottle.key, storedThrottleKey('sign_in', key)));

    const justAfterWindow = new Date(t0.getTime() + rule.windowMs + 1);
    await expect(takeAttempt('sign_in', [key], { now: justAfterWindow })).rejects.toMatchObject({ status: 429, extra: { retryAfter: 60 } });
    const r = await row('sign_in', key);
    expect(r?.failures).toBe(1);
    expect(r?.blockedUntil?.getTime()).toBe(blockedUntil.getTime());
  });
});

describe('forgive', () => {
  it('clears one key after a success and leaves the others counted', async () => {
    const keys = [email('forgiven'), ip(3)];
    await settle('sign_in', keys, THROTTLE_RULES.sign_in.email!.free + 1);
    await expect(takeAttempt('sign_in', keys)).rejects.toMatchObject({ status: 429 });
    await forgive('sign_in', keys[0]!);
    expect(await row('sign_in', keys[0]!)).toBeUndefined();
    expect((await row('sign_in', keys[1]!))?.failures).toBe(THROTTLE_RULES.sign_in.email!.free + 2);
    await expect(takeAttempt('sign_in', keys)).resolves.toBeUndefined();
  });
});

describe('refund', () => {
  it('gives back one attempt per success, so signing in all day from one address never blocks it', async () => {
    const address = ip(4);
    const { free } = THROTTLE_RULES.sign_in.default;
    for (let i = 0; i < free * 2; i++) {
      await takeAttempt('sign_in', [address]);
      await refund('sign_in', [address]);
    }
    expect((await row('sign_in', address))?.failures).toBe(0);
  });

  it('does not erase failures: guesses between successes still add up to a block', async () => {
    const address = ip(5);
    const { free } = THROTTLE_RULES.sign_in.default;
    let refused = 0;
    for (let i = 0; i < free + 1; i++) {
      await takeAttempt('sign_in', [address]).catch(() => {
        refused++;
      }); // a wrong guess
      await takeAttempt('sign_in', [address]).then(
        () => refund('sign_in', [address]),
        () => {
          refused++;
        },
      ); // a success
    }
    expect(refused).toBeGreaterThan(0);
    await expect(takeAttempt('sign_in', [address])).rejects.toMatchObject({ status: 429 });
  });
});

describe('pruneThrottle', () => {
  it('deletes rows whose window and block have both run out, and keeps the rest', async () => {
    const now = new Date();
    const old = new Date(now.getTime() - LONGEST_THROTTLE_WINDOW_MS - 60_000);
    const expired = email('expired');
    const live = email('live');
    const oldButBlocked = email('blocked');
    await takeAttempt('forgot_password', [expired], { now: old });
    await takeAttempt('sign_in', [live], { now });
    await settle('sign_in', [oldButBlocked], 30, old);
    // A block that outlives its window by far (as a long block would) must survive pruning.
    await getDb()
      .update(signInThrottle)
      .set({ blockedUntil: new Date(now.getTime() + 60_000) })
      .where(eq(signInThrottle.key, storedThrottleKey('sign_in', oldButBlocked)));

    const removed = await pruneThrottle(now);
    expect(removed).toBeGreaterThanOrEqual(1);
    const left = await getDb()
      .select({ key: signInThrottle.key })
      .from(signInThrottle)
      .where(
        inArray(signInThrottle.key, [
          storedThrottleKey('forgot_password', expired),
          storedThrottleKey('sign_in', live),
          storedThrottleKey('sign_in', oldButBlocked),
        ]),
      );
    expect(left.map((r) => r.key).sort()).toEqual([storedThrottleKey('sign_in', live), storedThrottleKey('sign_in', oldButBlocked)].sort());
  });
});
