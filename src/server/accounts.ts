import { eq } from 'drizzle-orm';
import { getDb } from '../db/client';
import { users } from '../db/schema';
import { verifyPassword, hashPassword, needsRehash, dummyPasswordHash } from './auth/password';
import { createSession } from './auth/session';
import { blockedFor, recordFailure, clearFailures, throttleKeys } from './throttle';
import { audit } from './audit';
import { membershipsOf } from './workspaces';
import { HttpError } from './http';

export const normaliseEmail = (email: string) => email.trim().toLowerCase();

/**
 * Check a password and open a new session. Unknown e-mail and wrong password give the
 * same answer (and a dummy hash is verified so the timing matches too).
 */
export async function signIn(input: { email: string; password: string; ip: string; userAgent: string | null }) {
  const email = normaliseEmail(input.email);
  const keys = throttleKeys(email, input.ip);
  const wait = await blockedFor(keys);
  if (wait > 0) {
    throw new HttpError(429, 'throttled', `Too many failed sign-ins. Try again in ${Math.ceil(wait / 1000)} seconds.`, undefined, { retryAfter: Math.ceil(wait / 1000) });
  }
  const db = getDb();
  const [user] = await db.select().from(users).where(eq(users.email, email)).limit(1);
  const ok = user ? await verifyPassword(user.passwordHash, input.password) : (await verifyPassword(await dummyPasswordHash(), input.password), false);
  if (!user || !ok || user.disabledAt || !user.emailVerifiedAt) {
    await recordFailure(keys);
    await audit({ workspaceId: null, userId: user?.id ?? null, action: 'auth.sign_in_failed', details: { email }, ip: input.ip });
    throw new HttpError(400, 'bad_credentials', 'That e-mail and password do not match an account.', { email: 'Check the e-mail and password.' });
  }
  if (needsRehash(user.passwordHash)) {
    await db.update(users).set({ passwordHash: await hashPassword(input.password) }).where(eq(users.id, user.id));
  }
  await clearFailures(`email:${email}`);
  const ms = await membershipsOf(user.id);
  const session = await createSession(user.id, ms[0]?.workspaceId ?? null, input.userAgent);
  await audit({ workspaceId: ms[0]?.workspaceId ?? null, userId: user.id, action: 'auth.sign_in', ip: input.ip });
  return { session, user };
}
