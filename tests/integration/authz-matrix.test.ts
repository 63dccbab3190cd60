/**
 * The authorization matrix: every route file under src/pages/api, every exported method,
 * called with no session, with each role of workspace A, and by a member of workspace B
 * using A's ids. Expectations come from the one declared table in tests/integration/authz/*.ts.
 * A route or method on disk without a case fails here, by name.
 */
import { describe, it, expect, beforeAll } from 'vitest';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { eq, getTableColumns } from 'drizzle-orm';
import { getTableConfig, type MySqlTable } from 'drizzle-orm/mysql-core';
import { getDb } from '../../src/db/client';
import * as schema from '../../src/db/schema';
import { ROLES, type Role } from '../../src/lib/vocabulary';
import { createSession } from '../../src/server/auth/session';
import { Client } from '../helpers/api';
import { buildFixture } from './authz/fixture';
import type { Fixture, RouteCase, Method } from './authz/types';

const API_DIR = path.resolve('src/pages/api');

/** src/pages/api/ferments/[id]/readings.ts -> /api/ferments/[id]/readings; index.ts -> its folder. */
export function routePattern(file: string): string {
  const rel = path
    .relative(API_DIR, file)
    .split(path.sep)
    .join('/')
    .replace(/\.(ts|js|mjs)$/, '');
  const parts = rel.split('/');
  if (parts[parts.length - 1] === 'index') parts.pop();
  return '/api' + (parts.length ? '/' + parts.join('/') : '');
}

function walk(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = path.join(dir, name);
    if (statSync(full).isDirectory()) return name.startsWith('_') ? [] : walk(full);
    // Astro ignores files starting with _; the catch-all only answers 404.
    if (name.startsWith('_') || name.startsWith('[...') || !/\.(ts|js|mjs)$/.test(name)) return [];
    return [full];
  });
}

export function discoverRoutes(): Array<{ route: string; method: Method | 'ALL'; file: string }> {
  const found: Array<{ route: string; method: Method | 'ALL'; file: string }> = [];
  for (const file of walk(API_DIR)) {
    const src = readFileSync(file, 'utf8');
    const methods = new Set([...src.matchAll(/export const (GET|POST|PUT|PATCH|DELETE|ALL)\b/g)].map((m) => m[1] as Method | 'ALL'));
    for (const method of methods) found.push({ route: routePattern(file), method, file: path.relative(process.cwd(), file) });
  }
  return found.sort((a, b) => a.route.localeCompare(b.route) || a.method.localeCompare(b.method));
}

const modules = import.meta.glob<{ cases?: RouteCase[] }>('./authz/*.ts', { eager: true });
const CASES: RouteCase[] = Object.entries(modules)
  .filter(([file]) => !/\/(types|fixture)\.ts$/.test(file))
  .flatMap(([, mod]) => mod.cases ?? []);

const key = (route: string, method: string) => `${method} ${route}`;

/** A client with a brand-new session for this person (so sign-out in one call cannot spoil the next). */
async function clientFor(userId: number, workspaceId: number): Promise<Client> {
  const session = await createSession(userId, workspaceId, 'authz matrix');
  const c = new Client();
  c.cookie = `plateau_session=${session.token}`;
  return c;
}

function call(c: Client, rc: RouteCase, fx: Fixture) {
  const body = rc.body ? rc.body(fx) : undefined;
  return c.request(rc.method, rc.path(fx), body ?? (rc.method === 'GET' || rc.method === 'DELETE' ? undefined : {}));
}

/** Every row of workspace A in every table that has a workspace_id, plus the workspace row. */
async function snapshotWorkspace(workspaceId: number): Promise<string> {
  const db = getDb();
  const out: Record<string, unknown[]> = {};
  for (const [name, value] of Object.entries(schema)) {
    if (!value || typeof value !== 'object' || !(Symbol.for('drizzle:IsDrizzleTable') in value)) continue;
    const table = value as MySqlTable;
    const cols = getTableColumns(table) as Record<string, unknown>;
    const tableName = getTableConfig(table).name;
    if (tableName === 'sessions') {
      out[tableName] = await db
        .select({ id: schema.sessions.id, userId: schema.sessions.userId })
        .from(schema.sessions)
        .where(eq(schema.sessions.workspaceId, workspaceId))
        .orderBy(schema.sessions.id);
      continue;
    }
    if (tableName === 'workspaces') {
      out[tableName] = await db.select().from(schema.workspaces).where(eq(schema.workspaces.id, workspaceId));
      continue;
    }
    if (!('workspaceId' in cols)) continue;
    // Background work may touch these while the case runs: the outbox sender marks mail sent,
    // and any read may refresh the forecast cache. Compare what a request could have changed.
    if (tableName === 'mail_outbox') {
      out[name] = await db
        .select({ id: schema.mailOutbox.id, to: schema.mailOutbox.toAddress, subject: schema.mailOutbox.subject })
        .from(schema.mailOutbox)
        .where(eq(schema.mailOutbox.workspaceId, workspaceId))
        .orderBy(schema.mailOutbox.id);
      continue;
    }
    if (tableName === 'ferment_forecasts' || tableName === 'forecast_history') continue;
    out[name] = await db
      .select()
      .from(table)
      .where(eq((table as unknown as { workspaceId: never }).workspaceId, workspaceId));
  }
  return JSON.stringify(out);
}

describe('authorization matrix', () => {
  const onDisk = discoverRoutes();

  it('finds the route files by itself', () => {
    expect(onDisk.length).toBeGreaterThan(10);
    expect(onDisk.map((r) => key(r.route, r.method))).toContain('POST /api/auth/sign-in');
  });

  it('has exactly one declared case for every route and method on disk', () => {
    const declared = new Map<string, number>();
    for (const c of CASES) declared.set(key(c.route, c.method), (declared.get(key(c.route, c.method)) ?? 0) + 1);
    const missing = onDisk.filter((r) => !declared.has(key(r.route, r.method))).map((r) => `${key(r.route, r.method)} (${r.file})`);
    const duplicated = [...declared].filter(([, n]) => n > 1).map(([k]) => k);
    const stale = [...declared.keys()].filter((k) => !onDisk.some((r) => key(r.route, r.method) === k));
    expect(missing, `routes without a case in tests/integration/authz/*.ts:\n  ${missing.join('\n  ')}`).toEqual([]);
    expect(duplicated, 'routes declared more than once').toEqual([]);
    expect(stale, 'cases for routes that no longer exist').toEqual([]);
  });

  let shared: Fixture;
  beforeAll(async () => {
    shared = await buildFixture();
  }, 60_000);

  const label = (c: RouteCase) => `${c.method} ${c.route}${c.note ? ` (${c.note})` : ''}`;
  it.each(CASES.map((c) => [label(c), c] as const))('%s', async (_name, rc) => {
    const fx = rc.isolated ? await buildFixture() : shared;
    const problems: string[] = [];

    // 1. No session.
    const anon = await call(new Client(), rc, fx);
    if (rc.public) {
      if (anon.status === 401 || anon.status === 403) problems.push(`no session: public route answered ${anon.status}`);
    } else if (anon.status !== 401) problems.push(`no session: expected 401, got ${anon.status}`);

    // 2. Roles of A that may not: 403.
    for (const role of ROLES.filter((r) => !rc.allowed.includes(r))) {
      const r = await call(await clientFor(fx.a.users[role].id, fx.a.workspaceId), rc, fx);
      if (r.status !== 403) problems.push(`${role}: expected 403, got ${r.status}`);
    }

    // 3. A member of B with A's ids: 404, and nothing of A changed.
    const cross = rc.crossTenant ?? rc.route.includes('[');
    if (cross && rc.allowed.length) {
      const roleB: Role = rc.allowed[0]!;
      const before = await snapshotWorkspace(fx.a.workspaceId);
      const r = await call(await clientFor(fx.b.users[roleB].id, fx.b.workspaceId), rc, fx);
      if (r.status !== 404) problems.push(`member of B (${roleB}) with A's ids: expected 404, got ${r.status} ${r.text.slice(0, 120)}`);
      const after = await snapshotWorkspace(fx.a.workspaceId);
      if (before !== after) problems.push(`member of B (${roleB}) changed workspace A's rows`);
    }

    // 4. Roles of A that may: past the gate.
    for (const role of rc.allowed) {
      const r = await call(await clientFor(fx.a.users[role].id, fx.a.workspaceId), rc, fx);
      const ok = rc.allowedStatus ? rc.allowedStatus.includes(r.status) : r.status !== 401 && r.status !== 403 && r.status < 500;
      if (!ok) problems.push(`${role}: expected ${rc.allowedStatus ? rc.allowedStatus.join('/') : 'not 401/403/5xx'}, got ${r.status} ${r.text.slice(0, 160)}`);
    }

    expect(problems).toEqual([]);
  });
});
