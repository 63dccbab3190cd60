/**
 * Numbers as people type them in other locales, and dates far in the future, sent to every API
 * route that takes them. The authorization table's valid bodies (tests/integration/authz/*.ts)
 * say which fields are numbers and which are dates; each such field in turn gets:
 * - a locale-formatted number as a string ("1,200", "1.200,5", "1 200", "12,5"): the route must
 *   refuse it with a 4xx naming the field, never read "1,200" as 1.2 and never answer 5xx;
 * - a date in the year 3000 (or 275760, the last one JavaScript can hold): refused with a 4xx.
 * Every answer must also pass the general judge (JSON error shape, no leaked internals).
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { notInArray } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { createSession } from '../../src/server/auth/session';
import { BASE } from '../helpers/api';
import { buildFixture } from './authz/fixture';
import type { Fixture, RouteCase } from './authz/types';
import { judge } from '../helpers/fuzz';

const modules = import.meta.glob<{ cases?: RouteCase[] }>('./authz/*.ts', { eager: true });
const CASES: RouteCase[] = Object.entries(modules)
  .filter(([f]) => !/\/(types|fixture|pages)\.ts$/.test(f))
  .flatMap(([, m]) => m.cases ?? []);

/** Locale-formatted numbers: grouping commas, decimal commas, spaces as grouping, both at once. */
export const LOCALE_NUMBERS = ['1,200', '1.200,5', '1 200', '12,5', '1,200.5.3', '1٫5'] as const;
/** Far-future moments and days: a typing slip (3000) and the last date JavaScript can hold. */
export const FAR_DATES = ['3000-01-08T08:00:00.000Z', '+275760-09-13T00:00:00.000Z'] as const;
export const FAR_DAYS = ['3000-01-08'] as const;

/** Routes whose body carries no number or date a person typed (ids, versions and tokens are not typed). */
const SKIP_KEYS = new Set(['version', 'id', 'ids', 'stillId', 'fermentId', 'fermenterId', 'washTypeId', 'runId', 'feedRunId', 'operatorId', 'userId']);
/** Destructive routes get no typed values worth testing and would end the fixture's session. */
const SKIP_ROUTES = new Set(['DELETE /api/workspace', 'POST /api/account/sign-out-everywhere', 'POST /api/account/password']);

/** Date fields a route takes that its declared valid body leaves to the default (a reading's time defaults to now). */
const EXTRA_DATE_KEYS: Record<string, string[]> = {
  'POST /api/ferments/[id]/readings': ['takenAt'],
  'PATCH /api/readings/[id]': ['takenAt'],
};

interface Probe {
  name: string;
  route: RouteCase;
  key: string;
  kind: 'number' | 'date' | 'day';
}

function probesFor(fx: Fixture): Probe[] {
  const out: Probe[] = [];
  for (const rc of CASES) {
    const name = `${rc.method} ${rc.route}`;
    if (!rc.body || rc.method === 'GET' || SKIP_ROUTES.has(name) || !rc.allowed.includes('manager')) continue;
    const body = rc.body(fx);
    if (!body || typeof body !== 'object' || Array.isArray(body)) continue;
    for (const key of EXTRA_DATE_KEYS[name] ?? []) if (!(key in body)) out.push({ name, route: rc, key, kind: 'date' });
    for (const [key, v] of Object.entries(body as Record<string, unknown>)) {
      if (SKIP_KEYS.has(key)) continue;
      if (typeof v === 'number') out.push({ name, route: rc, key, kind: 'number' });
      else if (typeof v === 'string' && /^\d{4}-\d{2}-\d{2}T/.test(v)) out.push({ name, route: rc, key, kind: 'date' });
      else if (typeof v === 'string' && /^\d{4}-\d{2}-\d{2}$/.test(v)) out.push({ name, route: rc, key, kind: 'day' });
    }
  }
  return out;
}

describe('typed values from other locales and far-future dates', () => {
  let fx: Fixture;
  let cookie: string;
  let throttleBefore: string[] = [];

  beforeAll(async () => {
    fx = await buildFixture();
    const s = await createSession(fx.a.users.manager.id, fx.a.workspaceId, 'typed-values');
    cookie = `plateau_session=${s.token}`;
    throttleBefore = (await getDb().select({ key: t.signInThrottle.key }).from(t.signInThrottle)).map((r) => r.key);
  }, 120_000);

  afterAll(async () => {
    const db = getDb();
    if (throttleBefore.length) await db.delete(t.signInThrottle).where(notInArray(t.signInThrottle.key, throttleBefore));
  });

  async function send(rc: RouteCase, body: unknown) {
    const res = await fetch(`${BASE()}${rc.path(fx)}`, {
      method: rc.method,
      headers: { origin: BASE(), accept: 'application/json', 'content-type': 'application/json', cookie },
      body: JSON.stringify(body),
      redirect: 'manual',
    });
    const text = await res.text();
    return { status: res.status, text, contentType: res.headers.get('content-type') ?? '' };
  }

  it('finds numeric and date fields in the declared bodies (runs, closures, readings, vessels)', () => {
    const probes = probesFor(fx);
    const names = new Set(probes.map((p) => `${p.name} ${p.key}`));
    expect(probes.filter((p) => p.kind === 'number').length).toBeGreaterThan(5);
    expect([...names].some((n) => n.startsWith('POST /api/runs ') && n.endsWith('startsAt'))).toBe(true);
    expect([...names].some((n) => n.startsWith('POST /api/ferments/[id]/readings ') && n.endsWith('takenAt'))).toBe(true);
  });

  it('refuses a locale-formatted number as a string in every numeric field, naming the field', async () => {
    const problems: string[] = [];
    for (const p of probesFor(fx).filter((x) => x.kind === 'number')) {
      for (const typed of LOCALE_NUMBERS) {
        const body = { ...(p.route.body!(fx) as Record<string, unknown>), [p.key]: typed };
        const ans = await send(p.route, body);
        const found = judge(ans);
        if (found.length) problems.push(`${p.name} ${p.key}=${typed}: ${found.join('; ')}`);
        if (ans.status < 400 || ans.status >= 500) problems.push(`${p.name} ${p.key}=${typed}: accepted with ${ans.status}`);
        else if (ans.status === 400) {
          const err = JSON.parse(ans.text).error as { fields?: Record<string, string>; message: string };
          if (!err.fields?.[p.key] && !err.message.includes(p.key))
            problems.push(`${p.name} ${p.key}=${typed}: 400 does not name the field: ${ans.text.slice(0, 160)}`);
        }
      }
    }
    expect(problems).toEqual([]);
  }, 180_000);

  it('refuses dates in the year 3000 and beyond in every date field', async () => {
    const problems: string[] = [];
    for (const p of probesFor(fx).filter((x) => x.kind !== 'number')) {
      const values = p.kind === 'day' ? FAR_DAYS : FAR_DATES;
      for (const far of values) {
        const valid = p.route.body!(fx) as Record<string, unknown>;
        const body: Record<string, unknown> = { ...valid, [p.key]: far };
        // A range must stay a range, so a far start comes with a far end and the range itself is what is judged.
        for (const [other, end] of [
          ['startsAt', 'endsAt'],
          ['startsOn', 'endsOn'],
        ] as const)
          if (p.key === other && typeof valid[end] === 'string') body[end] = far.replace(/T08:00/, 'T12:00');
        const ans = await send(p.route, body);
        const found = judge(ans);
        if (found.length) problems.push(`${p.name} ${p.key}=${far}: ${found.join('; ')}`);
        if (ans.status < 400 || ans.status >= 500) problems.push(`${p.name} ${p.key}=${far}: accepted with ${ans.status}`);
      }
    }
    expect(problems).toEqual([]);
  }, 180_000);
});
