import { Lucia, TimeSpan, type DatabaseSession, type DatabaseUser } from 'lucia';
import { DrizzleMySQLAdapter } from '@lucia-auth/adapter-drizzle';
import type { AstroCookies } from 'astro';
import { asc, eq, sql } from 'drizzle-orm';
import { getDb } from '../../db/client';
import { memberships, sessions, users, workspaces } from '../../db/schema';
import type { Role } from '../../lib/vocabulary';
import { toSettings, type WorkspaceSettings } from '../workspaces';
import { cookiesMustBeSecure } from '../request';
import { hashToken, newToken } from './tokens';

/** Idle expiry: a session unused for this long ends (lucia slides it on use). */
export const SESSION_IDLE = new TimeSpan(7, 'd');
/** Absolute expiry: no session lives longer than this, however busy. */
export const SESSION_ABSOLUTE_MS = 30 * 24 * 3600 * 1000;

let instance: Lucia<Record<never, never>, DatabaseUserAttributes> | null = null;

/** One of the signed-in person's workspaces, with its settings, as the middleware needs it. */
export interface SessionMembership {
  workspaceId: number;
  name: string;
  role: Role;
  settings: WorkspaceSettings;
}

interface DatabaseUserAttributes {
  email: string;
  name: string;
  disabledAt: Date | null;
  emailVerifiedAt: Date | null;
  memberships: SessionMembership[];
}

/**
 * The drizzle adapter, except that a session is validated in one round trip: the session, its
 * person (without the password hash) and that person's memberships with each workspace's
 * settings come back from one prepared, joined query — the read every request pays.
 */
class PlateauSessionAdapter extends DrizzleMySQLAdapter {
  private lookup = getDb()
    .select({
      sessionId: sessions.id,
      userId: sessions.userId,
      expiresAt: sessions.expiresAt,
      sessionWorkspaceId: sessions.workspaceId,
      createdAt: sessions.createdAt,
      userAgent: sessions.userAgent,
      email: users.email,
      name: users.name,
      disabledAt: users.disabledAt,
      emailVerifiedAt: users.emailVerifiedAt,
      role: memberships.role,
      ws: workspaces,
    })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .leftJoin(memberships, eq(memberships.userId, sessions.userId))
    .leftJoin(workspaces, eq(workspaces.id, memberships.workspaceId))
    .where(eq(sessions.id, sql.placeholder('id')))
    .orderBy(asc(workspaces.name), asc(workspaces.id))
    .prepare();

  override async getSessionAndUser(sessionId: string): Promise<[DatabaseSession | null, DatabaseUser | null]> {
    const rows = await this.lookup.execute({ id: sessionId });
    const first = rows[0];
    if (!first) return [null, null];
    const mine: SessionMembership[] = [];
    for (const r of rows) if (r.ws && r.role) mine.push({ workspaceId: r.ws.id, name: r.ws.name, role: r.role, settings: toSettings(r.ws) });
    return [
      {
        id: first.sessionId,
        userId: first.userId,
        expiresAt: first.expiresAt,
        attributes: { workspaceId: first.sessionWorkspaceId, createdAt: first.createdAt, userAgent: first.userAgent },
      },
      {
        id: first.userId,
        attributes: { email: first.email, name: first.name, disabledAt: first.disabledAt, emailVerifiedAt: first.emailVerifiedAt, memberships: mine },
      },
    ];
  }
}
interface DatabaseSessionAttributes {
  workspaceId: number | null;
  createdAt: Date;
  userAgent: string | null;
}

export function lucia() {
  instance ??= new Lucia(new PlateauSessionAdapter(getDb(), sessions, users), {
    sessionExpiresIn: SESSION_IDLE,
    sessionCookie: { name: 'plateau_session', expires: false, attributes: { sameSite: 'lax', secure: false } },
    getUserAttributes: (a) => ({
      email: a.email,
      name: a.name,
      disabledAt: a.disabledAt,
      emailVerifiedAt: a.emailVerifiedAt,
      memberships: a.memberships ?? [],
    }),
    getSessionAttributes: (a: DatabaseSessionAttributes) => ({ workspaceId: a.workspaceId, createdAt: a.createdAt, userAgent: a.userAgent }),
  }) as unknown as Lucia<Record<never, never>, DatabaseUserAttributes>;
  return instance;
}

declare module 'lucia' {
  interface Register {
    Lucia: Lucia<DatabaseSessionAttributes, DatabaseUserAttributes>;
    UserId: number;
    DatabaseUserAttributes: DatabaseUserAttributes;
    DatabaseSessionAttributes: DatabaseSessionAttributes;
  }
}

/** `__Host-` binds the cookie to this exact host, path / and HTTPS (browsers enforce it). */
export function sessionCookieName(): string {
  return cookiesMustBeSecure() ? '__Host-plateau_session' : 'plateau_session';
}

/**
 * The cookie holds the session token; the database holds only its SHA-256 (the session id),
 * so a read of the sessions table does not hand out live sessions.
 */
export const sessionIdFor = (token: string) => hashToken(token);

/** Host-only (no Domain), HttpOnly, SameSite=Lax, path /; Secure when PUBLIC_URL is https. */
export function setSessionCookie(cookies: AstroCookies, token: string): void {
  cookies.set(sessionCookieName(), token, { path: '/', httpOnly: true, sameSite: 'lax', secure: cookiesMustBeSecure(), maxAge: SESSION_ABSOLUTE_MS / 1000 });
}

export function clearSessionCookie(cookies: AstroCookies): void {
  cookies.set(sessionCookieName(), '', { path: '/', httpOnly: true, sameSite: 'lax', secure: cookiesMustBeSecure(), maxAge: 0 });
}

/** The session token sent by the browser, if any (bounded: a token is 43 characters). */
export function sessionTokenFrom(cookies: AstroCookies): string | null {
  const value = cookies.get(sessionCookieName())?.value ?? null;
  return value && /^[A-Za-z0-9_-]{20,100}$/.test(value) ? value : null;
}

/** A new session: a fresh 256-bit token for the cookie, stored as its hash. */
export async function createSession(userId: number, workspaceId: number | null, userAgent: string | null) {
  const token = newToken();
  const session = await lucia().createSession(userId, { workspaceId, createdAt: new Date(), userAgent: userAgent?.slice(0, 250) ?? null } as never, {
    sessionId: sessionIdFor(token),
  });
  return Object.assign(session, { token });
}
