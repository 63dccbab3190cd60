import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import { createServer, type AddressInfo } from 'node:net';
import http from 'node:http';
import { randomBytes } from 'node:crypto';
import { inArray, sql } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import { signInThrottle } from '../../src/db/schema';
import { storedThrottleKey } from '../../src/server/throttle';

// Our server (scripts/serve.ts) started twice on spare ports over the built app: once trusting no
// proxy, once trusting 127.0.0.1 as a proxy. A failed sign-in writes the client address into
// audit_log, which shows whose address the app believed.

interface Served {
  child: ChildProcess;
  url: string;
  log: string[];
}
const servers: Served[] = [];

async function sparePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = createServer();
    probe.once('error', reject);
    probe.listen(0, '127.0.0.1', () => {
      const { port } = probe.address() as AddressInfo;
      probe.close(() => resolve(port));
    });
  });
}

function serveEnv(port: number, trustProxy: string | undefined): NodeJS.ProcessEnv {
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    HOST: '127.0.0.1',
    PORT: String(port),
    PUBLIC_URL: `http://127.0.0.1:${port}`,
    PLATEAU_MODE: 'test',
    PLATEAU_INSTANCE: `client-address-${port}`,
    DB_NAME: process.env.DB_NAME ?? 'plateau_test',
    OUTBOX_DISABLED: '1',
  };
  if (trustProxy === undefined) delete env.TRUST_PROXY;
  else env.TRUST_PROXY = trustProxy;
  return env;
}

function startServe(port: number, trustProxy: string | undefined): Served {
  const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/serve.ts'], { env: serveEnv(port, trustProxy), stdio: ['ignore', 'pipe', 'pipe'] });
  const log: string[] = [];
  child.stdout!.on('data', (d) => log.push(String(d)));
  child.stderr!.on('data', (d) => log.push(String(d)));
  const served = { child, url: `http://127.0.0.1:${port}`, log };
  servers.push(served);
  return served;
}

async function healthy(s: Served): Promise<void> {
  for (let i = 0; i < 150; i++) {
    if (s.child.exitCode !== null) throw new Error(`serve.ts exited (${s.child.exitCode}): ${s.log.join('')}`);
    try {
      if ((await fetch(`${s.url}/api/health`)).ok) return;
    } catch {
      /* not listening yet */
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`serve.ts did not answer on ${s.url}: ${s.log.join('')}`);
}

function exited(child: ChildProcess): Promise<number | null> {
  if (child.exitCode !== null) return Promise.resolve(child.exitCode);
  return new Promise((resolve) => child.once('exit', (code) => resolve(code)));
}

/** A random loopback address other than 127.0.0.1: Linux routes all of 127.0.0.0/8 to lo, so a test can connect "from" it. */
function loopbackPeer(): string {
  const [a, b, c] = randomBytes(3);
  return `127.${a}.${b}.${Math.max(2, c!)}`;
}

/** A fresh client address per case (RFC 2544's 198.18.0.0/15), so failures of earlier runs never throttle this one. */
function clientPeer(): string {
  const [a, b] = randomBytes(2);
  return `198.${18 + (a! & 1)}.${b}.${1 + (a! >> 1)}`;
}

function post(base: string, path: string, headers: Record<string, string>, body: string, localAddress = '127.0.0.1'): Promise<number> {
  return new Promise((resolve, reject) => {
    const req = http.request(
      base + path,
      { method: 'POST', localAddress, headers: { 'content-length': String(Buffer.byteLength(body)), ...headers } },
      (res) => {
        res.resume();
        resolve(res.statusCode ?? 0);
      },
    );
    req.on('error', reject);
    req.end(body);
  });
}

/**
 * A failed sign-in for a fresh e-mail, sent from `peer` (the socket's address); returns the
 * address audit_log recorded for it. Fresh peers keep one run's failures from throttling the next.
 */
async function recordedAddress(s: Served, headers: Record<string, string>, peer: string): Promise<string | null> {
  const email = `nobody-${randomBytes(6).toString('hex')}@client-address.example`;
  const status = await post(
    s.url,
    '/api/auth/sign-in',
    { origin: s.url, accept: 'application/json', 'content-type': 'application/json', ...headers },
    JSON.stringify({ email, password: 'not the password at all' }),
    peer,
  );
  expect(status).toBe(400);
  const [rows] = await getDb().execute(sql`SELECT ip FROM audit_log
    WHERE action = 'auth.sign_in_failed' AND JSON_VALUE(details, '$.email') = ${email} ORDER BY id DESC LIMIT 1`);
  return (rows as unknown as { ip: string | null }[])[0]?.ip ?? null;
}

let untrusted: Served;
let trusting: Served;
/** A second trusted proxy address, fresh per run, for the cases where the proxy itself is the answer. */
const proxyPeer = loopbackPeer();

beforeAll(async () => {
  untrusted = startServe(await sparePort(), undefined);
  trusting = startServe(await sparePort(), `127.0.0.1,${proxyPeer}`);
  await Promise.all([healthy(untrusted), healthy(trusting)]);
});

afterAll(async () => {
  for (const s of servers)
    if (s.child.exitCode === null) {
      s.child.kill('SIGKILL');
      await exited(s.child);
    }
});

describe('without TRUST_PROXY, the peer is the client', () => {
  it('a forged X-Forwarded-For from 127.0.0.1: audit_log records 127.0.0.1', async () => {
    // Earlier files fail sign-ins from 127.0.0.1 too; start this address from a clean slate.
    await getDb()
      .delete(signInThrottle)
      .where(inArray(signInThrottle.key, ['ip:127.0.0.1', storedThrottleKey('sign_in', 'ip:127.0.0.1')]));
    expect(await recordedAddress(untrusted, { 'x-forwarded-for': '203.0.113.7' }, '127.0.0.1')).toBe('127.0.0.1');
  });

  it.each([
    ['no header', {}],
    ['a forged X-Forwarded-For', { 'x-forwarded-for': '203.0.113.7' }],
    ['a rotated chain', { 'x-forwarded-for': '192.0.2.1, 198.51.100.2' }],
    ['X-Real-IP and Forwarded', { 'x-real-ip': '203.0.113.8', forwarded: 'for=203.0.113.9' }],
  ])('%s: audit_log records the socket address', async (_case, headers) => {
    const peer = loopbackPeer();
    expect(await recordedAddress(untrusted, headers, peer)).toBe(peer);
  });

  it('X-Forwarded-Host does not make a foreign origin acceptable', async () => {
    const status = await post(
      untrusted.url,
      '/api/auth/sign-in',
      { origin: 'https://evil.example', 'x-forwarded-host': 'evil.example', 'x-forwarded-proto': 'https', 'content-type': 'application/json' },
      JSON.stringify({ email: 'a@b.example', password: 'whatever-password' }),
      loopbackPeer(),
    );
    expect(status).toBe(403);
  });
});

describe('with TRUST_PROXY=127.0.0.1 (and a second proxy), the right-most address that is not a trusted proxy is the client', () => {
  it.each([
    ['one hop', (c: string) => c],
    ['a client-written prefix is ignored', (c: string) => `192.0.2.1, ${c}`],
    ['a trusted hop on the right is skipped', (c: string) => `192.0.2.1, ${c}, ${proxyPeer}`],
  ])('from 127.0.0.1, %s', async (_case, chain) => {
    const client = clientPeer();
    expect(await recordedAddress(trusting, { 'x-forwarded-for': chain(client) }, '127.0.0.1')).toBe(client);
  });

  it('an IPv6 client is recorded in canonical form', async () => {
    const group = (randomBytes(2).readUInt16BE(0) | 0x1000).toString(16);
    expect(await recordedAddress(trusting, { 'x-forwarded-for': `2001:DB8:0:0:0:0:0:${group.toUpperCase()}` }, '127.0.0.1')).toBe(`2001:db8::${group}`);
  });

  it('no header: the proxy itself', async () => {
    expect(await recordedAddress(trusting, {}, proxyPeer)).toBe(proxyPeer);
  });

  it('a malformed hop: fails closed to the proxy', async () => {
    expect(await recordedAddress(trusting, { 'x-forwarded-for': '203.0.113.7, not-an-ip' }, proxyPeer)).toBe(proxyPeer);
  });

  it('a peer that is not listed is the client, whatever it forwards', async () => {
    const peer = loopbackPeer();
    expect(await recordedAddress(trusting, { 'x-forwarded-for': '203.0.113.7' }, peer)).toBe(peer);
  });

  it('X-Forwarded-Host from a trusted proxy still decides nothing in the origin check', async () => {
    const status = await post(
      trusting.url,
      '/api/auth/sign-in',
      { origin: 'https://evil.example', 'x-forwarded-host': 'evil.example', 'x-forwarded-proto': 'https', 'content-type': 'application/json' },
      JSON.stringify({ email: 'a@b.example', password: 'whatever-password' }),
    );
    expect(status).toBe(403);
  });
});

describe('the server around the app', () => {
  it('serves built assets with the long cache and everything else through the app', async () => {
    const page = await fetch(`${untrusted.url}/sign-in`);
    expect(page.status).toBe(200);
    const asset = /\/_astro\/[^"'\s)]+\.(?:css|js)/.exec(await page.text())?.[0];
    expect(asset).toBeTruthy();
    const res = await fetch(untrusted.url + asset);
    expect(res.status).toBe(200);
    expect(res.headers.get('cache-control')).toBe('public, max-age=31536000, immutable');
    const again = await fetch(untrusted.url + asset, { headers: { 'if-none-match': res.headers.get('etag')! } });
    expect(again.status).toBe(304);
    const favicon = await fetch(`${untrusted.url}/favicon.svg`);
    expect(favicon.headers.get('content-type')).toBe('image/svg+xml');
    expect(favicon.headers.get('cache-control')).toBe('public, max-age=0');
  });

  it('refuses a declared body larger than any route accepts, before reading it', async () => {
    const status = await new Promise<number>((resolve, reject) => {
      const req = http.request(
        `${untrusted.url}/api/auth/sign-in`,
        {
          method: 'POST',
          headers: { origin: untrusted.url, 'content-type': 'application/json', 'content-length': String(50 * 1024 * 1024) },
        },
        (res) => {
          res.resume();
          resolve(res.statusCode ?? 0);
        },
      );
      req.on('error', reject);
      req.write('{');
    });
    expect(status).toBe(413);
  });

  it('will not start with a TRUST_PROXY it cannot read, and names the entry', async () => {
    const bad = startServe(await sparePort(), '10.0.0.1,proxy.example');
    expect(await exited(bad.child)).toBe(1);
    expect(bad.log.join('')).toMatch(/TRUST_PROXY: "proxy\.example" is not an IP address/);
  });

  it('stops on SIGTERM with exit code 0', async () => {
    const s = startServe(await sparePort(), undefined);
    await healthy(s);
    const t0 = Date.now();
    s.child.kill('SIGTERM');
    expect(await exited(s.child)).toBe(0);
    expect(Date.now() - t0).toBeLessThan(5000);
  });
});
