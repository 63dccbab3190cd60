import { Lucia, TimeSpan } from 'lucia';
import { DrizzleMySQLAdapter } from '@lucia-auth/adapter-drizzle';
import type { AstroCookies } from 'astro';
import { getDb } from '../../db/client';
import { sessions, users } from '../../db/schema';

/** Idle expiry: a session unused for this long ends (lucia slides it on use). */
export const SESSION_IDLE = new TimeSpan(7, 'd');
/** Absolute expiry: no session lives longer than this, however busy. */
export const SESSION_ABSOLUTE_MS = 30 * 24 * 3600 * 1000;

let instance: Lucia<Record<never, never>, DatabaseUserAttributes> | null = null;

interface DatabaseUserAttributes { email: string; name: string; disabledAt: Date | null; emailVerifiedAt: Date | null }
interface DatabaseSessionAttributes { workspaceId: number | null; createdAt: Date; userAgent: string | null }

export function lucia() {
  instance ??= new Lucia(new DrizzleMySQLAdapter(getDb(), sessions, users), {
    sessionExpiresIn: SESSION_IDLE,
    sessionCookie: { name: 'plateau_session', expires: false, attributes: { sameSite: 'lax', secure: false } },
    getUserAttributes: (a) => ({ email: a.email, name: a.name, disabledAt: a.disabledAt, emailVerifiedAt: a.emailVerifiedAt }),
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

/** Host-only, HttpOnly, SameSite=Lax; Secure whenever the request came over HTTPS. */
export function setSessionCookie(cookies: AstroCookies, sessionId: string, secure: boolean): void {
  cookies.set('plateau_session', sessionId, { path: '/', httpOnly: true, sameSite: 'lax', secure, maxAge: SESSION_ABSOLUTE_MS / 1000 });
}

export function clearSessionCookie(cookies: AstroCookies, secure: boolean): void {
  cookies.set('plateau_session', '', { path: '/', httpOnly: true, sameSite: 'lax', secure, maxAge: 0 });
}

export async function createSession(userId: number, workspaceId: number | null, userAgent: string | null) {
  return lucia().createSession(userId, { workspaceId, createdAt: new Date(), userAgent: userAgent?.slice(0, 250) ?? null } as never);
}
