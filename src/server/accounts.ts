import { eq, and, isNull, gt, ne, desc, sql } from 'drizzle-orm';
import { emailTokens, sessions, workspaces, memberships } from '../db/schema';
import { lucia } from './auth/session';
import { newToken, hashToken } from './auth/tokens';
import { enqueue } from './mail/outbox';
import { signUpConfirmMail, alreadyRegisteredMail, passwordResetMail } from './mail/templates';
import { env, demoAllowed, publicUrl } from '../config';
import { HttpError, notFound } from './http';
import type { UserCtx } from './context';
import { getDb } from '../db/client';
import { users } from '../db/schema';
import { verifyPassword, hashPassword, needsRehash, dummyPasswordHash } from './auth/password';
import { createSession } from './auth/session';
import { takeAttempt, forgive, refund } from './throttle';
import { audit } from './audit';
import { membershipsOf, roleIn, isDemoMember } from './workspaces';
import { insertDefaultWashTypes } from './vessels';
import { NUMBER_FORMATS, UNIT_SYSTEMS, type NumberFormat, type UnitSystem } from '../lib/vocabulary';

export const normaliseEmail = (email: string) => email.trim().toLowerCase();

/**
 * Carries the typed e-mail back to the sign-in page after a refused plain form post, for a few
 * minutes and for that page only (not in the URL, so not in logs or the browser's history).
 */
export const SIGN_IN_EMAIL_COOKIE = 'plateau_signin_email';

/** The time zone a distillery gets when none is chosen (the workspaces.time_zone column default). */
export const DEFAULT_TIME_ZONE = 'Europe/London';

/** The IANA name of a time zone this server knows, in its canonical spelling ("europe/paris" -> "Europe/Paris"), or null. */
export function canonicalTimeZone(tz: string): string | null {
  if (!tz || tz.length > 64) return null;
  try {
    return new Intl.DateTimeFormat('en', { timeZone: tz }).resolvedOptions().timeZone;
  } catch {
    return null;
  }
}

/** The zones a sign-up may choose from (IANA names this server knows), with `include` added if missing. */
export function timeZoneOptions(include: string = DEFAULT_TIME_ZONE): string[] {
  const list = (Intl as unknown as { supportedValuesOf?: (k: string) => string[] }).supportedValuesOf?.('timeZone') ?? [];
  return list.includes(include) ? list : [include, ...list].sort();
}

/** What a new distillery is set up with: chosen at sign-up, kept in the e-mailed token until confirmed. */
export interface SignUpChoices {
  timeZone?: string;
  units?: UnitSystem;
  numberFormat?: NumberFormat;
}

/** The choices stored with a sign-up token, read back defensively (an old token may lack them). */
export function signUpChoicesOf(payload: Record<string, string> | null | undefined): Required<SignUpChoices> {
  const zone = canonicalTimeZone(payload?.timeZone ?? '') ?? DEFAULT_TIME_ZONE;
  const units = (UNIT_SYSTEMS as readonly string[]).includes(payload?.units ?? '') ? (payload!.units as UnitSystem) : 'metric';
  const numberFormat = (NUMBER_FORMATS as readonly string[]).includes(payload?.numberFormat ?? '') ? (payload!.numberFormat as NumberFormat) : 'point';
  return { timeZone: zone, units, numberFormat };
}

/**
 * Check a password and open a new session. Unknown e-mail and wrong password give the
 * same answer (and a dummy hash is verified so the timing matches too).
 */
export async function signIn(input: { email: string; password: string; ip: string; userAgent: string | null }) {
  const email = normaliseEmail(input.email);
  // Counted before the password is checked (one atomic statement per key), so parallel guesses
  // cannot all slip under the limit; a success forgives the e-mail and refunds the address.
  await takeAttempt('sign_in', [`email:${email}`, `ip:${input.ip}`], { message: 'Too many failed sign-ins.' });
  const db = getDb();
  const [user] = await db.select().from(users).where(eq(users.email, email)).limit(1);
  const ok = user ? await verifyPassword(user.passwordHash, input.password) : (await verifyPassword(await dummyPasswordHash(), input.password), false);
  // Outside demo mode, the demo distillery's published sign-ins never open a session.
  const demoRefused = !!user && ok && !demoAllowed() && (await isDemoMember(user.id));
  if (demoRefused) console.error(`[plateau] refused a sign-in to demo account ${email}: demo accounts are disabled in ${env().PLATEAU_MODE} mode`);
  if (!user || !ok || user.disabledAt || !user.emailVerifiedAt || demoRefused) {
    await audit({ workspaceId: null, userId: user?.id ?? null, action: 'auth.sign_in_failed', details: { email }, ip: input.ip });
    throw new HttpError(400, 'bad_credentials', 'That e-mail and password do not match an account.', { email: 'Check the e-mail and password.' });
  }
  if (needsRehash(user.passwordHash)) {
    await db
      .update(users)
      .set({ passwordHash: await hashPassword(input.password) })
      .where(eq(users.id, user.id));
  }
  await forgive('sign_in', `email:${email}`);
  await refund('sign_in', [`ip:${input.ip}`]);
  const ms = await membershipsOf(user.id);
  const session = await createSession(user.id, ms[0]?.workspaceId ?? null, input.userAgent);
  await audit({ workspaceId: ms[0]?.workspaceId ?? null, userId: user.id, action: 'auth.sign_in', ip: input.ip });
  return { session, user };
}

// ---------------------------------------------------------------------------
// Sign-up, confirmation, password reset, account and sessions.
// ---------------------------------------------------------------------------

export const SIGNUP_TOKEN_HOURS = 24;
export const RESET_TOKEN_MINUTES = 30;
export const MIN_PASSWORD = 10;

/**
 * Ask to open a new distillery. The answer is the same whether or not the address has an
 * account: a new address gets a confirmation link, a known one gets a note instead. No
 * password is taken here: whoever asks does not yet own the address, so the password is
 * chosen on the page the confirmation link opens (a stranger who signs up with someone
 * else's address can never hand that person an account with the stranger's password).
 */
export async function requestSignUp(input: { email: string; name: string; workspaceName: string; ip: string } & SignUpChoices): Promise<void> {
  const email = normaliseEmail(input.email);
  const db = getDb();
  await db.transaction(async (tx) => {
    const [existing] = await tx.select({ id: users.id, name: users.name }).from(users).where(eq(users.email, email)).limit(1);
    if (existing) {
      const mail = alreadyRegisteredMail({ name: existing.name, signInLink: publicUrl('/sign-in'), resetLink: publicUrl('/forgot-password') });
      await enqueue(tx, { workspaceId: null, kind: 'signup_existing', to: email, ...mail });
      return;
    }
    const token = newToken();
    await tx.insert(emailTokens).values({
      purpose: 'signup_confirm',
      tokenHash: hashToken(token),
      email,
      userId: null,
      payload: {
        name: input.name,
        workspaceName: input.workspaceName,
        ...(input.timeZone ? { timeZone: input.timeZone } : {}),
        ...(input.units ? { units: input.units } : {}),
        ...(input.numberFormat ? { numberFormat: input.numberFormat } : {}),
      },
      expiresAt: new Date(Date.now() + SIGNUP_TOKEN_HOURS * 3600_000),
    });
    const mail = signUpConfirmMail({ name: input.name, workspaceName: input.workspaceName, link: publicUrl(`/confirm/${token}`), hours: SIGNUP_TOKEN_HOURS });
    await enqueue(tx, { workspaceId: null, kind: 'signup_confirm', to: email, ...mail });
  });
}

type TokenRow = typeof emailTokens.$inferSelect;

/** A usable (unused, unexpired) e-mailed token of this purpose, or null. */
export async function findEmailToken(token: string, purpose: TokenRow['purpose']): Promise<TokenRow | null> {
  if (!token || token.length > 200) return null;
  const [row] = await getDb()
    .select()
    .from(emailTokens)
    .where(
      and(eq(emailTokens.tokenHash, hashToken(token)), eq(emailTokens.purpose, purpose), isNull(emailTokens.usedAt), gt(emailTokens.expiresAt, new Date())),
    )
    .limit(1);
  return row ?? null;
}

const expiredLink = () => new HttpError(410, 'link_expired', 'This link has expired or has already been used. Ask for a new one.');

/** Spend a token exactly once inside a transaction (a concurrent second use updates nothing). */
async function spendToken(tx: Pick<ReturnType<typeof getDb>, 'update'>, id: number): Promise<void> {
  const [res] = await tx
    .update(emailTokens)
    .set({ usedAt: new Date() })
    .where(and(eq(emailTokens.id, id), isNull(emailTokens.usedAt), gt(emailTokens.expiresAt, new Date())));
  if ((res as { affectedRows?: number }).affectedRows !== 1) throw expiredLink();
}

/**
 * Follow a sign-up confirmation: the owner of the address, holding the link, chooses the
 * password (and may correct the names) here. Creates the person, the workspace and the
 * manager membership, and signs in.
 */
export async function confirmSignUp(
  token: string,
  input: { name?: string; workspaceName?: string; password: string },
  meta: { ip: string; userAgent: string | null },
) {
  const row = await findEmailToken(token, 'signup_confirm');
  if (!row || !row.payload) throw expiredLink();
  const name = input.name ?? row.payload.name ?? 'Manager';
  const workspaceName = input.workspaceName ?? row.payload.workspaceName ?? 'My distillery';
  const choices = signUpChoicesOf(row.payload);
  const passwordHash = await hashPassword(input.password);
  const db = getDb();
  const { userId, workspaceId } = await db.transaction(async (tx) => {
    await spendToken(tx, row.id);
    const [exists] = await tx.select({ id: users.id }).from(users).where(eq(users.email, row.email)).limit(1);
    if (exists) throw new HttpError(409, 'conflict', 'This address already has an account. Sign in instead.');
    const [u] = await tx.insert(users).values({ email: row.email, name, passwordHash, emailVerifiedAt: new Date() }).$returningId();
    const [w] = await tx
      .insert(workspaces)
      .values({ name: workspaceName, ...choices })
      .$returningId();
    await tx.insert(memberships).values({ workspaceId: w!.id, userId: u!.id, role: 'manager' });
    // A new distillery starts with the trade's usual wash types, editable later.
    await insertDefaultWashTypes(w!.id, tx);
    await audit(
      {
        workspaceId: w!.id,
        userId: u!.id,
        action: 'workspace.created',
        entityType: 'workspace',
        entityId: w!.id,
        details: { name: workspaceName, ...choices },
        ip: meta.ip,
      },
      tx,
    );
    return { userId: u!.id, workspaceId: w!.id };
  });
  const session = await createSession(userId, workspaceId, meta.userAgent);
  await audit({ workspaceId, userId, action: 'auth.sign_in', ip: meta.ip });
  return { session, workspaceId };
}

/** Ask for a reset link. Same answer whether or not the address has an account. */
export async function requestPasswordReset(input: { email: string; ip: string }): Promise<void> {
  const email = normaliseEmail(input.email);
  const db = getDb();
  const [user] = await db.select().from(users).where(eq(users.email, email)).limit(1);
  if (!user || user.disabledAt) return;
  await db.transaction(async (tx) => {
    const token = newToken();
    await tx.insert(emailTokens).values({
      purpose: 'password_reset',
      tokenHash: hashToken(token),
      email,
      userId: user.id,
      expiresAt: new Date(Date.now() + RESET_TOKEN_MINUTES * 60_000),
    });
    const mail = passwordResetMail({ name: user.name, link: publicUrl(`/reset-password/${token}`), minutes: RESET_TOKEN_MINUTES });
    await enqueue(tx, { workspaceId: null, kind: 'password_reset', to: email, ...mail });
  });
}

/** Set a new password from a reset link: single use, and every session of that person ends. */
export async function resetPassword(token: string, password: string, meta: { ip: string }): Promise<void> {
  const row = await findEmailToken(token, 'password_reset');
  if (!row || !row.userId) throw expiredLink();
  const passwordHash = await hashPassword(password);
  const userId = row.userId;
  const db = getDb();
  const ms = await membershipsOf(userId);
  await db.transaction(async (tx) => {
    await spendToken(tx, row.id);
    await tx
      .update(users)
      .set({ passwordHash, emailVerifiedAt: sql`COALESCE(${users.emailVerifiedAt}, CURRENT_TIMESTAMP(3))` })
      .where(eq(users.id, userId));
    await tx.delete(sessions).where(eq(sessions.userId, userId));
    // Other outstanding reset links for this person stop working too.
    await tx
      .update(emailTokens)
      .set({ usedAt: new Date() })
      .where(and(eq(emailTokens.userId, userId), eq(emailTokens.purpose, 'password_reset'), isNull(emailTokens.usedAt)));
    for (const m of ms.length ? ms : [{ workspaceId: null as number | null }]) {
      await audit({ workspaceId: m.workspaceId, userId, action: 'auth.password_reset', ip: meta.ip }, tx);
    }
  });
  await forgive('sign_in', `email:${row.email}`);
}

export async function updateName(me: UserCtx, name: string): Promise<void> {
  await getDb().update(users).set({ name }).where(eq(users.id, me.userId));
}

/** Change the password (current one required) and end every other session. */
export async function changePassword(me: UserCtx, current: string, next: string): Promise<{ endedSessions: number }> {
  const { userId } = me;
  const db = getDb();
  const [user] = await db.select().from(users).where(eq(users.id, userId)).limit(1);
  if (!user || !(await verifyPassword(user.passwordHash, current))) {
    throw new HttpError(400, 'invalid', 'Your current password is not right.', { currentPassword: 'Your current password is not right.' });
  }
  const passwordHash = await hashPassword(next);
  await db.update(users).set({ passwordHash }).where(eq(users.id, userId));
  const ended = await signOutOtherSessions(me);
  const ms = await membershipsOf(userId);
  for (const m of ms) await audit({ workspaceId: m.workspaceId, userId, action: 'auth.password_changed' });
  return { endedSessions: ended };
}

/** End every session of this person except the one they are using. */
export async function signOutOtherSessions(me: UserCtx): Promise<number> {
  const [res] = await getDb()
    .delete(sessions)
    .where(and(eq(sessions.userId, me.userId), ne(sessions.id, me.sessionId)));
  return (res as { affectedRows?: number }).affectedRows ?? 0;
}

/** Sessions are listed by a public handle (a hash of the secret id), never the id itself. */
export const sessionHandle = (sessionId: string) => hashToken(sessionId).slice(0, 24);

export interface SessionInfo {
  handle: string;
  current: boolean;
  createdAt: Date;
  expiresAt: Date;
  userAgent: string | null;
  device: string;
}

export async function listSessions(me: UserCtx): Promise<SessionInfo[]> {
  const rows = await getDb()
    .select()
    .from(sessions)
    .where(and(eq(sessions.userId, me.userId), gt(sessions.expiresAt, new Date())))
    .orderBy(desc(sessions.createdAt));
  return rows.map((r) => ({
    handle: sessionHandle(r.id),
    current: r.id === me.sessionId,
    createdAt: r.createdAt,
    expiresAt: r.expiresAt,
    userAgent: r.userAgent,
    device: describeDevice(r.userAgent),
  }));
}

export async function endSessionByHandle(me: UserCtx, handle: string): Promise<void> {
  const rows = await getDb().select({ id: sessions.id }).from(sessions).where(eq(sessions.userId, me.userId));
  const match = rows.find((r) => sessionHandle(r.id) === handle);
  if (!match) throw notFound('No such session.');
  await lucia().invalidateSession(match.id);
}

/** A plain description of a browser from its user-agent string. */
export function describeDevice(ua: string | null): string {
  if (!ua) return 'Unknown device';
  const browser = /Edg\//.test(ua)
    ? 'Edge'
    : /Firefox\//.test(ua)
      ? 'Firefox'
      : /Chrome\/|Chromium\//.test(ua)
        ? 'Chrome'
        : /Safari\//.test(ua)
          ? 'Safari'
          : /node|undici|curl/i.test(ua)
            ? 'Script'
            : 'Browser';
  const os = /iPhone|iPad/.test(ua)
    ? 'iPhone/iPad'
    : /Android/.test(ua)
      ? 'Android'
      : /Windows/.test(ua)
        ? 'Windows'
        : /Mac OS X/.test(ua)
          ? 'Mac'
          : /Linux/.test(ua)
            ? 'Linux'
            : '';
  return os ? `${browser} on ${os}` : browser;
}

/** Point the session at another of the person's distilleries (after checking membership). */
export async function switchWorkspace(me: UserCtx, workspaceId: number): Promise<void> {
  const role = await roleIn(me.userId, workspaceId);
  if (!role) throw notFound('You are not a member of that distillery.');
  await getDb()
    .update(sessions)
    .set({ workspaceId })
    .where(and(eq(sessions.id, me.sessionId), eq(sessions.userId, me.userId)));
}
