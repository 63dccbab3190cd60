/**
 * The authorization matrix for pages: every .astro page under src/pages (outside api/), opened
 * with no session, by each role of workspace A and by a member of workspace B with A's ids.
 * Expectations come from the declared table in tests/integration/authz/pages.ts; a page on disk
 * without a case fails here, by name. Pages are authorized like routes: no session -> 303 to
 * sign-in, a refused role -> the 403 "not for your role" page, another distillery's id -> 404.
 */
import { describe, it, expect, beforeAll } from 'vitest';
import { ROLES, type Role } from '../../src/lib/vocabulary';
import { createSession } from '../../src/server/auth/session';
import { Client } from '../helpers/api';
import { discoverPages } from '../helpers/pages';
import { buildFixture } from './authz/fixture';
import { addPageRows, pageCases, type PageCase, type PageFixture } from './authz/pages';

/** One session per person, minted in the database (GET pages change nothing, so it can be shared). */
async function clientFor(userId: number, workspaceId: number): Promise<Client> {
  const session = await createSession(userId, workspaceId, 'authz pages');
  const c = new Client();
  // The cookie carries the session's token where sessions have one, else its id.
  c.cookie = `plateau_session=${(session as { token?: string }).token ?? session.id}`;
  return c;
}

const get = (c: Client, url: string) => c.request('GET', url, undefined, { accept: 'text/html' });
const isNotForYourRole = (html: string) => html.includes('data-testid="not-for-your-role"');
const isNotFound = (html: string) => /can(’|'|&#39;)t find that page/.test(html);
const hasId = (c: PageCase) => /\[(?!\.\.\.)[^\]]*id\]/i.test(c.page);
const label = (c: PageCase) => `${c.page}${c.note ? ` (${c.note})` : ''}`;
const ROLE_WORD: Record<Role, string> = { manager: 'a manager', planner: 'a planner', distiller: 'a distiller', staff: 'staff' };

describe('page authorization matrix', () => {
  const onDisk = discoverPages();

  it('finds the pages by itself', () => {
    expect(onDisk.length).toBeGreaterThan(10);
    expect(onDisk.map((p) => p.page)).toEqual(expect.arrayContaining(['/', '/reports', '/ferments/[id]/edit', '/runs/[id]/record']));
    expect(onDisk.some((p) => p.page.startsWith('/api'))).toBe(false);
  });

  it('has exactly one declared case for every page on disk', () => {
    const declared = new Map<string, number>();
    for (const c of pageCases) declared.set(c.page, (declared.get(c.page) ?? 0) + 1);
    const missing = onDisk.filter((p) => !declared.has(p.page)).map((p) => `${p.page} (${p.file})`);
    const duplicated = [...declared].filter(([, n]) => n > 1).map(([k]) => k);
    const stale = [...declared.keys()].filter((k) => !onDisk.some((p) => p.page === k));
    expect(missing, `pages without a case in tests/integration/authz/pages.ts:\n  ${missing.join('\n  ')}`).toEqual([]);
    expect(duplicated, 'pages declared more than once').toEqual([]);
    expect(stale, 'cases for pages that no longer exist').toEqual([]);
  });

  let fx: PageFixture;
  const a = {} as Record<Role, Client>;
  const b = {} as Record<Role, Client>;
  beforeAll(async () => {
    fx = await addPageRows(await buildFixture());
    for (const role of ROLES) {
      a[role] = await clientFor(fx.a.users[role].id, fx.a.workspaceId);
      b[role] = await clientFor(fx.b.users[role].id, fx.b.workspaceId);
    }
  }, 60_000);

  it.each(pageCases.map((c) => [label(c), c] as const))('%s', async (_name, pc) => {
    const url = pc.path(fx);
    const problems: string[] = [];

    // 1. No session: private pages send to sign-in (and back), public ones answer.
    const anon = await get(new Client(), url);
    if (pc.public) {
      if (anon.status !== 200) problems.push(`no session: public page expected 200, got ${anon.status}`);
    } else {
      const location = anon.headers.get('location') ?? '';
      if (anon.status !== 303 || !location.startsWith('/sign-in?next='))
        problems.push(`no session: expected 303 to /sign-in?next=…, got ${anon.status} ${location}`);
    }

    // 2. Roles of A that may not: the 403 page, naming the role.
    for (const role of ROLES.filter((r) => !pc.allowed.includes(r))) {
      const r = await get(a[role], url);
      if (r.status !== 403) problems.push(`${role}: expected 403, got ${r.status}`);
      else if (pc.sharedRefusalPage === false) continue;
      else if (!isNotForYourRole(r.text)) problems.push(`${role}: 403 without the "not for your role" page`);
      else if (!r.text.includes(ROLE_WORD[role])) problems.push(`${role}: the 403 page does not say the role ("${ROLE_WORD[role]}")`);
    }

    // 3. A member of B opening A's ids: 404.
    if (pc.crossTenant ?? hasId(pc)) {
      const roleB = pc.allowed[0]!;
      const r = await get(b[roleB], url);
      if (r.status !== 404) problems.push(`member of B (${roleB}) with A's ids: expected 404, got ${r.status}`);
      else if (!isNotFound(r.text)) problems.push(`member of B (${roleB}): 404 without the not-found page`);
    }

    // 4. Roles of A that may: the page itself.
    for (const role of pc.allowed) {
      const r = await get(a[role], url);
      const expected = pc.allowedStatus ?? 200;
      if (r.status !== expected) problems.push(`${role}: expected ${expected}, got ${r.status} ${r.text.replace(/\s+/g, ' ').slice(0, 160)}`);
      else if (expected === 200 && isNotForYourRole(r.text)) problems.push(`${role}: 200 but showing "not for your role"`);
    }

    expect(problems).toEqual([]);
  });

  // An [id] that is not a positive integer is not found, for a role that may open the page.
  const BAD_IDS = ['abc', '0', '-3', '1.5', '1e3', '0x10', '99999999999999999999'];
  const idPages = pageCases.filter((c) => hasId(c) && !c.public);
  it.each(idPages.flatMap((c) => BAD_IDS.map((bad) => [c.page.replace('[id]', bad), c, bad] as const)))('%s answers 404', async (_url, pc, bad) => {
    const url = pc.path(fx).replace(/\/\d+(?=\/|$)/, `/${encodeURIComponent(bad)}`);
    const r = await get(a[pc.allowed[0]!], url);
    expect(r.status, url).toBe(404);
  });

  it('the 403 page says which role you have, who may, and links back to the board', async () => {
    const r = await get(a.distiller, '/reports');
    expect(r.status).toBe(403);
    const main = r.text.slice(r.text.indexOf('<main'), r.text.indexOf('</main>'));
    expect(main).toContain('a distiller');
    expect(main).toContain(fx.a.workspaceName);
    expect(main).toMatch(/Reports are for managers and planners/);
    expect(main).toMatch(/<a[^>]+href="\/"[^>]*>Back to the board<\/a>/);
  });

  // The main navigation (and the settings page's links) show only pages the role may open.
  it.each(ROLES.map((r) => [r] as const))('%s: every link in the navigation and on the settings page opens', async (role) => {
    const links = new Set<string>();
    for (const page of ['/', '/settings']) {
      const html = (await get(a[role], page)).text;
      const nav = html.slice(html.indexOf('aria-label="Main"'), html.indexOf('</nav>'));
      for (const m of nav.matchAll(/href="([^"]+)"/g)) links.add(m[1]!);
      if (page === '/settings') {
        const main = html.slice(html.indexOf('<main'), html.indexOf('</main>'));
        for (const m of main.matchAll(/href="(\/[^"?#]*)"/g)) if (!m[1]!.startsWith('/api/')) links.add(m[1]!);
      }
    }
    expect(links.size).toBeGreaterThan(2);
    const refused: string[] = [];
    for (const href of links) {
      const r = await get(a[role], href);
      if (r.status !== 200) refused.push(`${href} -> ${r.status}`);
    }
    expect(refused).toEqual([]);
  });

  it('the navigation shows Reports to managers and planners only', async () => {
    for (const role of ROLES) {
      const html = (await get(a[role], '/')).text;
      const nav = html.slice(html.indexOf('aria-label="Main"'), html.indexOf('</nav>'));
      expect(nav.includes('href="/reports"'), role).toBe(role === 'manager' || role === 'planner');
    }
  });
});
