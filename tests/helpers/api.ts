/**
 * A small HTTP client for integration tests: talks to the real app over HTTP with a real
 * session cookie and the Origin header a browser would send.
 */
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { hashPassword } from '../../src/server/auth/password';
import { ROLES, type Role } from '../../src/lib/vocabulary';

export const BASE = () => process.env.PLATEAU_TEST_URL ?? 'http://127.0.0.1:4399';

export class Client {
  cookie = '';
  constructor(public base = BASE()) {}

  async request(
    method: string,
    path: string,
    body?: unknown,
    headers: Record<string, string> = {},
  ): Promise<{ status: number; json: any; text: string; headers: Headers }> {
    const h: Record<string, string> = { origin: this.base, accept: 'application/json', ...headers };
    if (this.cookie) h.cookie = this.cookie;
    let payload: BodyInit | undefined;
    if (body instanceof FormData || typeof body === 'string') payload = body as BodyInit;
    else if (body !== undefined) {
      payload = JSON.stringify(body);
      h['content-type'] ??= 'application/json';
    }
    let res: Response;
    try {
      res = await fetch(this.base + path, { method, headers: h, body: payload, redirect: 'manual' });
    } catch (err) {
      // A pooled keep-alive socket the server had just closed: undici reports ECONNRESET before
      // the request was written. Try once more on a fresh connection.
      if ((err as { cause?: { code?: string } }).cause?.code !== 'ECONNRESET') throw err;
      res = await fetch(this.base + path, { method, headers: h, body: payload, redirect: 'manual' });
    }
    const setCookie = res.headers.getSetCookie?.() ?? [];
    for (const c of setCookie) {
      const [pair] = c.split(';');
      if (pair?.startsWith('plateau_session=')) this.cookie = pair.endsWith('=') ? '' : pair;
    }
    const text = await res.text();
    let json: any = null;
    try {
      json = JSON.parse(text);
    } catch {
      /* not JSON */
    }
    return { status: res.status, json, text, headers: res.headers };
  }
  get(path: string, headers?: Record<string, string>) {
    return this.request('GET', path, undefined, headers);
  }
  post(path: string, body?: unknown, headers?: Record<string, string>) {
    return this.request('POST', path, body ?? {}, headers);
  }
  patch(path: string, body?: unknown) {
    return this.request('PATCH', path, body ?? {});
  }
  put(path: string, body?: unknown) {
    return this.request('PUT', path, body ?? {});
  }
  del(path: string, body?: unknown) {
    return this.request('DELETE', path, body);
  }

  async signIn(email: string, password = TEST_PASSWORD): Promise<this> {
    const r = await this.post('/api/auth/sign-in', { email, password });
    if (r.status !== 200) throw new Error(`sign-in failed for ${email}: ${r.status} ${r.text}`);
    return this;
  }
}

export const TEST_PASSWORD = 'correct horse battery staple';
let hashCache: string | null = null;
let counter = 0;

export interface TestWorkspace {
  workspaceId: number;
  users: Record<Role, { id: number; email: string }>;
  client: (role: Role) => Promise<Client>;
}

/**
 * A fresh workspace with one verified user per role, each with a unique e-mail, created
 * straight in the database (the sign-up flow has its own tests).
 */
export async function createTestWorkspace(name = 'Test distillery', settings: Partial<typeof t.workspaces.$inferInsert> = {}): Promise<TestWorkspace> {
  const db = getDb();
  hashCache ??= await hashPassword(TEST_PASSWORD);
  const tag = `${Date.now().toString(36)}${(++counter).toString(36)}${Math.floor(Math.random() * 1e6).toString(36)}`;
  const [ws] = await db
    .insert(t.workspaces)
    .values({ name: `${name} ${tag}`, timeZone: 'Europe/London', ...settings })
    .$returningId();
  const users = {} as TestWorkspace['users'];
  for (const role of ROLES) {
    const email = `${role}-${tag}@test.example`;
    const [u] = await db
      .insert(t.users)
      .values({ email, name: `${role[0]!.toUpperCase()}${role.slice(1)} ${tag}`, passwordHash: hashCache, emailVerifiedAt: new Date() })
      .$returningId();
    await db.insert(t.memberships).values({ workspaceId: ws!.id, userId: u!.id, role });
    users[role] = { id: u!.id, email };
  }
  return {
    workspaceId: ws!.id,
    users,
    client: async (role: Role) => new Client().signIn(users[role].email),
  };
}
