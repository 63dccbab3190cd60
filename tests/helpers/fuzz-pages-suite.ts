/**
 * The hostile-input suite for pages, shared by the short run in `npm test`
 * (tests/integration/fuzz-pages.test.ts) and the long one in `npm run test:soak`
 * (tests/soak/fuzz-pages.soak.test.ts). Every .astro page on disk (the error pages too: they
 * can be opened by their own path) gets `numRuns` generated GET requests: hostile [param]
 * values, hostile query strings built on the parameters the page reads (found in its source),
 * hostile Accept, Accept-Language and cookies; as the manager of workspace A, as a member of
 * workspace B (with A's ids), and with no session. Then `numPostRuns` POSTs to the same path
 * (pages have no POST handler). Every answer must pass judgePage(): below 500, no stack trace
 * or internal error text, a Content-Security-Policy on HTML, no redirect to another site, and
 * no generated `<script>` marker printed unescaped. Problems are collected, not shrunk, so one
 * run lists them all; counts go to .data/fuzz-summary-<label>.json for docs/RELIABILITY.md.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { mkdirSync, writeFileSync } from 'node:fs';
import http from 'node:http';
import { ROLES, type Role } from '../../src/lib/vocabulary';
import { createSession } from '../../src/server/auth/session';
import { reportQuerySchema } from '../../src/server/reports';
import { BASE } from './api';
import { discoverPages, pageLiterals, pageQueryKeys } from './pages';
import { buildFixture } from '../integration/authz/fixture';
import { addPageRows, pageCases, type PageFixture } from '../integration/authz/pages';
import {
  fc,
  enc,
  hostileBody,
  JUNK_QUERY_VALUES,
  hostilePageHeaders,
  hostilePageParam,
  hostilePageQuery,
  judgePage,
  REFLECTION_MARKERS,
  type BodySpec,
  type PageAnswer,
} from './fuzz';

/**
 * Pages that hand every query entry to a schema, so their keys are not in the page source: the
 * keys that schema knows. A page that reads all entries without a row here fails "knows the
 * query parameters of every page".
 */
const ALL_ENTRIES_KEYS: Record<string, () => string[]> = {
  '/reports': () => Object.keys(reportQuerySchema.shape),
};

/**
 * The /500 page opened by its own path: Astro renders it with status 500 because of its name,
 * whatever the request. Its answer is judged on everything else (no leak, CSP, escaping).
 */
const OWN_STATUS: Record<string, number> = { '/500': 500 };

type Who = 'managerA' | 'memberB' | 'anon';

interface GetInput {
  who: Who;
  roleB: Role;
  param: string | null;
  query: string | null;
  headers: { headers: Record<string, string>; cookie: string | null; cookieFirst: boolean } | null;
}
interface PostInput {
  who: Who;
  roleB: Role;
  query: string | null;
  body: BodySpec;
  origin: 'same' | 'none' | 'evil';
}

interface PageTarget {
  page: string;
  file: string;
  keys: string[];
  literals: string[];
}

export function fuzzPagesSuite(opts: { numRuns: number; numPostRuns: number; label: string; seed?: number }): void {
  describe(`hostile input at every page (${opts.numRuns} GET and ${opts.numPostRuns} POST requests per page)`, () => {
    const targets: PageTarget[] = discoverPages({ withErrorPages: true }).map(({ page, file }) => {
      const found = pageQueryKeys(file);
      const keys = [...new Set([...found.keys, ...(found.readsAllEntries ? (ALL_ENTRIES_KEYS[page]?.() ?? []) : [])])].sort();
      return { page, file, keys, literals: pageLiterals(file) };
    });
    const problems: string[] = [];
    const statuses: Record<string, number> = {};
    const byWho: Record<string, number> = {};
    let requests = 0;
    const bigHeaders = { count: 0, examples: [] as string[] };
    let fx: PageFixture;
    let idWords: string[] = [];
    const tokens = {} as { a: string; b: Record<Role, string> };
    const started = Date.now();

    beforeAll(async () => {
      fx = await addPageRows(await buildFixture());
      // GET pages change nothing: one session each is enough for the whole run.
      tokens.a = (await createSession(fx.a.users.manager.id, fx.a.workspaceId, 'fuzz pages')).token;
      tokens.b = {} as Record<Role, string>;
      for (const role of ROLES) tokens.b[role] = (await createSession(fx.b.users[role].id, fx.b.workspaceId, 'fuzz pages')).token;
      // Ids of both workspaces as query values: another distillery's wash type, person or reading.
      idWords = [
        ...new Set(
          [fx.a, fx.b]
            .flatMap((w) => [w.stillId, w.fermenterId, w.washTypeId, w.fermentId, w.readingId, w.runId, w.users.manager.id, w.users.staff.id])
            .map(String),
        ),
      ];
    }, 120_000);

    afterAll(() => {
      mkdirSync('.data', { recursive: true });
      const summary = {
        label: opts.label,
        numRunsPerPage: opts.numRuns,
        numPostRunsPerPage: opts.numPostRuns,
        pages: targets.length,
        requests,
        statuses,
        byWho,
        answersWithHeadersOver16kB: bigHeaders.count,
        bigHeaderExamples: bigHeaders.examples,
        problems: problems.length,
        problemList: problems,
        seconds: Math.round((Date.now() - started) / 1000),
        at: new Date().toISOString(),
      };
      writeFileSync(`.data/fuzz-summary-${opts.label}.json`, JSON.stringify(summary, null, 2));
      console.log(`[fuzz pages] ${JSON.stringify({ ...summary, problemList: undefined, bigHeaderExamples: undefined })}`);
    });

    it('finds the pages by itself, error pages included', () => {
      const pages = targets.map((t) => t.page);
      expect(pages.length).toBeGreaterThan(20);
      expect(pages).toEqual(expect.arrayContaining(['/', '/sign-in', '/ferments/[id]/edit', '/invite/[token]', '/403', '/404']));
      expect(pages.some((p) => p.startsWith('/api'))).toBe(false);
    });

    it('knows the query parameters of every page', () => {
      const unknown = discoverPages({ withErrorPages: true })
        .filter((p) => pageQueryKeys(p.file).readsAllEntries && !ALL_ENTRIES_KEYS[p.page])
        .map((p) => `${p.page} (${p.file})`);
      expect(unknown, `pages that read every query entry, without their keys in ALL_ENTRIES_KEYS:\n  ${unknown.join('\n  ')}`).toEqual([]);
      const keysOf = (page: string) => targets.find((t) => t.page === page)?.keys;
      expect(keysOf('/sign-in')).toEqual(expect.arrayContaining(['next', 'error', 'wait']));
      expect(keysOf('/reports')).toEqual(expect.arrayContaining(['from', 'to']));
    });

    it('the judgement finds what it looks for', () => {
      const base = BASE();
      const html = (text: string, csp: string | null = "default-src 'self'") => ({ status: 200, text, contentType: 'text/html', csp, location: null });
      expect(judgePage(html('<main>Booked at 08:00 for the still.</main>'), base)).toEqual([]);
      expect(judgePage(html(`<pre>Error: boom\n    at render (${process.cwd()}/src/pages/x.astro:12:3)</pre>`), base)).not.toEqual([]);
      expect(judgePage(html('<p>TypeError: x is undefined</p>'), base)).not.toEqual([]);
      expect(judgePage(html('<p>hi</p>', null), base)).not.toEqual([]);
      expect(judgePage(html(`<p>${REFLECTION_MARKERS[0]}</p>`), base)).not.toEqual([]);
      expect(judgePage(html('<p>&lt;script&gt;pfz(1)&lt;/script&gt;</p>'), base)).toEqual([]);
      expect(judgePage({ status: 303, text: '', contentType: '', csp: null, location: '//evil.example/' }, base)).not.toEqual([]);
      expect(judgePage({ status: 500, text: 'Something went wrong', contentType: 'text/plain', csp: null, location: null }, base)).not.toEqual([]);
      expect(judgePage({ status: 502, text: 'Bad gateway', contentType: 'text/plain', csp: null, location: null }, base, { ownStatus: 500 })).not.toEqual([]);
    });

    it('a page that echoes its query escapes it (the marker check has something to see)', async () => {
      // The sign-in page repeats `wait` in its throttling message.
      const p = await send('GET', `/sign-in?error=throttled&wait=${enc(REFLECTION_MARKERS[0]!)}`, null, {});
      expect(p.status).toBe(200);
      expect(p.text).toContain('&lt;script&gt;pfz(1)&lt;/script&gt;');
      expect(judgePage(p, BASE())).toEqual([]);
    });

    const cookieFor = (who: Who, roleB: Role): string | null =>
      who === 'managerA' ? `plateau_session=${tokens.a}` : who === 'memberB' ? `plateau_session=${tokens.b[roleB]}` : null;
    const who = fc.constantFrom<Who>('managerA', 'managerA', 'memberB', 'anon');
    const roleB = fc.constantFrom<Role>('manager', 'manager', ...ROLES);

    function record(name: string, w: Who, p: PageAnswer & { describe: string; headerBytes: number }, into: string[], keep = 5): void {
      requests++;
      if (p.headerBytes > NODE_HEADER_LIMIT) {
        // Not judged a failure (a browser reads up to 256 kB), but a Node client or a proxy with default buffers cannot read it.
        bigHeaders.count++;
        if (bigHeaders.examples.length < 3)
          bigHeaders.examples.push(`${name}: ${p.status} with ${p.headerBytes} bytes of headers <- ${p.describe.slice(0, 200)}`);
      }
      statuses[String(p.status)] = (statuses[String(p.status)] ?? 0) + 1;
      byWho[w] = (byWho[w] ?? 0) + 1;
      const found = judgePage(p, BASE(), { ownStatus: OWN_STATUS[name.replace(/^\w+ /, '')] });
      if (found.length && into.length < keep) into.push(`${name}: ${p.status} ${found.join('; ')} <- ${p.describe}`);
    }

    it.each(targets.map((t) => [`GET ${t.page}`, t] as const))(
      '%s',
      async (name, t) => {
        const concrete = concretePagePath(t.page, fx);
        const paramIndex = t.page.split('/').findIndex((s) => /^\[\w+\]$/.test(s));
        const realValue = paramIndex >= 0 ? concrete.split('/')[paramIndex]! : '';
        const literals = [...t.literals, ...idWords];
        const input: fc.Arbitrary<GetInput> = fc.record({
          who,
          roleB,
          param:
            paramIndex >= 0
              ? fc.option(
                  fc.oneof(
                    { weight: 4, arbitrary: hostilePageParam },
                    {
                      weight: 1,
                      arbitrary: fc.constantFrom(
                        `${realValue}A`,
                        realValue.slice(0, -1),
                        realValue.toUpperCase(),
                        `${realValue}%00`,
                        `${realValue}%2F..`,
                        `${realValue}.json`,
                        `${realValue}/`,
                        `${realValue};x=1`,
                      ),
                    },
                  ),
                  { freq: 4 },
                )
              : fc.constant(null),
          query: fc.option(hostilePageQuery(t.keys, literals), { freq: 4 }),
          headers: fc.option(hostilePageHeaders, { freq: 3 }),
        });
        const pageProblems: string[] = [];
        await fc.assert(
          fc.asyncProperty(input, async (inp) => {
            const segments = concrete.split('/');
            if (inp.param !== null && paramIndex >= 0) segments[paramIndex] = inp.param;
            const url = `${segments.join('/')}${inp.query ? `?${inp.query}` : ''}`;
            const p = await send(
              'GET',
              url,
              mergeCookies(cookieFor(inp.who, inp.roleB), inp.headers),
              { accept: 'text/html', ...inp.headers?.headers },
              undefined,
              inp.who === 'memberB' ? `memberB(${inp.roleB})` : inp.who,
              inp.headers?.cookie,
            );
            record(name, inp.who, p, pageProblems);
          }),
          { numRuns: opts.numRuns, seed: opts.seed, endOnFailure: true },
        );
        problems.push(...pageProblems);
        expect(pageProblems).toEqual([]);
      },
      Math.max(30_000, opts.numRuns * 3_000),
    );

    // Every parameter a page reads, one at a time, with every junk value: a failure the generator would find only by luck is found every run.
    const withKeys = targets.filter((t) => t.keys.length);
    it.each(withKeys.map((t) => [`every query parameter of ${t.page} (${t.keys.join(', ')}) with every junk value`, t] as const))(
      '%s',
      async (_label, t) => {
        const name = `SWEEP ${t.page}`;
        const concrete = concretePagePath(t.page, fx);
        // A public page shows itself only without a session (a signed-in person is sent on).
        const w: Who = pageCases.find((c) => c.page === t.page)?.public ? 'anon' : 'managerA';
        const pageProblems: string[] = [];
        for (const key of t.keys) {
          for (const value of JUNK_QUERY_VALUES) {
            const p = await send('GET', `${concrete}?${enc(key)}=${enc(value)}`, cookieFor(w, 'manager'), { accept: 'text/html' }, undefined, w);
            // Every failing parameter and value is worth its line here: each is a separate fix.
            record(name, w, p, pageProblems, 40);
          }
        }
        problems.push(...pageProblems);
        expect(pageProblems).toEqual([]);
      },
      60_000,
    );

    it.each(targets.map((t) => [`POST ${t.page}`, t] as const))(
      '%s',
      async (name, t) => {
        const concrete = concretePagePath(t.page, fx);
        const input: fc.Arbitrary<PostInput> = fc.record({
          who,
          roleB,
          query: fc.option(hostilePageQuery(t.keys, t.literals), { freq: 2 }),
          body: hostileBody({ email: 'someone@test.example', password: 'pfz', next: '/', [t.keys[0] ?? 'q']: REFLECTION_MARKERS[0] }),
          // Same origin passes the cross-site check and reaches the page; the others are refused before it.
          origin: fc.constantFrom<PostInput['origin']>('same', 'same', 'same', 'none', 'evil'),
        });
        const pageProblems: string[] = [];
        await fc.assert(
          fc.asyncProperty(input, async (inp) => {
            const url = `${concrete}${inp.query ? `?${inp.query}` : ''}`;
            const headers: Record<string, string> = { accept: 'text/html' };
            if (inp.origin === 'same') headers.origin = BASE();
            if (inp.origin === 'evil') headers.origin = 'https://evil.example';
            let body: string;
            if (inp.body.kind === 'json') {
              body = JSON.stringify(inp.body.value) ?? 'null';
              headers['content-type'] = 'application/json';
            } else {
              body = inp.body.text;
              if (inp.body.contentType) headers['content-type'] = inp.body.contentType;
            }
            const p = await send('POST', url, cookieFor(inp.who, inp.roleB), headers, body, inp.who === 'memberB' ? `memberB(${inp.roleB})` : inp.who);
            record(name, inp.who, p, pageProblems);
          }),
          { numRuns: opts.numPostRuns, seed: opts.seed, endOnFailure: true },
        );
        problems.push(...pageProblems);
        expect(pageProblems).toEqual([]);
      },
      Math.max(30_000, opts.numPostRuns * 3_000),
    );
  });
}

/** The page's URL with workspace A's ids and live tokens (from the page authorization table); an error page is its own pattern. */
function concretePagePath(page: string, fx: PageFixture): string {
  const pc = pageCases.find((c) => c.page === page);
  if (pc) return pc.path(fx);
  return page.replace(/\[\w+\]/g, '1');
}

/** The session cookie and a junk one, in either order (a junk duplicate may shadow the session: then the request is anonymous). */
function mergeCookies(session: string | null, h: GetInput['headers']): string | null {
  const junk = h?.cookie ?? null;
  if (!junk) return session;
  if (!session) return junk;
  return h!.cookieFirst ? `${junk}; ${session}` : `${session}; ${junk}`;
}

/** Node's own limit on the headers of a request or answer; a proxy in front is often stricter. */
const NODE_HEADER_LIMIT = 16 * 1024;

/**
 * One request over node:http rather than fetch: the path goes on the wire exactly as generated
 * (fetch would resolve "..", "%2e%2e" and re-encode), and an answer whose headers pass Node's
 * 16 kB limit is still read (as a browser would) and counted, not mistaken for no answer.
 */
function send(
  method: 'GET' | 'POST',
  url: string,
  cookie: string | null,
  headers: Record<string, string>,
  body?: string,
  who = 'anon',
  junkCookie?: string | null,
): Promise<PageAnswer & { describe: string; headerBytes: number }> {
  const base = new URL(BASE());
  const h: Record<string, string> = { ...headers };
  if (cookie) h.cookie = cookie;
  const payload = body !== undefined ? Buffer.from(body) : undefined;
  if (payload) h['content-length'] = String(payload.length);
  const describe = `${method} ${url.slice(0, 300)} as ${who}${Object.keys(headers).length ? ` headers ${JSON.stringify(headers).slice(0, 300)}` : ''}${junkCookie ? ` junk cookie ${JSON.stringify(junkCookie.slice(0, 200))} ${cookie?.startsWith(junkCookie) ? 'before' : 'after'} the session` : ''}${body !== undefined ? ` body ${body.slice(0, 160)}` : ''}`;
  return new Promise((resolve) => {
    const noAnswer = (why: string) => resolve({ status: 599, text: `no answer: ${why}`, contentType: '', csp: null, location: null, headerBytes: 0, describe });
    let req: http.ClientRequest;
    try {
      req = http.request(
        { host: base.hostname, port: base.port, method, path: url, headers: h, maxHeaderSize: 256 * 1024, timeout: 20_000, agent: false },
        (res) => {
          const chunks: Buffer[] = [];
          res.on('data', (c: Buffer) => chunks.push(c));
          res.on('error', (err) => noAnswer(err.message));
          res.on('end', () => {
            const one = (v: string | string[] | undefined) => (Array.isArray(v) ? v.join(', ') : (v ?? null));
            resolve({
              status: res.statusCode ?? 599,
              text: Buffer.concat(chunks).toString('utf8'),
              contentType: one(res.headers['content-type']) ?? '',
              csp: one(res.headers['content-security-policy']),
              location: one(res.headers.location),
              headerBytes: res.rawHeaders.reduce((n, x) => n + Buffer.byteLength(x) + 2, 0),
              describe,
            });
          });
        },
      );
    } catch (err) {
      // The generator made a request Node itself will not send (e.g. a character not allowed in a header): not the app's doing.
      resolve({
        status: 0,
        text: '',
        contentType: '',
        csp: null,
        location: null,
        headerBytes: 0,
        describe: `${describe} (not sendable: ${(err as Error).message})`,
      });
      return;
    }
    req.on('timeout', () => {
      req.destroy(new Error('timed out after 20 s'));
    });
    // The server hung up or never answered: as bad as a 5xx.
    req.on('error', (err) => noAnswer(err.message));
    req.end(payload);
  });
}
