/**
 * Accounts over HTTP against the real app and MariaDB: passwords, sessions, sign-up,
 * invitations and resets through the real fake SMTP, throttling and the origin check.
 */
import { describe, it, expect, beforeAll } from 'vitest';
import { eq, and, like } from 'drizzle-orm';
import { hash } from '@node-rs/argon2';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { Client, createTestWorkspace, TEST_PASSWORD, BASE } from '../helpers/api';
import { hashToken } from '../../src/server/auth/tokens';
import { linkIn, unique, waitForMail } from '../helpers/mail';

async function clearIpThrottle() {
  await getDb().delete(t.signInThrottle).where(like(t.signInThrottle.key, '%ip:%'));
}
async function sessionRow(c: Client) {
  // The cookie holds the token; the database holds only its SHA-256.
  const id = hashToken(c.cookie.replace('plateau_session=', ''));
  const [row] = await getDb().select().from(t.sessions).where(eq(t.sessions.id, id));
  return row ?? null;
}

beforeAll(clearIpThrottle);

describe('passwords', () => {
  it('stores argon2id at the OWASP floor (m=19456 KiB, t=2, p=1; OWASP Password Storage Cheat Sheet), read back from the stored hash', async () => {
    const email = unique('hash');
    const r = await new Client().post('/api/auth/sign-up', { workspaceName: 'Hash Check Distillery', name: 'Hana', email });
    expect(r.status).toBe(202);
    const mail = await waitForMail(email, 'Confirm');
    const c = new Client();
    expect((await c.post('/api/auth/confirm', { token: linkIn(mail, '/confirm').token, password: 'a long enough password' })).status).toBe(200);
    const [u] = await getDb().select().from(t.users).where(eq(t.users.email, email));
    const m = /^\$argon2id\$v=19\$m=(\d+),t=(\d+),p=(\d+)\$/.exec(u!.passwordHash);
    expect(m, u!.passwordHash.slice(0, 40)).not.toBeNull();
    expect(Number(m![1])).toBeGreaterThanOrEqual(19456);
    expect(Number(m![2])).toBeGreaterThanOrEqual(2);
    expect(Number(m![3])).toBeGreaterThanOrEqual(1);
  });

  it('rejects a wrong password with the same answer as an unknown address', async () => {
    const ws = await createTestWorkspace('Wrong password');
    const wrong = await new Client().post('/api/auth/sign-in', { email: ws.users.staff.email, password: 'not the password' });
    const unknown = await new Client().post('/api/auth/sign-in', { email: unique('nobody'), password: 'not the password' });
    expect(wrong.status).toBe(400);
    expect(unknown.status).toBe(400);
    expect(wrong.json.error.message).toBe(unknown.json.error.message);
    expect(wrong.headers.get('set-cookie') ?? '').not.toContain('plateau_session=');
    await clearIpThrottle();
  });

  it('rehashes a weaker stored hash on the next sign-in', async () => {
    const ws = await createTestWorkspace('Rehash');
    const weak = await hash(TEST_PASSWORD, { algorithm: 2, memoryCost: 4096, timeCost: 1, parallelism: 1 });
    await getDb().update(t.users).set({ passwordHash: weak }).where(eq(t.users.id, ws.users.planner.id));
    await new Client().signIn(ws.users.planner.email);
    const [u] = await getDb().select().from(t.users).where(eq(t.users.id, ws.users.planner.id));
    expect(u!.passwordHash).toMatch(/^\$argon2id\$v=19\$m=19456,t=2,p=1\$/);
  });
});

describe('sessions', () => {
  it('sets a host-only, HttpOnly, SameSite=Lax cookie and a new session on every sign-in', async () => {
    const ws = await createTestWorkspace('Cookie');
    const r = await new Client().post('/api/auth/sign-in', { email: ws.users.staff.email, password: TEST_PASSWORD });
    const cookie = r.headers.getSetCookie().find((c) => c.startsWith('plateau_session='))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/Domain=/i);
    const a = await ws.client('staff');
    const b = await ws.client('staff');
    expect(a.cookie).not.toBe(b.cookie);
  });

  it("the sign-out form redirects to sign-in, clears the cookie and the site's cache", async () => {
    const ws = await createTestWorkspace('Sign out form');
    const c = await ws.client('staff');
    const r = await c.post('/api/auth/sign-out', undefined, { accept: 'text/html' });
    expect(r.status).toBe(303);
    expect(r.headers.get('location')).toBe('/sign-in?signed_out=1');
    expect(r.headers.get('clear-site-data')).toBe('"cache"');
    expect(r.headers.getSetCookie().some((h) => /^plateau_session=;/.test(h) && /Max-Age=0/i.test(h))).toBe(true);
    expect((await c.get('/api/account')).status).toBe(401);
  });

  it('sign-out ends the session on the server, not just in the browser', async () => {
    const ws = await createTestWorkspace('Sign out');
    const c = await ws.client('distiller');
    const stolen = c.cookie;
    expect((await c.get('/api/account')).status).toBe(200);
    const out = await c.post('/api/auth/sign-out');
    expect(out.status).toBe(200);
    expect(out.headers.get('clear-site-data')).toBe('"cache"'); // the browser's cached board goes too
    const replay = new Client();
    replay.cookie = stolen;
    expect((await replay.get('/api/account')).status).toBe(401);
    const id = hashToken(stolen.replace('plateau_session=', ''));
    expect(await getDb().select().from(t.sessions).where(eq(t.sessions.id, id))).toHaveLength(0);
  });

  it('ends a session idle past its expiry', async () => {
    const ws = await createTestWorkspace('Idle');
    const c = await ws.client('staff');
    const row = await sessionRow(c);
    await getDb()
      .update(t.sessions)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(t.sessions.id, row!.id));
    expect((await c.get('/api/account')).status).toBe(401);
  });

  it('ends a busy session after the absolute lifetime of 30 days', async () => {
    const ws = await createTestWorkspace('Absolute');
    const c = await ws.client('staff');
    const row = await sessionRow(c);
    await getDb()
      .update(t.sessions)
      .set({ createdAt: new Date(Date.now() - 31 * 86400_000) })
      .where(eq(t.sessions.id, row!.id));
    expect((await c.get('/api/account')).status).toBe(401);
    expect(await sessionRow(c)).toBeNull();
  });

  it('slides the idle expiry forward when a session in its second half is used', async () => {
    const ws = await createTestWorkspace('Renew');
    const c = await ws.client('staff');
    const row = await sessionRow(c);
    const soon = new Date(Date.now() + 86400_000); // 1 day left of 7: past half-life
    await getDb().update(t.sessions).set({ expiresAt: soon }).where(eq(t.sessions.id, row!.id));
    expect((await c.get('/api/account')).status).toBe(200);
    const after = await sessionRow(c);
    expect(after!.expiresAt.getTime()).toBeGreaterThan(Date.now() + 6.5 * 86400_000);
  });

  it('changing the password signs out the other sessions but keeps this one', async () => {
    const ws = await createTestWorkspace('Change password');
    const here = await ws.client('planner');
    const phone = await ws.client('planner');
    const r = await here.post('/api/account/password', { currentPassword: TEST_PASSWORD, newPassword: 'a brand new passphrase' });
    expect(r.status).toBe(200);
    expect(r.json.endedSessions).toBe(1);
    expect((await here.get('/api/account')).status).toBe(200);
    expect((await phone.get('/api/account')).status).toBe(401);
    expect((await here.post('/api/account/password', { currentPassword: 'wrong one', newPassword: 'whatever long enough' })).status).toBe(400);
  });

  it('lists sessions by handle and signs out one of them', async () => {
    const ws = await createTestWorkspace('Sessions');
    const here = await ws.client('staff');
    const other = await ws.client('staff');
    const list = (await here.get('/api/account')).json.sessions as Array<{ handle: string; current: boolean }>;
    expect(list).toHaveLength(2);
    const target = list.find((s) => !s.current)!;
    expect(JSON.stringify(list)).not.toContain(other.cookie.replace('plateau_session=', ''));
    expect((await here.del(`/api/account/sessions/${target.handle}`)).status).toBe(200);
    expect((await other.get('/api/account')).status).toBe(401);
    expect((await here.post('/api/account/sign-out-everywhere')).json.endedSessions).toBe(0);
  });
});

describe('sign-up', () => {
  it('creates the workspace with its first user as manager once the e-mailed link is followed', async () => {
    const email = unique('founder');
    const r = await new Client().post('/api/auth/sign-up', { workspaceName: 'Fresh Still House', name: 'Fern', email: email.toUpperCase() });
    expect(r.status).toBe(202);
    expect(await getDb().select().from(t.users).where(eq(t.users.email, email))).toHaveLength(0);
    const mail = await waitForMail(email, 'Confirm');
    expect(mail.html).toContain('Fresh Still House');
    const { token } = linkIn(mail, '/confirm');
    const page = await new Client().get(`/confirm/${token}`, { accept: 'text/html' });
    expect(page.status).toBe(200);
    expect(page.text).toContain('Choose a password');
    const c = new Client();
    // The password is chosen here, by whoever holds the e-mailed link; a bare confirmation is refused.
    expect((await c.post('/api/auth/confirm', { token })).status).toBe(400);
    const done = await c.post('/api/auth/confirm', { token, password: 'copper pot still 42' });
    expect(done.status).toBe(200);
    const me = await c.get('/api/account');
    expect(me.json.user.email).toBe(email);
    expect(me.json.memberships).toEqual([expect.objectContaining({ name: 'Fresh Still House', role: 'manager' })]);
    // The new distillery starts with the trade's usual wash types (common practice ranges).
    const types = await c.get('/api/wash-types');
    const byCategory = Object.fromEntries(types.json.washTypes.map((w: any) => [w.category, [w.terminalMin, w.terminalMax]]));
    expect(byCategory.sugar).toEqual([0.99, 1.0]);
    expect(byCategory.grain).toEqual([1.002, 1.008]);
    expect((await new Client().post('/api/auth/confirm', { token, password: 'copper pot still 43' })).status).toBe(410);
    await new Client().signIn(email, 'copper pot still 42');
  });

  it('answers the same for an address that has an account, and mails that person a note instead', async () => {
    const ws = await createTestWorkspace('Existing');
    const body = { workspaceName: 'Second House', name: 'Sam' };
    const known = await new Client().post('/api/auth/sign-up', { ...body, email: ws.users.staff.email });
    const fresh = await new Client().post('/api/auth/sign-up', { ...body, email: unique('fresh') });
    expect(known.status).toBe(fresh.status);
    expect(Object.keys(known.json)).toEqual(Object.keys(fresh.json));
    const note = await waitForMail(ws.users.staff.email, 'already have');
    expect(note.text).not.toMatch(/\/confirm\//);
  });
});

describe('invitations through the fake SMTP', () => {
  it('a new person follows the e-mailed link, sets name and password, and lands as the invited role', async () => {
    const ws = await createTestWorkspace('Invite new');
    const mgr = await ws.client('manager');
    const email = unique('newhand');
    const r = await mgr.post('/api/members/invitations', { email, role: 'distiller' });
    expect(r.status).toBe(201);
    const mail = await waitForMail(email, 'Join');
    expect(mail.messageId).toMatch(/^<outbox-[0-9a-f-]+@plateau\.local>$/);
    const { token, url } = linkIn(mail, '/invite');
    expect(url.startsWith(BASE())).toBe(true);
    const page = await new Client().get(`/invite/${token}`, { accept: 'text/html' });
    expect(page.status).toBe(200);
    expect(page.text).toContain('Choose a password');
    const c = new Client();
    const acc = await c.post('/api/auth/accept-invitation', { token, name: 'New Hand', password: 'feints and tails 7' });
    expect(acc.status).toBe(200);
    const me = await c.get('/api/account');
    expect(me.json.memberships).toEqual([expect.objectContaining({ workspaceId: ws.workspaceId, role: 'distiller' })]);
    // Single use.
    expect((await new Client().post('/api/auth/accept-invitation', { token, name: 'Again', password: 'feints and tails 7' })).status).toBe(410);
    const [row] = await getDb()
      .select()
      .from(t.auditLog)
      .where(and(eq(t.auditLog.workspaceId, ws.workspaceId), eq(t.auditLog.action, 'member.invitation_accepted')));
    expect(row).toBeTruthy();
  });

  it('an existing user must sign in as the invited address, then joins', async () => {
    const home = await createTestWorkspace('Home');
    const other = await createTestWorkspace('Other');
    const mgr = await other.client('manager');
    const email = home.users.planner.email;
    expect((await mgr.post('/api/members/invitations', { email, role: 'staff' })).status).toBe(201);
    const { token } = linkIn(await waitForMail(email, 'Join'), '/invite');
    expect((await new Client().post('/api/auth/accept-invitation', { token })).status).toBe(401);
    const wrongPerson = await home.client('staff');
    expect((await wrongPerson.post('/api/auth/accept-invitation', { token })).status).toBe(403);
    const c = await home.client('planner');
    expect((await c.post('/api/auth/accept-invitation', { token })).status).toBe(200);
    const me = await c.get('/api/account');
    expect(me.json.memberships).toEqual(
      expect.arrayContaining([
        expect.objectContaining({ workspaceId: other.workspaceId, role: 'staff' }),
        expect.objectContaining({ workspaceId: home.workspaceId, role: 'planner' }),
      ]),
    );
    // The session now looks at the distillery just joined, as staff.
    expect((await c.get('/api/members')).status).toBe(403);
    expect((await c.get('/api/workspace')).json.workspace.id).toBe(other.workspaceId);
    // And the switcher moves it back.
    expect((await c.post('/api/auth/switch-workspace', { workspaceId: home.workspaceId })).status).toBe(200);
    expect((await c.get('/api/workspace')).json.workspace.id).toBe(home.workspaceId);
  });

  it('invitation links expire after their time', async () => {
    const ws = await createTestWorkspace('Invite expiry');
    const mgr = await ws.client('manager');
    const email = unique('late');
    const { invitationId } = (await mgr.post('/api/members/invitations', { email, role: 'staff' })).json;
    const { token } = linkIn(await waitForMail(email, 'Join'), '/invite');
    const [inv] = await getDb().select().from(t.invitations).where(eq(t.invitations.id, invitationId));
    expect(inv!.expiresAt.getTime() - inv!.createdAt.getTime()).toBeGreaterThan(6.9 * 86400_000);
    await getDb()
      .update(t.invitations)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(t.invitations.id, invitationId));
    expect((await new Client().post('/api/auth/accept-invitation', { token, name: 'Late', password: 'late but long enough' })).status).toBe(410);
    // Only the hash is stored.
    expect(JSON.stringify(inv)).not.toContain(token);
  });
});

describe('password reset', () => {
  it('resets once through the e-mailed link and ends every session', async () => {
    const ws = await createTestWorkspace('Reset');
    const email = ws.users.distiller.email;
    const oldSession = await ws.client('distiller');
    const r = await new Client().post('/api/auth/forgot-password', { email: email.toUpperCase() });
    const unknown = await new Client().post('/api/auth/forgot-password', { email: unique('ghost') });
    expect(r.status).toBe(202);
    expect(unknown.status).toBe(202);
    expect(unknown.json).toEqual(r.json);
    const { token } = linkIn(await waitForMail(email, 'new Plateau password'), '/reset-password');
    expect((await new Client().get(`/reset-password/${token}`, { accept: 'text/html' })).status).toBe(200);
    expect((await new Client().post('/api/auth/reset-password', { token, password: 'the still is cold now' })).status).toBe(200);
    expect((await oldSession.get('/api/account')).status).toBe(401);
    expect((await new Client().post('/api/auth/sign-in', { email, password: TEST_PASSWORD })).status).toBe(400);
    await new Client().signIn(email, 'the still is cold now');
    expect((await new Client().post('/api/auth/reset-password', { token, password: 'second use of link' })).status).toBe(410);
    const [audit] = await getDb()
      .select()
      .from(t.auditLog)
      .where(and(eq(t.auditLog.userId, ws.users.distiller.id), eq(t.auditLog.action, 'auth.password_reset')));
    expect(audit).toBeTruthy();
    await clearIpThrottle();
  });

  it('reset links last 30 minutes', async () => {
    const ws = await createTestWorkspace('Reset expiry');
    const email = ws.users.staff.email;
    await new Client().post('/api/auth/forgot-password', { email });
    const { token } = linkIn(await waitForMail(email, 'new Plateau password'), '/reset-password');
    const [row] = await getDb()
      .select()
      .from(t.emailTokens)
      .where(and(eq(t.emailTokens.userId, ws.users.staff.id), eq(t.emailTokens.purpose, 'password_reset')));
    expect(row!.expiresAt.getTime() - row!.createdAt.getTime()).toBeGreaterThan(29 * 60_000);
    expect(row!.expiresAt.getTime() - row!.createdAt.getTime()).toBeLessThanOrEqual(31 * 60_000);
    await getDb()
      .update(t.emailTokens)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(t.emailTokens.id, row!.id));
    expect((await new Client().post('/api/auth/reset-password', { token, password: 'too late for this' })).status).toBe(410);
    expect((await new Client().get(`/reset-password/${token}`, { accept: 'text/html' })).status).toBe(410);
  });
});

describe('throttling and CSRF', () => {
  it('answers 429 with Retry-After after repeated failures, and recovers', async () => {
    const ws = await createTestWorkspace('Throttle');
    const email = ws.users.staff.email;
    try {
      const statuses: number[] = [];
      let last = null as Awaited<ReturnType<Client['post']>> | null;
      for (let i = 0; i < 8; i++) {
        last = await new Client().post('/api/auth/sign-in', { email, password: `wrong ${i}` });
        statuses.push(last.status);
      }
      expect(statuses.slice(0, 5)).toEqual([400, 400, 400, 400, 400]);
      expect(last!.status).toBe(429);
      expect(Number(last!.headers.get('retry-after'))).toBeGreaterThan(0);
      // Even the right password waits while blocked.
      expect((await new Client().post('/api/auth/sign-in', { email, password: TEST_PASSWORD })).status).toBe(429);
      // Time passes (the block and the counting window are moved into the past): the owner gets in.
      const past = new Date(Date.now() - 16 * 60_000);
      await getDb()
        .update(t.signInThrottle)
        .set({ blockedUntil: new Date(Date.now() - 1000), windowStartedAt: past })
        .where(like(t.signInThrottle.key, '%'));
      expect((await new Client().post('/api/auth/sign-in', { email, password: TEST_PASSWORD })).status).toBe(200);
    } finally {
      await clearIpThrottle();
    }
  });

  it('refuses state-changing requests without our Origin', async () => {
    const ws = await createTestWorkspace('CSRF');
    const c = await ws.client('staff');
    const send = (headers: Record<string, string>) =>
      fetch(BASE() + '/api/account', {
        method: 'PATCH',
        headers: { cookie: c.cookie, 'content-type': 'application/json', ...headers },
        body: JSON.stringify({ name: 'Changed' }),
      });
    expect((await send({})).status).toBe(403);
    expect((await send({ origin: 'https://evil.example' })).status).toBe(403);
    expect((await send({ origin: BASE() })).status).toBe(200);
  });
});
