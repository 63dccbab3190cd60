/**
 * The hostile-input suite, shared by the short run in `npm test` (tests/integration/fuzz.test.ts)
 * and the long one in `npm run test:soak` (tests/soak/fuzz.soak.test.ts): every API route and
 * method on disk gets `numRuns` generated requests, as the manager of workspace A or with no
 * session, and every answer must pass judge(). Problems are collected (not shrunk) so one run
 * lists them all; counts go to .data/fuzz-summary-<label>.json for docs/RELIABILITY.md.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { mkdirSync, writeFileSync } from 'node:fs';
import { notInArray } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { createSession } from '../../src/server/auth/session';
import { BASE } from './api';
import { buildFixture } from '../integration/authz/fixture';
import type { Fixture, Method, RouteCase } from '../integration/authz/types';
import {
  fc,
  hostileBody,
  hostileHeaders,
  hostileId,
  hostileQuery,
  judge,
  concretePath,
  pathWithHostileParam,
  fallbackBody,
  fallbackQuery,
  caseFor,
  discoverApiRoutes,
  type BodySpec,
} from './fuzz';

const modules = import.meta.glob<{ cases?: RouteCase[] }>('../integration/authz/*.ts', { eager: true });
const CASES: RouteCase[] = Object.entries(modules)
  .filter(([f]) => !/\/(types|fixture)\.ts$/.test(f))
  .flatMap(([, m]) => m.cases ?? []);

/** Routes that end the caller's session or workspace: each gets a fixture of its own. */
const DESTRUCTIVE = new Set(['DELETE /api/workspace', 'POST /api/account/sign-out-everywhere', 'DELETE /api/members/[id]', 'POST /api/account/password']);

interface Input {
  who: 'manager' | 'anon';
  body: BodySpec;
  query: string | null;
  param: string | null;
  headers: Record<string, string> | null;
}

export function fuzzSuite(opts: { numRuns: number; label: string; seed?: number }): void {
  describe(`hostile input at every API route (${opts.numRuns} requests per route and method)`, () => {
    const routes = discoverApiRoutes();
    const problems: string[] = [];
    const statuses: Record<string, number> = {};
    let requests = 0;
    let shared: Fixture;
    let throttleBefore: string[] = [];
    const started = Date.now();

    beforeAll(async () => {
      shared = await buildFixture();
      throttleBefore = (await getDb().select({ key: t.signInThrottle.key }).from(t.signInThrottle)).map((r) => r.key);
    }, 120_000);

    afterAll(async () => {
      // Fuzzed sign-ins count as failures for this machine's address: forget them, so later tests can sign in.
      const db = getDb();
      if (throttleBefore.length) await db.delete(t.signInThrottle).where(notInArray(t.signInThrottle.key, throttleBefore));
      else await db.delete(t.signInThrottle);
      mkdirSync('.data', { recursive: true });
      const summary = {
        label: opts.label,
        numRunsPerRoute: opts.numRuns,
        routes: routes.length,
        requests,
        statuses,
        problems: problems.length,
        problemList: problems,
        seconds: Math.round((Date.now() - started) / 1000),
        at: new Date().toISOString(),
      };
      writeFileSync(`.data/fuzz-summary-${opts.label}.json`, JSON.stringify(summary, null, 2));
      console.log(`[fuzz] ${JSON.stringify({ ...summary, problemList: undefined })}`);
    });

    it('finds the routes by itself', () => {
      expect(routes.length).toBeGreaterThan(20);
      expect(routes.map((r) => `${r.method} ${r.route}`)).toContain('POST /api/ferments/[id]/readings');
    });

    it.each(routes.map((r) => [`${r.method} ${r.route}`, r] as const))(
      '%s',
      async (name, r) => {
        const fx = DESTRUCTIVE.has(name) ? await buildFixture() : shared;
        const rc = caseFor(CASES, r.route, r.method);
        const valid = rc?.body ? rc.body(fx) : fallbackBody(r.route, r.method, fx);
        const baseQuery = fallbackQuery(r.route);
        const hasParam = r.route.includes('[');
        const input: fc.Arbitrary<Input> = fc.record({
          who: fc.constantFrom<Input['who']>('manager', 'manager', 'manager', 'anon'),
          body: hostileBody(valid),
          query: fc.option(
            fc.oneof(
              hostileQuery,
              hostileQuery.map((q) => (baseQuery ? `${baseQuery}&${q}` : q)),
              hostileQuery.map((q) => baseQuery.replace(/from=[^&]*/, q.replace(/^[^=]*=/, 'from='))),
            ),
            { freq: 2 },
          ),
          param: hasParam ? fc.option(hostileId, { freq: 2 }) : fc.constant(null),
          headers: fc.option(hostileHeaders, { freq: 2 }),
        });
        const routeProblems: string[] = [];
        await fc.assert(
          fc.asyncProperty(input, async (inp) => {
            // A destructive route may legitimately succeed (e.g. delete the workspace): every run gets a fresh fixture.
            const p = await send(r.route, r.method, DESTRUCTIVE.has(name) ? await buildFixture() : fx, inp, baseQuery);
            requests++;
            statuses[String(p.status)] = (statuses[String(p.status)] ?? 0) + 1;
            const found = judge(p);
            if (found.length && routeProblems.length < 5) routeProblems.push(`${name}: ${p.status} ${found.join('; ')} <- ${p.describe}`);
          }),
          { numRuns: opts.numRuns, seed: opts.seed, endOnFailure: true },
        );
        problems.push(...routeProblems);
        expect(routeProblems).toEqual([]);
      },
      Math.max(30_000, opts.numRuns * 4_000),
    );
  });
}

async function send(route: string, method: Method, fx: Fixture, inp: Input, baseQuery: string) {
  const base = BASE();
  const pathPart = inp.param !== null ? pathWithHostileParam(route, fx, inp.param) : concretePath(route, fx);
  const query = inp.query ?? baseQuery;
  const url = `${base}${pathPart}${query ? `?${query}` : ''}`;
  const headers: Record<string, string> = { origin: base, accept: 'application/json' };
  for (const [k, v] of Object.entries(inp.headers ?? {})) if (k !== 'x-junk-cookie') headers[k] = v;
  if (inp.who === 'manager') {
    const session = await createSession(fx.a.users.manager.id, fx.a.workspaceId, 'fuzz');
    headers.cookie = `plateau_session=${session.token}`;
  } else if (inp.headers?.['x-junk-cookie']) headers.cookie = inp.headers['x-junk-cookie'];
  let body: string | undefined;
  if (method !== 'GET') {
    if (inp.body.kind === 'json') {
      body = JSON.stringify(inp.body.value);
      headers['content-type'] = 'application/json';
    } else {
      body = inp.body.text;
      if (inp.body.contentType) headers['content-type'] = inp.body.contentType;
    }
  }
  const describe = `${method} ${url.slice(base.length, base.length + 160)} as ${inp.who}${body !== undefined ? ` body(${headers['content-type'] ?? 'none'}) ${body.slice(0, 160)}` : ''}`;
  try {
    const res = await fetch(url, { method, headers, body, redirect: 'manual', signal: AbortSignal.timeout(20_000) });
    return { status: res.status, text: await res.text(), contentType: res.headers.get('content-type') ?? '', describe };
  } catch (err) {
    // The server hung up or never answered: as bad as a 5xx.
    return { status: 599, text: `no answer: ${(err as Error).message}`, contentType: '', describe };
  }
}
