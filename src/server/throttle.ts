import { eq } from 'drizzle-orm';
import { getDb } from '../db/client';
import { signInThrottle } from '../db/schema';

/**
 * Failed sign-ins are counted per e-mail and per IP. After FREE_FAILURES in a window,
 * each further failure blocks for a doubling delay (capped), so an attacker is slowed
 * while the real owner is never locked out for longer than MAX_BLOCK_MS.
 */
export const FREE_FAILURES = 5;
export const WINDOW_MS = 15 * 60 * 1000;
export const BASE_BLOCK_MS = 30 * 1000;
export const MAX_BLOCK_MS = 15 * 60 * 1000;

export async function blockedFor(keys: string[], now = new Date()): Promise<number> {
  let worst = 0;
  for (const key of keys) {
    const [row] = await getDb().select().from(signInThrottle).where(eq(signInThrottle.key, key)).limit(1);
    if (row?.blockedUntil && row.blockedUntil > now) worst = Math.max(worst, row.blockedUntil.getTime() - now.getTime());
  }
  return worst;
}

export async function recordFailure(keys: string[], now = new Date()): Promise<void> {
  for (const key of keys) {
    const db = getDb();
    await db.transaction(async (tx) => {
      const [row] = await tx.select().from(signInThrottle).where(eq(signInThrottle.key, key)).for('update').limit(1);
      if (!row || now.getTime() - row.windowStartedAt.getTime() > WINDOW_MS) {
        await tx.insert(signInThrottle).values({ key, failures: 1, windowStartedAt: now, blockedUntil: null })
          .onDuplicateKeyUpdate({ set: { failures: 1, windowStartedAt: now, blockedUntil: null } });
        return;
      }
      const failures = row.failures + 1;
      const over = failures - FREE_FAILURES;
      const blockedUntil = over > 0 ? new Date(now.getTime() + Math.min(MAX_BLOCK_MS, BASE_BLOCK_MS * 2 ** (over - 1))) : null;
      await tx.update(signInThrottle).set({ failures, blockedUntil }).where(eq(signInThrottle.key, key));
    });
  }
}

export async function clearFailures(key: string): Promise<void> {
  await getDb().delete(signInThrottle).where(eq(signInThrottle.key, key));
}

export const throttleKeys = (email: string, ip: string) => [`email:${email.toLowerCase()}`, `ip:${ip}`];
