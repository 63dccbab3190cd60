/**
 * Hostile input for the API: fast-check arbitraries for malformed and extreme bodies, query
 * strings, path ids and headers, the route discovery and id substitution shared by the fuzz
 * tests, and the one judgement every answer must pass (a 4xx with the JSON error shape or a
 * 2xx; never a 5xx, never a stack trace).
 */
import fc from 'fast-check';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import type { Fixture, Method, RouteCase } from '../integration/authz/types';

// ---------------------------------------------------------------- strings and values

/** encodeURIComponent throws on lone surrogates: make the string well-formed first. */
export const enc = (s: string) => encodeURIComponent((s as string & { toWellFormed(): string }).toWellFormed());

/** Fragments that have broken web apps before: SQL, HTML, template syntax, path tricks, control characters. */
export const NASTY_STRINGS: readonly string[] = [
  "' OR '1'='1",
  "'; DROP TABLE readings; --",
  '" OR ""="',
  '1; SELECT SLEEP(5)',
  "\\'",
  '%',
  '_',
  '\\',
  '<script>alert(1)</script>',
  '<img src=x onerror=alert(1)>',
  '"><svg onload=alert(1)>',
  'javascript:alert(1)',
  '{{7*7}}',
  '${7*7}',
  '<%= 7*7 %>',
  '../../etc/passwd',
  '..%2f..%2f',
  '%00',
  '\u0000',
  'a\u0000b',
  '\r\nX-Injected: 1',
  '\u202Eevil\u202C',
  'שלום עולם',
  'مرحبا',
  '🍺🥃🔥',
  '👨‍👩‍👧‍👦',
  '\uFEFF',
  '\uD800',
  'Ω≈ç√∫',
  'ＡＢＣ',
  'ß'.repeat(300),
  'NaN',
  'Infinity',
  '-Infinity',
  '1e309',
  '-1e309',
  '9'.repeat(400),
  '0x10',
  '1.0000000000000000001',
  '-0',
  '1,050',
  '١٠٥٠',
  'true',
  'null',
  'undefined',
  '[]',
  '{}',
  '__proto__',
  'constructor',
  'prototype',
  'toString',
  '2025-02-30T08:00:00Z',
  '0000-00-00T00:00:00Z',
  '9999-12-31T23:59:59Z',
  '+275760-09-13T00:00:00Z',
  '2025-01-01T08:00:00+25:00',
  '',
  ' ',
  '\t\n',
];

/** A string of about 100 kB (well under the 256 kB JSON limit, far over every field limit). */
export const LONG_STRING = 'ẞ<b>'.repeat(20_000).slice(0, 100_000);

export const hostileString: fc.Arbitrary<string> = fc.oneof(
  { weight: 4, arbitrary: fc.constantFrom(...NASTY_STRINGS) },
  { weight: 2, arbitrary: fc.string({ maxLength: 40 }) },
  { weight: 2, arbitrary: fc.string({ unit: 'grapheme', maxLength: 40 }) },
  { weight: 1, arbitrary: fc.string({ unit: 'binary', maxLength: 40 }) },
  { weight: 1, arbitrary: fc.constant(LONG_STRING) },
  { weight: 1, arbitrary: fc.tuple(fc.constantFrom(...NASTY_STRINGS), fc.integer({ min: 2, max: 3000 })).map(([s, n]) => s.repeat(n)) },
);

export const hostileNumber: fc.Arbitrary<number> = fc.oneof(
  fc.constantFrom(
    0,
    -0,
    -1,
    1,
    0.5,
    1e308,
    -1e308,
    5e-324,
    Number.MAX_SAFE_INTEGER,
    Number.MAX_SAFE_INTEGER + 2,
    -Number.MAX_SAFE_INTEGER,
    2 ** 31,
    2 ** 32,
    2 ** 63,
    1.2e-7,
    999999999999,
  ),
  fc.integer(),
  fc.double({ noNaN: true, noDefaultInfinity: true }),
);

/** JSON has no NaN or Infinity: they go as strings, and as the bare words (invalid JSON) in raw bodies. */
export const hostileScalar: fc.Arbitrary<unknown> = fc.oneof(
  { weight: 3, arbitrary: hostileString },
  { weight: 3, arbitrary: hostileNumber },
  { weight: 1, arbitrary: fc.constantFrom(true, false, null, 'NaN', 'Infinity', '-Infinity') },
  // Numbers as typed in other locales, and moments far in the future (a typing slip, the last JavaScript date).
  { weight: 1, arbitrary: fc.constantFrom('1,200', '1.200,5', '1 200', '12,5', '1٫5', '3000-01-08T08:00:00Z', '3000-01-08', '+275760-09-13T00:00:00.000Z') },
);

/** Arrays nested `depth` deep: [[[[...]]]]. */
export const nested = (depth: number, inner: unknown = 1): unknown => {
  let v: unknown = inner;
  for (let i = 0; i < depth; i++) v = i % 2 ? { a: v } : [v];
  return v;
};

export const hostileValue: fc.Arbitrary<unknown> = fc.letrec((tie) => ({
  value: fc.oneof(
    { depthSize: 'small', withCrossShrink: true },
    { weight: 6, arbitrary: hostileScalar },
    { weight: 1, arbitrary: fc.array(tie('value'), { maxLength: 4 }) },
    {
      weight: 1,
      arbitrary: fc.dictionary(fc.oneof(fc.string({ maxLength: 8 }), fc.constantFrom('__proto__', 'constructor', 'id', 'workspaceId')), tie('value'), {
        maxKeys: 4,
      }),
    },
    { weight: 1, arbitrary: fc.integer({ min: 50, max: 3000 }).map((d) => nested(d)) },
    { weight: 1, arbitrary: fc.integer({ min: 0, max: 5000 }).map((n) => Array.from({ length: n }, (_, i) => i)) },
  ),
})).value;

// ---------------------------------------------------------------- bodies

export type BodySpec = { kind: 'json'; value: unknown } | { kind: 'raw'; text: string; contentType: string };

const CONTENT_TYPES = [
  'application/json',
  'text/plain',
  'text/csv',
  'application/x-www-form-urlencoded',
  'multipart/form-data',
  'multipart/form-data; boundary=xyz',
  'application/xml',
  'application/json; charset=latin1',
  '',
];

/** Replace, remove or add one key of a valid body with a hostile value. */
function mutateObject(valid: Record<string, unknown>): fc.Arbitrary<unknown> {
  const keys = Object.keys(valid);
  const replaceOne = keys.length
    ? fc.tuple(fc.constantFrom(...keys), hostileValue).map(([k, v]) => ({ ...valid, [k]: v }))
    : hostileValue.map((v) => ({ x: v }));
  const replaceAll = fc
    .tuple(...(keys.length ? keys.map(() => hostileValue) : [hostileValue]))
    .map((vals) => Object.fromEntries(keys.map((k, i) => [k, vals[i]])));
  const dropOne = keys.length
    ? fc.constantFrom(...keys).map((k) => {
        const c = { ...valid };
        delete c[k];
        return c;
      })
    : fc.constant({});
  // A computed key makes an own property, so "__proto__" really goes over the wire.
  const extra = fc
    .tuple(fc.constantFrom('__proto__', 'workspaceId', 'id', 'role', 'isAdmin', 'version', 'constructor'), hostileValue)
    .map(([k, v]) => ({ ...valid, [k]: v }));
  return fc.oneof(replaceOne, replaceOne, replaceAll, dropOne, extra);
}

/**
 * A hostile body: a mutation of the valid body (when there is one), any JSON value (arrays
 * where objects belong, scalars, deep nesting), invalid JSON, or text under a wrong content type.
 */
export function hostileBody(valid: unknown): fc.Arbitrary<BodySpec> {
  const asJson = (a: fc.Arbitrary<unknown>) => a.map((value): BodySpec => ({ kind: 'json', value }));
  const options: Array<fc.WeightedArbitrary<BodySpec>> = [
    { weight: 3, arbitrary: asJson(hostileValue) },
    { weight: 1, arbitrary: asJson(fc.constant([valid ?? {}])) },
    {
      weight: 2,
      arbitrary: fc
        .tuple(
          fc.oneof(
            hostileString,
            fc.constantFrom(
              '{',
              '{"a":',
              '[1,2',
              'NaN',
              '{"value": NaN}',
              '{"value": Infinity}',
              '{"a":1}{"b":2}',
              '\uFEFF{}',
              'null',
              '""',
              '{"__proto__":{"admin":true}}',
              'time,value\n2025-01-01,1.050',
            ),
            fc.integer({ min: 100, max: 20_000 }).map((d) => '['.repeat(d) + ']'.repeat(d)),
          ),
          fc.constantFrom(...CONTENT_TYPES),
        )
        .map(([text, contentType]): BodySpec => ({ kind: 'raw', text, contentType })),
    },
  ];
  if (valid && typeof valid === 'object' && !Array.isArray(valid))
    options.push({ weight: 5, arbitrary: asJson(mutateObject(valid as Record<string, unknown>)) });
  if (typeof valid === 'string') {
    // A CSV route: break the file rather than the JSON.
    options.push({
      weight: 5,
      arbitrary: fc
        .tuple(
          fc.array(fc.tuple(hostileString, hostileString, hostileString), { maxLength: 6 }),
          fc.constantFrom('text/csv', 'text/plain', '', 'application/json'),
        )
        .map(([rows, contentType]): BodySpec => ({ kind: 'raw', contentType, text: valid + rows.map((r) => r.join(',')).join('\n') })),
    });
  }
  return fc.oneof(...options);
}

// ---------------------------------------------------------------- query, path, headers

/** Query keys the API reads somewhere, plus junk. */
const QUERY_KEYS = [
  'from',
  'to',
  'state',
  'washTypeId',
  'fermenterId',
  'runId',
  'page',
  'limit',
  'action',
  'userId',
  'format',
  'period',
  'stillId',
  'q',
  'id',
  '__proto__',
  'a[b]',
  'from[]',
];

export const hostileQuery: fc.Arbitrary<string> = fc
  .array(
    fc.tuple(
      fc.oneof(fc.constantFrom(...QUERY_KEYS), fc.string({ maxLength: 6 })),
      fc.oneof(
        hostileString.filter((s) => s.length < 5000),
        hostileNumber.map(String),
      ),
    ),
    { maxLength: 4 },
  )
  .map((pairs) => pairs.map(([k, v]) => `${enc(k)}=${enc(v)}`).join('&'));

/** Values put where a route has [id], [handle], [token] or [uploadId]. */
export const hostileId: fc.Arbitrary<string> = fc.oneof(
  fc.constantFrom(
    '0',
    '-1',
    '1.5',
    '1e3',
    '0x1f',
    '99999999999999999999',
    '9007199254740993',
    '18446744073709551616',
    'NaN',
    'Infinity',
    'null',
    '%00',
    '%2e%2e',
    '..%2F..%2Fetc',
    '%F0%9F%8D%BA',
    "1'%20OR%20'1'%3D'1",
    '%3Cscript%3E',
    'A'.repeat(300),
    '1%0d%0aX-A:%201',
    '%E2%80%AE1',
  ),
  fc.string({ maxLength: 30 }).map(enc),
  fc.integer({ min: 1, max: 2 ** 31 }).map(String),
);

const latin1 = (s: string) => s.replace(/[^\x20-\x7e]/g, '?');

/** Extra request headers: odd Accept, conditional headers, junk cookies, bad Origin, lying forwarded host. */
export const hostileHeaders: fc.Arbitrary<Record<string, string>> = fc
  .record(
    {
      accept: fc.constantFrom('application/json', 'text/html', '*/*', 'text/calendar', 'image/png', ';;;', ''),
      'if-none-match': fc.oneof(
        fc.constant(''),
        hostileString.map((s) => latin1(s).slice(0, 200)),
      ),
      'if-modified-since': fc.constantFrom('', 'yesterday', 'Thu, 01 Jan 1970 00:00:00 GMT', 'Fri, 31 Dec 9999 23:59:59 GMT', '-1'),
      'x-forwarded-host': fc.constantFrom('', 'evil.example', '127.0.0.1:1'),
      'x-forwarded-for': fc.constantFrom('', '1.2.3.4', 'not-an-ip', '::1, 10.0.0.1', "'; DROP TABLE x; --"),
      'accept-language': fc.constantFrom('', 'en-GB', 'xx-INVALID-*', '*;q=NaN'),
      junkCookie: fc.oneof(
        fc.constant(''),
        hostileString.map((s) => `plateau_session=${enc(s).slice(0, 400)}`),
      ),
      badOrigin: fc.constantFrom(false, false, false, true),
    },
    { requiredKeys: ['badOrigin'] },
  )
  .map((h) => {
    const out: Record<string, string> = {};
    for (const [k, v] of Object.entries(h)) if (typeof v === 'string' && v !== '' && k !== 'junkCookie') out[k] = v;
    if (h.junkCookie) out['x-junk-cookie'] = h.junkCookie;
    if (h.badOrigin) out.origin = 'https://evil.example';
    return out;
  });

// ---------------------------------------------------------------- routes

/** A route pattern's concrete URL with the fixture's ids of workspace A. */
export function concretePath(route: string, fx: Fixture): string {
  const a = fx.a;
  const byPrefix: Array<[RegExp, string]> = [
    [/^\/api\/ferments\/\[id\]/, String(a.fermentId)],
    [/^\/api\/runs\/\[id\]/, String(a.runId)],
    [/^\/api\/stills\/closures\/\[id\]/, String(a.closureId)],
    [/^\/api\/stills\/\[id\]/, String(a.stillId)],
    [/^\/api\/fermenters\/\[id\]/, String(a.fermenterId)],
    [/^\/api\/wash-types\/\[id\]/, String(a.washTypeId)],
    [/^\/api\/readings\/\[id\]/, String(a.readingId)],
    [/^\/api\/feeds\/\[id\]/, String(a.feedId)],
    [/^\/api\/members\/invitations\/\[id\]/, String(a.invitationId)],
    [/^\/api\/members\/\[id\]/, String(a.users.staff.id)],
  ];
  let out = route;
  const idFor = byPrefix.find(([re]) => re.test(route))?.[1] ?? '1';
  out = out.replace('[id]', idFor).replace('[handle]', a.managerSessionHandle).replace('[token]', a.feedToken).replace('[uploadId]', 'A'.repeat(32));
  return out;
}

/** The same URL with one parameter replaced by `bad` (the first when there are several). */
export function pathWithHostileParam(route: string, fx: Fixture, bad: string): string {
  const first = route.match(/\[(\w+)\]/)?.[0];
  if (!first) return concretePath(route, fx);
  return concretePath(route.replace(first, '\u0001'), fx).replace('\u0001', bad);
}

/** Valid bodies for routes whose authorization case has none (or no case yet), so mutations reach the domain code. */
export function fallbackBody(route: string, method: Method, fx: Fixture): unknown {
  const a = fx.a;
  const soon = new Date(Date.now() + 40 * 86400_000);
  soon.setUTCHours(8, 0, 0, 0);
  const table: Record<string, unknown> = {
    'POST /api/runs': {
      stillId: a.stillId,
      type: 'stripping',
      startsAt: soon.toISOString(),
      durationMinutes: 300,
      ferments: [{ fermentId: a.fermentId, litres: 500 }],
      notes: 'fuzz',
    },
    'PATCH /api/runs/[id]': { version: 1, notes: 'fuzz', startsAt: soon.toISOString() },
    'POST /api/runs/[id]/cancel': { version: 1, reason: 'fuzz' },
    'POST /api/runs/[id]/start': { version: 1 },
    'POST /api/runs/[id]/finish': { version: 1 },
    'PUT /api/runs/[id]/outcomes': { lowWinesLitres: 300, lowWinesAbv: 28 },
    'POST /api/stills': {
      name: 'Fuzz still',
      kind: 'pot',
      capacityLitres: 1000,
      heatingKw: 30,
      operatingHours: [{ weekday: 1, open: '06:00', close: '18:00' }],
      cleaningAfterRunMinutes: 30,
      typicalMinutes: { stripping: 300, spirit: 480, redistillation: 400, cleaning: 60, maintenance: 120 },
    },
    'PATCH /api/stills/[id]': { name: 'Still A' },
    'POST /api/stills/closures': { stillId: a.stillId, startsOn: '2031-02-01', endsOn: '2031-02-02', reason: 'fuzz' },
    'PATCH /api/stills/closures/[id]': { reason: 'fuzz' },
    'PUT /api/stills/order': { stillIds: [a.stillId] },
    'POST /api/stills/order': { stillIds: [a.stillId] },
    'PUT /api/notifications': { digest: false },
  };
  return table[`${method} ${route}`];
}

/** Queries that make GET routes do real work, so a mutation of them reaches the domain code. */
export function fallbackQuery(route: string): string {
  const from = new Date(Date.now() - 7 * 86400_000).toISOString();
  const to = new Date(Date.now() + 35 * 86400_000).toISOString();
  if (route === '/api/board') return `from=${encodeURIComponent(from)}&to=${encodeURIComponent(to)}`;
  if (route.startsWith('/api/reports') || route.startsWith('/api/exports')) return `from=${from.slice(0, 10)}&to=${to.slice(0, 10)}`;
  return '';
}

export function caseFor(cases: RouteCase[], route: string, method: Method): RouteCase | undefined {
  return cases.find((c) => c.route === route && c.method === method);
}

// ---------------------------------------------------------------- the judgement

/** Lines that only a stack trace or a raw driver error would put in an answer. */
const LEAK_PATTERNS: RegExp[] = [
  /\n\s+at [\w.<>$]+ \(?(file:|node:|\/|[A-Z]:\\)/,
  /at async /,
  /node_modules\//,
  /\/work\/|\/src\/server\//,
  /ER_[A-Z_]{4,}/,
  /You have an error in your SQL syntax/i,
  /ECONNREFUSED/,
  /TypeError:|ReferenceError:|SyntaxError: Unexpected/,
  /ZodError/,
];

export interface Answer {
  status: number;
  text: string;
  contentType: string;
}

/** Problems with one answer (empty when it is fine). */
export function judge(ans: Answer): string[] {
  const problems: string[] = [];
  if (ans.status >= 500) problems.push(`status ${ans.status}`);
  // 303: sign-out answers a plain form post with a redirect to the sign-in page; 304: a feed not modified.
  if (ans.status < 200 || (ans.status >= 300 && ans.status !== 303 && ans.status !== 304 && ans.status < 400)) problems.push(`unexpected status ${ans.status}`);
  for (const re of LEAK_PATTERNS)
    if (re.test(ans.text)) {
      problems.push(`answer leaks internals (${re})`);
      break;
    }
  // 414 / 431: Node's HTTP parser refuses an over-long request line or headers before the app sees them.
  if (ans.status >= 400 && ans.status !== 414 && ans.status !== 431) {
    let body: { error?: { code?: unknown; message?: unknown } } | null = null;
    try {
      body = JSON.parse(ans.text);
    } catch {
      /* not JSON */
    }
    if (!ans.contentType.includes('application/json')) problems.push(`error answer is ${ans.contentType || 'untyped'}, not JSON`);
    if (!body || typeof body.error?.code !== 'string' || typeof body.error?.message !== 'string')
      problems.push(`error answer lacks { error: { code, message } }: ${ans.text.slice(0, 120)}`);
  }
  return problems;
}

export { fc };

// ---------------------------------------------------------------- route discovery

const API_DIR = path.resolve('src/pages/api');

/** Every route file under src/pages/api and the methods it exports, named as the authorization matrix names them. */
export function discoverApiRoutes(): Array<{ route: string; method: Method }> {
  const walk = (dir: string): string[] =>
    readdirSync(dir).flatMap((name) => {
      const full = path.join(dir, name);
      if (statSync(full).isDirectory()) return name.startsWith('_') ? [] : walk(full);
      if (name.startsWith('_') || name.startsWith('[...') || !/\.(ts|js|mjs)$/.test(name)) return [];
      return [full];
    });
  const out: Array<{ route: string; method: Method }> = [];
  for (const file of walk(API_DIR)) {
    const rel = path
      .relative(API_DIR, file)
      .split(path.sep)
      .join('/')
      .replace(/\.(ts|js|mjs)$/, '');
    const parts = rel.split('/');
    if (parts[parts.length - 1] === 'index') parts.pop();
    const route = '/api' + (parts.length ? '/' + parts.join('/') : '');
    const src = readFileSync(file, 'utf8');
    for (const m of new Set([...src.matchAll(/export const (GET|POST|PUT|PATCH|DELETE)\b/g)].map((x) => x[1] as Method))) out.push({ route, method: m });
  }
  return out.sort((a, b) => a.route.localeCompare(b.route) || a.method.localeCompare(b.method));
}

// ---------------------------------------------------------------- pages (tests/helpers/fuzz-pages-suite.ts)

/**
 * Reflection markers: if one of these ever comes back with its `<` unescaped, a page printed
 * input as HTML. Each carries `pfz` so the check cannot match the product's own markup.
 */
export const REFLECTION_MARKERS: readonly string[] = [
  '<script>pfz(1)</script>',
  '"><script>pfz(2)</script>',
  "'><svg onload=pfz(3)>",
  '</textarea><img src=x onerror=pfz(4)>',
  '</script><script>pfz(5)</script>',
];
const MARKER_RAW = /<script>pfz\(|<svg onload=pfz\(|<img src=x onerror=pfz\(/;

/** Values for a [param] of a page: huge, unicode, path traversal, negative, float, 20 digits, markers (already URL-encoded). */
export const hostilePageParam: fc.Arbitrary<string> = fc.oneof(
  { weight: 3, arbitrary: hostileId },
  {
    weight: 3,
    arbitrary: fc.constantFrom(
      '-1',
      '-99999999999',
      '-0',
      '1.5',
      '0.1',
      '1e3',
      '1e400',
      '99999999999999999999',
      '12345678901234567890',
      '00000000000000000001',
      '9'.repeat(2000),
      'A'.repeat(5000),
      '..',
      '%2e%2e',
      '..%2F..%2F..%2Fetc%2Fpasswd',
      '%2e%2e%2f%2e%2e%2fetc%2fpasswd',
      '%252e%252e%252f',
      '....%2F%2F',
      '..%5C..%5Cwindows',
      '%2F',
      '%5C',
      '~root',
      '%00',
      '%ff%fe',
      '%E1%BA%9E',
      '%D7%A9%D7%9C%D7%95%D7%9D',
      '%E2%80%AE%E2%80%AD',
      '%EF%BB%BF1',
      '%F0%9F%8D%BA'.repeat(50),
      '%C0%AE%C0%AE',
      '%ED%A0%80',
    ),
  },
  { weight: 2, arbitrary: fc.constantFrom(...REFLECTION_MARKERS).map(enc) },
  { weight: 1, arbitrary: fc.string({ unit: 'grapheme', minLength: 1, maxLength: 40 }).map(enc) },
  { weight: 1, arbitrary: fc.integer({ min: 1, max: 200 }).map((n) => enc('ẞ🥃'.repeat(n))) },
);

/** A junk date or number: what a date or page filter gets typed into it. */
const JUNK_FILTER_VALUES = [
  '2025-02-30',
  '2025-13-01',
  '0000-00-00',
  '9999-12-31',
  '+275760-09-13',
  '-000001-01-01',
  '2025-1-1',
  '20250101',
  'today',
  '1e309',
  '-1',
  '0',
  '1.5',
  '99999999999999999999',
  'NaN',
  'Infinity',
  '',
];

/** Every value the deterministic sweep gives each query parameter of a page, one parameter at a time. */
export const JUNK_QUERY_VALUES: readonly string[] = [
  ...JUNK_FILTER_VALUES,
  '-Infinity',
  '1e400',
  '-1e400',
  '0x1f',
  ' 1',
  '1 ',
  '١٠٥٠',
  '9007199254740993',
  'true',
  'null',
  '[]',
  '%',
  '..%2F..',
  '0001-01-01',
  '2025-12-31T25:00',
  'ẞ<'.repeat(1000),
  ...REFLECTION_MARKERS.slice(0, 2),
];

/** One query value: a marker, a word the page itself knows (so a branch that echoes input is reached), or junk. */
export function hostileQueryValue(literals: readonly string[]): fc.Arbitrary<string> {
  const options: Array<fc.WeightedArbitrary<string>> = [
    { weight: 3, arbitrary: fc.constantFrom(...REFLECTION_MARKERS) },
    { weight: 2, arbitrary: fc.constantFrom(...JUNK_FILTER_VALUES) },
    { weight: 3, arbitrary: hostileString.filter((s) => s.length < 3000) },
    { weight: 1, arbitrary: hostileNumber.map(String) },
    // Long, but a URL that still fits Node's 16 kB header limit: reaches the page.
    { weight: 1, arbitrary: fc.integer({ min: 500, max: 1200 }).map((n) => 'ẞ<'.repeat(n)) },
  ];
  if (literals.length) options.push({ weight: 3, arbitrary: fc.constantFrom(...literals) });
  return fc.oneof(...options);
}

/**
 * A hostile query string for a page that reads `keys`: every key the page reads set to a marker,
 * one of its own words or junk; extra junk pairs; a repeated key; array-style keys; now and then a
 * URL too long for the server to accept at all (414/431 are fine answers).
 */
export function hostilePageQuery(keys: readonly string[], literals: readonly string[]): fc.Arbitrary<string> {
  const allKeys = keys.length ? keys : ['q'];
  const value = hostileQueryValue(literals);
  const pair = (k: fc.Arbitrary<string>) => fc.tuple(k, value).map(([k2, v]) => `${enc(k2)}=${enc(v)}`);
  const ownKeys = fc.tuple(...allKeys.map((k) => fc.option(pair(fc.constant(k)), { freq: 4 }))).map((ps) => ps.filter((p): p is string => p !== null));
  const extra = fc.array(
    pair(
      fc.oneof(
        fc.constantFrom(...allKeys).map((k) => `${k}[]`),
        fc.constantFrom(...allKeys).map((k) => `${k}[0]`),
        fc.constantFrom('__proto__', 'constructor', '', '%', 'a b'),
        fc.string({ maxLength: 8 }),
      ),
    ),
    { maxLength: 3 },
  );
  const repeated = fc.option(
    fc.tuple(fc.constantFrom(...allKeys), fc.array(value, { minLength: 2, maxLength: 30 })).map(([k, vs]) => vs.map((v) => `${enc(k)}=${enc(v)}`).join('&')),
    { freq: 2 },
  );
  const shape = fc.constantFrom<'plain' | 'bare' | 'odd'>('plain', 'plain', 'plain', 'bare', 'odd');
  return fc.tuple(ownKeys, extra, repeated, shape, fc.integer({ min: 0, max: 40 })).map(([own, ex, rep, sh, huge]) => {
    let parts = [...own, ...ex, ...(rep ? [rep] : [])];
    // Keys with no "=", empty pairs, stray separators.
    if (sh === 'bare') parts = parts.map((p) => p.split('=')[0]!);
    if (sh === 'odd') parts = ['', ...parts, '&', '=', '=='];
    if (huge === 0) parts.push(`${enc(allKeys[0]!)}=${'x'.repeat(40_000)}`);
    return parts.join('&');
  });
}

/** Cookie headers that are not what the app sets: junk sessions, broken syntax, duplicates, huge. */
export const hostileCookie: fc.Arbitrary<string> = fc.oneof(
  fc.constantFrom(
    'plateau_session=',
    'plateau_session=x',
    'plateau_session=%ZZ',
    'plateau_session="quoted"',
    'plateau_session=a; plateau_session=b',
    ';;;',
    '=',
    '==;=',
    'plateau_session',
    'a=b; a=c; a=',
    `plateau_session=${'0'.repeat(64)}`,
    `plateau_session=${'A'.repeat(4000)}`,
    'theme=dark%00; lang=%E2%80%AE',
    `junk=${enc('<script>pfz(6)</script>')}`,
    'plateau_session=..%2F..%2Fetc%2Fpasswd',
  ),
  hostileString.map((s) => `plateau_session=${enc(s).slice(0, 400)}`),
  fc.string({ maxLength: 60 }).map((s) => latin1(s).replace(/[\r\n]/g, ' ')),
);

/** Accept and Accept-Language headers a browser would never send, plus junk cookies (sent beside a real session when there is one). */
export const hostilePageHeaders: fc.Arbitrary<{ headers: Record<string, string>; cookie: string | null; cookieFirst: boolean }> = fc
  .record({
    accept: fc.constantFrom(
      'text/html',
      'text/html,application/xhtml+xml,application/xml;q=0.9,*/*;q=0.8',
      'application/json',
      '*/*',
      'image/png',
      'text/calendar',
      ';;;',
      'text/html;q=NaN',
      '*/*;q=-1',
      'x'.repeat(3000),
      '',
    ),
    'accept-language': fc.constantFrom(
      '',
      'en-GB',
      'de-DE,de;q=0.9,en;q=0.8',
      'xx-INVALID-*',
      '*;q=NaN',
      '*',
      'zh-Hant-TW-u-nu-hanidec',
      'en-GB;q=2, fr;q=-1',
      'a,'.repeat(2000),
      '\u00e9',
    ),
    'accept-encoding': fc.constantFrom('', 'gzip', 'br;q=1.1', 'identity;q=0', 'x'.repeat(200)),
    'user-agent': fc.constantFrom('', 'Mozilla/5.0', '() { :; }; echo pfz', 'x'.repeat(2000)),
    cookie: fc.option(hostileCookie, { freq: 2 }),
    cookieFirst: fc.boolean(),
  })
  .map(({ cookie, cookieFirst, ...h }) => {
    const headers: Record<string, string> = {};
    // Header values must be latin-1 for fetch; a non-latin-1 value is what latin1() makes of it.
    for (const [k, v] of Object.entries(h)) if (v !== '') headers[k] = latin1(v);
    return { headers, cookie, cookieFirst };
  });

/** An answer from a page, with the headers the judgement needs. */
export interface PageAnswer extends Answer {
  csp: string | null;
  location: string | null;
}

/**
 * Lines only a stack trace, a compiler or a driver would put in an answer: a stack frame, a
 * source position (.ts:12), an error naming a file path, a dependency folder, this checkout's path.
 */
const PAGE_LEAK_PATTERNS: RegExp[] = [
  /\bat (?:async )?[\w.$<>[\] ]*\(?(?:file:\/\/|node:|\/)[^\s)]*:\d+/,
  /^\s*at [^\n]+:\d+:\d+\)?\s*$/m,
  /[\w-]\.(?:m?ts|tsx|astro):\d/,
  /\b\w*Error:[^<\n]{0,300}?(?:\/|[A-Z]:\\)[\w.@-]+[/\\][\w.@-]/,
  /node_modules/,
  /ER_[A-Z_]{4,}/,
  /You have an error in your SQL syntax/i,
  /ECONNREFUSED/,
  /TypeError:|ReferenceError:|RangeError:|SyntaxError: Unexpected/,
  /ZodError/,
];

/**
 * What a development server adds to every page and a production build does not: stylesheets
 * inlined with their file id (their url(/node_modules/...) fonts), module URLs, source locations
 * for the dev toolbar. Dropped before looking for leaks; a stack trace never sits there.
 */
function withoutAssetReferences(html: string): string {
  return html
    .replace(/<style\b[^>]*>[\s\S]*?<\/style>/g, '<style></style>')
    .replace(/\s(?:src|href|data-vite-dev-id|data-astro-source-file|data-astro-source-loc|component-url|renderer-url|before-hydration-url)="[^"]*"/g, '');
}

/**
 * Problems with one page answer (empty when it is fine). `base` is the app's own origin.
 * `ownStatus` is the status an error page answers when opened by its own path (Astro gives the
 * /500 page status 500 by its name); only that exact status is then allowed, nothing else.
 */
export function judgePage(ans: PageAnswer, base: string, opts: { ownStatus?: number } = {}): string[] {
  const problems: string[] = [];
  if (ans.status >= 500 && ans.status !== opts.ownStatus) problems.push(`status ${ans.status}`);
  if (ans.status < 200) problems.push(`unexpected status ${ans.status}`);
  if (ans.status >= 300 && ans.status < 400 && ans.status !== 304) {
    // A redirect stays on this site: a path ("/x", never "//host" or "/\host") or our own origin.
    const loc = ans.location ?? '';
    const own = (loc.startsWith('/') && !/^\/[/\\]/.test(loc)) || loc === base || loc.startsWith(`${base}/`);
    if (!own) problems.push(`redirect to ${loc ? `another site: ${loc.slice(0, 120)}` : 'nowhere (no Location)'}`);
  }
  const text = withoutAssetReferences(ans.text);
  for (const re of PAGE_LEAK_PATTERNS)
    if (re.test(text)) {
      problems.push(`answer leaks internals (${re}): …${text.slice(Math.max(0, (text.match(re)?.index ?? 0) - 60), (text.match(re)?.index ?? 0) + 100)}…`);
      break;
    }
  if (text.includes(process.cwd())) problems.push("answer names the server's checkout path");
  if (ans.contentType.includes('text/html') && !/default-src/.test(ans.csp ?? ''))
    problems.push(`HTML answer without a Content-Security-Policy (${ans.csp ?? 'none'})`);
  const raw = ans.text.match(MARKER_RAW);
  if (raw) problems.push(`input reflected unescaped: …${ans.text.slice(Math.max(0, raw.index! - 80), raw.index! + 60)}…`);
  return problems;
}
