/**
 * Attacks over HTTP, each refused. One block per threat listed in docs/RELIABILITY.md
 * ("Security"): the mailbox, fail-closed defaults, sign-up pre-hijacking, the open redirect,
 * the client address and throttles, unbounded bodies, sessions and cookies.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { request as httpRequest } from 'node:http';
import { execFileSync } from 'node:child_process';
import { eq, like } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { hashToken } from '../../src/server/auth/tokens';
import { createSession } from '../../src/server/auth/session';
import { Client, createTestWorkspace, TEST_PASSWORD, BASE } from '../helpers/api';
import { spawnApp, type SpawnedApp } from '../helpers/spawn-app';
import { linkIn, unique, waitForMail } from '../helpers/mail';

/** The throttle counts per client address; these tests all come from 127.0.0.1. */
async function clearThrottle() {
  await getDb().delete(t.signInThrottle).where(like(t.signInThrottle.key, '%'));
}

beforeAll(clearThrottle);
afterAll(clearThrottle);

describe('1. the mailbox page leaks no account-opening link', () => {
  it("a manager who invites another distillery's owner and asks for their reset never sees the link", async () => {
    const attacker = await createTestWorkspace('Mailbox attacker');
    const victim = await createTestWorkspace('Mailbox victim');
    const mgr = await attacker.client('manager');
    const victimEmail = victim.users.manager.email;
    // Invite the other distillery's owner, then ask for a reset of that address.
    expect((await mgr.post('/api/members/invitations', { email: victimEmail, role: 'staff' })).status).toBe(201);
    expect((await new Client().post('/api/auth/forgot-password', { email: victimEmail })).status).toBe(202);
    // The victim's own distillery invites someone who is also the attacker's member.
    const victimMgr = await victim.client('manager');
    expect((await victimMgr.post('/api/members/invitations', { email: attacker.users.planner.email, role: 'planner' })).status).toBe(201);
    const reset = linkIn(await waitForMail(victimEmail, 'new Plateau password'), '/reset-password');
    const invite = linkIn(await waitForMail(victimEmail, 'Join'), '/invite');
    const otherInviteMail = await waitForMail(attacker.users.planner.email, 'Join');
    const otherInvite = linkIn(otherInviteMail, '/invite');

    const page = await mgr.get('/settings/mailbox', { accept: 'text/html' });
    expect(page.status).toBe(200);
    for (const token of [reset.token, invite.token, otherInvite.token]) expect(page.text).not.toContain(token);
    expect(page.text).not.toMatch(/\/(reset-password|confirm|invite)\/[A-Za-z0-9_-]{20,}/);
    // Its own invitation is listed, with the link removed; the reset and the other distillery's mail are not listed.
    expect(page.text).toContain('link removed');
    expect(page.text).not.toContain('new Plateau password');
    expect(page.text).not.toContain(otherInviteMail.subject);
    // And the reset link still works for its owner.
    expect((await new Client().post('/api/auth/reset-password', { token: reset.token, password: 'only the owner knows' })).status).toBe(200);
  });
});

describe('2. defaults fail closed', () => {
  let prod: SpawnedApp;
  beforeAll(async () => {
    // The demo distillery is in this database (the foundation test loads it when run first; make sure).
    const { loadDemo } = await import('../../seed/load');
    await loadDemo({ quiet: true, tokenFile: null });
    prod = await spawnApp({ PLATEAU_MODE: undefined });
  }, 60_000);
  afterAll(async () => {
    await prod?.stop();
  });

  it('with PLATEAU_MODE unset the app is production: no demo sign-ins printed, no mailbox page', async () => {
    const page = await new Client(prod.url).get('/sign-in', { accept: 'text/html' });
    expect(page.status).toBe(200);
    expect(page.text).not.toContain('plateau-demo');
    const ws = await createTestWorkspace('Prod mailbox');
    const mgr = await new Client(prod.url).signIn(ws.users.manager.email);
    expect((await mgr.get('/settings/mailbox', { accept: 'text/html' })).status).toBe(404);
    expect((await mgr.get('/settings', { accept: 'text/html' })).text).not.toContain('/settings/mailbox');
  });

  it('a production start on a database holding the demo refuses its sign-ins and sessions, and says why', async () => {
    const demo = await new Client(prod.url).post('/api/auth/sign-in', { email: 'mara@quillanridge.example', password: 'plateau-demo' });
    expect(demo.status).toBe(400);
    const [mara] = await getDb().select().from(t.users).where(eq(t.users.email, 'mara@quillanridge.example'));
    const s = await createSession(mara!.id, null, 'test');
    const c = new Client(prod.url);
    c.cookie = `plateau_session=${s.token}`;
    expect((await c.get('/api/account')).status).toBe(401);
    expect(prod.log()).toMatch(/SECURITY: this production database holds the demo distillery/);
    // The same database in test mode (the shared test server) still lets the demo in.
    await clearThrottle();
    expect((await new Client().post('/api/auth/sign-in', { email: 'mara@quillanridge.example', password: 'plateau-demo' })).status).toBe(200);
  });

  it('the seed refuses to load the demo outside demo and development mode', () => {
    const env = { ...process.env, DB_NAME: 'plateau_never_created' };
    delete (env as Record<string, string | undefined>).PLATEAU_MODE;
    const out = execFileSync(process.execPath, ['--import', 'tsx', 'seed/load.ts'], { env, encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'] });
    expect(out).toBe('');
    let err = '';
    try {
      execFileSync(process.execPath, ['--import', 'tsx', 'seed/load.ts'], {
        env: { ...env, PLATEAU_MODE: 'test' },
        encoding: 'utf8',
        stdio: ['ignore', 'pipe', 'pipe'],
      });
    } catch (e) {
      err = String((e as { stderr?: string }).stderr);
    }
    expect(err).toContain('Not loading the demo distillery in test mode');
  });
});

describe('3. sign-up cannot hand an account to a stranger', () => {
  it('the password is chosen after the address is proven; a bare confirmation creates nothing', async () => {
    const email = unique('owner');
    // A stranger signs up with someone else's address and tries to set the password.
    const withPassword = await new Client().post('/api/auth/sign-up', {
      workspaceName: 'Hijack Still',
      name: 'Stranger',
      email,
      password: 'stranger knows this',
    });
    expect(withPassword.status).toBe(400);
    expect(withPassword.json.error.fields).toHaveProperty('password');
    expect((await new Client().post('/api/auth/sign-up', { workspaceName: 'Hijack Still', name: 'Stranger', email })).status).toBe(202);
    const { token } = linkIn(await waitForMail(email, 'Confirm'), '/confirm');
    // The owner clicking "confirm" without choosing a password creates nothing.
    const bare = await new Client().post('/api/auth/confirm', { token });
    expect(bare.status).toBe(400);
    expect(bare.json.error.fields).toHaveProperty('password');
    expect(await getDb().select().from(t.users).where(eq(t.users.email, email))).toHaveLength(0);
    // The owner chooses the password on the confirmation page; only that password opens the account.
    const owner = new Client();
    expect((await owner.post('/api/auth/confirm', { token, name: 'Rightful Owner', password: 'owner chose this one' })).status).toBe(200);
    expect((await new Client().post('/api/auth/sign-in', { email, password: 'stranger knows this' })).status).toBe(400);
    await new Client().signIn(email, 'owner chose this one');
    expect((await owner.get('/api/account')).json.user.name).toBe('Rightful Owner');
    await clearThrottle();
  });
});

describe('4. no open redirect after sign-in', () => {
  let email: string;
  beforeAll(async () => {
    email = (await createTestWorkspace('Redirect')).users.staff.email;
  });
  const formSignIn = (next: string) =>
    fetch(`${BASE()}/api/auth/sign-in`, {
      method: 'POST',
      redirect: 'manual',
      headers: { origin: BASE(), 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ email, password: TEST_PASSWORD, next }).toString(),
    });

  it.each([
    ['/\\evil.example'],
    ['/\tevil.example'],
    ['/%5Cevil.example'],
    ['/%5cevil.example'],
    ['//evil.example'],
    ['/\\/evil.example'],
    ['https://evil.example/'],
    ['http:evil.example'],
    ['/%09/evil.example'],
    ['/api/account'],
    ['javascript:alert(1)'],
    ['/\n/evil.example'],
  ])('next=%j is sent to the board', async (next) => {
    const r = await formSignIn(next);
    expect(r.status).toBe(303);
    expect(r.headers.get('location')).toBe('/');
  });

  it.each([['/ferments?state=active'], ['/runs/12'], ['/board/day'], ['/settings/members']])('next=%j, one of our pages, is kept', async (next) => {
    const r = await formSignIn(next);
    expect(r.headers.get('location')).toBe(next);
  });
});

describe('5. the client address cannot be forged, and guesses are counted before they are checked', () => {
  it('rotating X-Forwarded-For does not escape the per-address sign-in throttle', async () => {
    await clearThrottle();
    const statuses: number[] = [];
    for (let i = 0; i < 14; i++) {
      // A different e-mail each time, so only the address key can stop it.
      const r = await new Client().post('/api/auth/sign-in', { email: unique(`guess${i}`), password: 'wrong' }, { 'x-forwarded-for': `203.0.113.${i + 1}` });
      statuses.push(r.status);
    }
    expect(statuses).toContain(429);
    await clearThrottle();
  });

  it('30 parallel guesses at one account cannot all slip under the limit', async () => {
    await clearThrottle();
    const ws = await createTestWorkspace('Parallel guesses');
    const results = await Promise.all(
      Array.from({ length: 30 }, (_, i) => new Client().post('/api/auth/sign-in', { email: ws.users.staff.email, password: `wrong ${i}` })),
    );
    const checked = results.filter((r) => r.status === 400).length;
    expect(results.filter((r) => r.status === 429).length).toBeGreaterThan(0);
    expect(checked).toBeLessThanOrEqual(10);
    await clearThrottle();
  });

  it('forgot-password is throttled per address and answers alike for known and unknown addresses', async () => {
    await clearThrottle();
    const ws = await createTestWorkspace('Forgot throttle');
    const known = await new Client().post('/api/auth/forgot-password', { email: ws.users.staff.email });
    const unknown = await new Client().post('/api/auth/forgot-password', { email: unique('nobody') });
    expect(known.status).toBe(202);
    expect(unknown.json).toEqual(known.json);
    const statuses: number[] = [];
    for (let i = 0; i < 25; i++) statuses.push((await new Client().post('/api/auth/forgot-password', { email: unique(`flood${i}`) })).status);
    expect(statuses).toContain(429);
    await clearThrottle();
  });

  it('sign-up is throttled per address', async () => {
    await clearThrottle();
    const statuses: number[] = [];
    for (let i = 0; i < 25; i++)
      statuses.push((await new Client().post('/api/auth/sign-up', { workspaceName: 'Flood Still', name: 'Flood', email: unique(`signup${i}`) })).status);
    expect(statuses.slice(0, 3)).toEqual([202, 202, 202]);
    expect(statuses).toContain(429);
    await clearThrottle();
  });
});

/** Stream `total` bytes to `path` in chunks without a Content-Length; resolve with the status. */
function streamBody(path: string, contentType: string, total: number): Promise<{ status: number; ms: number }> {
  const started = Date.now();
  return new Promise((resolve, reject) => {
    const u = new URL(BASE() + path);
    const req = httpRequest(
      {
        host: u.hostname,
        port: u.port,
        path: u.pathname,
        method: 'POST',
        headers: { origin: BASE(), 'content-type': contentType, 'transfer-encoding': 'chunked' },
      },
      (res) => {
        res.resume();
        resolve({ status: res.statusCode ?? 0, ms: Date.now() - started });
        req.destroy();
      },
    );
    req.on('error', (err) => {
      if (!req.destroyed) reject(err);
    });
    const chunk = Buffer.alloc(64 * 1024, 'a');
    let sent = 0;
    const pump = () => {
      while (sent < total) {
        sent += chunk.length;
        if (!req.write(chunk)) {
          req.once('drain', pump);
          return;
        }
      }
      req.end();
    };
    pump();
  });
}

describe('6. unbounded request bodies', () => {
  it('a 60 MB chunked form body to the public sign-in route is refused with 413', async () => {
    const r = await streamBody('/api/auth/sign-in', 'application/x-www-form-urlencoded', 60 * 1024 * 1024);
    expect(r.status).toBe(413);
  });

  it.each([
    ['/api/auth/sign-up', 'application/json'],
    ['/api/auth/forgot-password', 'application/x-www-form-urlencoded'],
    ['/api/auth/confirm', 'multipart/form-data; boundary=x'],
  ])('%s (%s) past the cap without a Content-Length: 413', async (path, type) => {
    const r = await streamBody(path, type, 2 * 1024 * 1024);
    expect(r.status).toBe(413);
  });

  it('a signed-in JSON route past the cap with a Content-Length: 413', async () => {
    const ws = await createTestWorkspace('Big body');
    const c = await ws.client('manager');
    const r = await c.request('PATCH', '/api/account', { name: 'x'.repeat(400 * 1024) });
    expect(r.status).toBe(413);
    expect(r.json.error.code).toBe('too_large');
  });
});

describe('7. sessions and cookies', () => {
  it('stores only the hash of the session token', async () => {
    const ws = await createTestWorkspace('Hashed sessions');
    const c = await ws.client('staff');
    const token = c.cookie.replace('plateau_session=', '');
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/);
    expect(await getDb().select().from(t.sessions).where(eq(t.sessions.id, token))).toHaveLength(0);
    expect(
      await getDb()
        .select()
        .from(t.sessions)
        .where(eq(t.sessions.id, hashToken(token))),
    ).toHaveLength(1);
    // A database read does not hand out a live session: the stored id is not a usable cookie.
    const stolen = new Client();
    stolen.cookie = `plateau_session=${hashToken(token)}`;
    expect((await stolen.get('/api/account')).status).toBe(401);
  });

  it('every response carries the security headers, redirects and errors too', async () => {
    for (const [path, status] of [
      ['/', 303],
      ['/reports', 303],
      ['/api/account', 401],
      ['/api/no-such-route', 404],
      ['/sign-in', 200],
      ['/404', 404],
    ] as const) {
      const r = await fetch(BASE() + path, { redirect: 'manual' });
      expect(r.status, path).toBe(status);
      expect(r.headers.get('x-content-type-options'), path).toBe('nosniff');
      expect(r.headers.get('x-frame-options'), path).toBe('DENY');
      expect(r.headers.get('content-security-policy'), path).toBeTruthy();
      expect(r.headers.get('referrer-policy'), path).toBeTruthy();
    }
  });

  describe('served at an https PUBLIC_URL', () => {
    let app: SpawnedApp;
    let origin: string;
    beforeAll(async () => {
      const port = await (await import('../helpers/spawn-app')).freePort();
      origin = `https://127.0.0.1:${port}`;
      app = await spawnApp({ PUBLIC_URL: origin, PLATEAU_MODE: 'test' }, { port });
    }, 60_000);
    afterAll(async () => {
      await app?.stop();
    });

    it('sets a Secure __Host- cookie and HSTS, decided from PUBLIC_URL, never from X-Forwarded-Proto', async () => {
      const ws = await createTestWorkspace('Https cookie');
      const r = await fetch(`${app.url}/api/auth/sign-in`, {
        method: 'POST',
        headers: { origin, 'content-type': 'application/json', accept: 'application/json' },
        body: JSON.stringify({ email: ws.users.staff.email, password: TEST_PASSWORD }),
      });
      expect(r.status).toBe(200);
      const cookie = r.headers.getSetCookie().find((c) => c.startsWith('__Host-plateau_session='));
      expect(cookie).toBeTruthy();
      expect(cookie).toMatch(/;\s*Secure/i);
      expect(cookie).toMatch(/;\s*Path=\//i);
      expect(cookie).not.toMatch(/Domain=/i);
      expect(r.headers.get('strict-transport-security')).toMatch(/max-age=\d+/);
      // The plain http test server never sends HSTS, whatever a client claims.
      const plain = await fetch(`${BASE()}/sign-in`, { headers: { 'x-forwarded-proto': 'https' } });
      expect(plain.headers.get('strict-transport-security')).toBeNull();
      expect((await fetch(`${app.url}/`, { redirect: 'manual' })).headers.get('strict-transport-security')).toMatch(/max-age/);
    });
  });
});
