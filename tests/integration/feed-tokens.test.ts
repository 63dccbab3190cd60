/**
 * Calendar feed tokens follow the person who holds them: the manager sees every feed of the
 * distillery grouped by holder (who created it, when, last fetched), and a token stops
 * opening its feed the moment its holder leaves, is disabled, or their role no longer
 * allows that feed. A dead token answers exactly like an unknown one (OWASP notes on
 * capability URLs, REFERENCES §9: do not reveal that a token once existed).
 */
import { describe, it, expect, beforeAll } from 'vitest';
import { randomBytes } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { Client, createTestWorkspace, type TestWorkspace } from '../helpers/api';

interface Fetched {
  status: number;
  type: string | null;
  body: string;
}

async function fetchFeed(url: string): Promise<Fetched> {
  const res = await fetch(url, { headers: { 'cache-control': 'no-cache' } });
  return { status: res.status, type: res.headers.get('content-type'), body: await res.text() };
}

/** What a token nobody ever held gets: the answer a dead token must match. */
async function unknownTokenAnswer(base: string): Promise<Fetched> {
  return fetchFeed(`${base}/api/feeds/${randomBytes(32).toString('base64url')}.ics`);
}

async function createFeed(client: Client, body: Record<string, unknown>): Promise<{ id: number; url: string }> {
  const r = await client.post('/api/feeds', body);
  expect(r.status, r.text).toBe(201);
  return { id: r.json.feed.id, url: r.json.url };
}

interface GroupJson {
  holderId: number | null;
  holderName: string;
  holderRole: string | null;
  feeds: Array<Record<string, any>>;
}

describe('feed tokens follow their holder', () => {
  let ws: TestWorkspace;
  let manager: Client;
  let base: string;
  let gone: Fetched;

  beforeAll(async () => {
    ws = await createTestWorkspace('Feed tokens');
    manager = await ws.client('manager');
    base = manager.base;
    gone = await unknownTokenAnswer(base);
    expect(gone.status).toBe(404);
  });

  it("a member's feed opens (200) and answers 404 like an unknown token once the manager removes them", async () => {
    const distiller = await ws.client('distiller');
    const feed = await createFeed(distiller, { scope: 'workspace', name: 'Still-house tablet' });
    const before = await fetchFeed(feed.url);
    expect(before.status).toBe(200);
    expect(before.type).toBe('text/calendar; charset=utf-8');

    const removed = await manager.del(`/api/members/${ws.users.distiller.id}`);
    expect(removed.status, removed.text).toBe(200);
    const after = await fetchFeed(feed.url);
    expect(after).toEqual(gone);
    // Not revoked: the row stays for the manager to see (and revoke), marked as stopped.
    const [row] = await getDb().select({ revokedAt: t.calendarFeeds.revokedAt }).from(t.calendarFeeds).where(eq(t.calendarFeeds.id, feed.id));
    expect(row!.revokedAt).toBeNull();
  });

  it("a manager's feed of someone else's runs stops when the manager is demoted; their own feed keeps working; promotion revives it", async () => {
    const w = await createTestWorkspace('Feed roles');
    const mgr = await w.client('manager');
    const othersRuns = await createFeed(mgr, { scope: 'person', personId: w.users.staff.id, name: "Staff member's runs" });
    const wholeDistillery = await createFeed(mgr, { scope: 'workspace', name: 'Office wall' });
    expect((await fetchFeed(othersRuns.url)).status).toBe(200);
    expect((await fetchFeed(wholeDistillery.url)).status).toBe(200);

    // A second manager steps in, then demotes the first to planner (who may not follow someone else's runs).
    expect((await mgr.patch(`/api/members/${w.users.planner.id}`, { role: 'manager' })).status).toBe(200);
    const second = await w.client('planner');
    const demoted = await second.patch(`/api/members/${w.users.manager.id}`, { role: 'planner' });
    expect(demoted.status, demoted.text).toBe(200);

    expect(await fetchFeed(othersRuns.url)).toEqual(await unknownTokenAnswer(base));
    expect((await fetchFeed(wholeDistillery.url)).status).toBe(200);

    // The check is made at every fetch against the current role, not frozen at creation.
    expect((await second.patch(`/api/members/${w.users.manager.id}`, { role: 'manager' })).status).toBe(200);
    expect((await fetchFeed(othersRuns.url)).status).toBe(200);
  });

  it('a person feed stops when the person it follows leaves, and any feed stops when its holder is disabled', async () => {
    const w = await createTestWorkspace('Feed subjects');
    const mgr = await w.client('manager');
    const staff = await w.client('staff');
    const followsStaff = await createFeed(mgr, { scope: 'person', personId: w.users.staff.id });
    const staffOwn = await createFeed(staff, { scope: 'workspace' });
    expect((await fetchFeed(followsStaff.url)).status).toBe(200);
    expect((await fetchFeed(staffOwn.url)).status).toBe(200);

    await getDb().update(t.users).set({ disabledAt: new Date() }).where(eq(t.users.id, w.users.staff.id));
    expect((await fetchFeed(staffOwn.url)).status).toBe(404);
    expect((await fetchFeed(followsStaff.url)).status).toBe(404);

    await getDb().update(t.users).set({ disabledAt: null }).where(eq(t.users.id, w.users.staff.id));
    expect((await fetchFeed(followsStaff.url)).status).toBe(200);
    expect((await mgr.del(`/api/members/${w.users.staff.id}`)).status).toBe(200);
    expect((await fetchFeed(followsStaff.url)).status).toBe(404);
  });

  it("the manager's list groups every feed by the person holding it, with creator, creation time, last fetch and whether it still works", async () => {
    const planner = await ws.client('planner');
    const staff = await ws.client('staff');
    const plannerFeed = await createFeed(planner, { scope: 'workspace', name: 'Planner desk' });
    const staffFeed = await createFeed(staff, { scope: 'person', name: 'My shifts' });
    const managerFeed = await createFeed(manager, { scope: 'person', personId: ws.users.staff.id, name: 'Staff runs for the office' });
    const fetchedAt = Date.now();
    expect((await fetchFeed(plannerFeed.url)).status).toBe(200);

    const list = await manager.get('/api/feeds');
    expect(list.status).toBe(200);
    const groups = list.json.groups as GroupJson[];
    const byHolder = new Map(groups.map((g) => [g.holderId, g]));

    // One group per holder, and every feed of the distillery in exactly one of them.
    expect(groups.map((g) => g.holderId).sort()).toEqual([ws.users.manager.id, ws.users.planner.id, ws.users.staff.id, ws.users.distiller.id].sort());
    expect(groups.flatMap((g) => g.feeds.map((f) => f.id)).sort()).toEqual(list.json.feeds.map((f: { id: number }) => f.id).sort());
    for (const g of groups) for (const f of g.feeds) expect(f.createdById).toBe(g.holderId);

    const plannerGroup = byHolder.get(ws.users.planner.id)!;
    expect(plannerGroup.holderRole).toBe('planner');
    const p = plannerGroup.feeds.find((f) => f.id === plannerFeed.id)!;
    expect(p.createdByName).toBe(plannerGroup.holderName);
    expect(p.createdByName).toMatch(/^Planner /);
    expect(Date.parse(p.createdAt)).toBeLessThanOrEqual(fetchedAt + 1000);
    expect(Date.parse(p.lastFetchedAt)).toBeGreaterThanOrEqual(fetchedAt - 1000);
    expect(p.live).toBe(true);

    const s = byHolder.get(ws.users.staff.id)!.feeds.find((f) => f.id === staffFeed.id)!;
    expect(s).toMatchObject({ createdByRole: 'staff', personId: ws.users.staff.id, lastFetchedAt: null, live: true });
    const m = byHolder.get(ws.users.manager.id)!.feeds.find((f) => f.id === managerFeed.id)!;
    expect(m).toMatchObject({ createdById: ws.users.manager.id, personId: ws.users.staff.id, live: true });

    // The removed distiller's feed is listed under them, stopped, with the reason, until revoked.
    const distillerGroup = byHolder.get(ws.users.distiller.id)!;
    expect(distillerGroup.holderRole).toBeNull();
    expect(distillerGroup.feeds).toHaveLength(1);
    expect(distillerGroup.feeds[0]).toMatchObject({ name: 'Still-house tablet', live: false, stoppedBecause: expect.stringMatching(/no longer a member/) });
    // People still here come first.
    expect(groups.at(-1)!.holderId).toBe(ws.users.distiller.id);

    // The manager may revoke any of them, a stopped one included.
    expect((await manager.del(`/api/feeds/${distillerGroup.feeds[0]!.id}`)).status).toBe(204);
    expect((await manager.del(`/api/feeds/${staffFeed.id}`)).status).toBe(204);
    const after = await manager.get('/api/feeds');
    expect((after.json.groups as GroupJson[]).map((g) => g.holderId)).not.toContain(ws.users.distiller.id);
    expect(after.json.feeds.map((f: { id: number }) => f.id)).not.toContain(staffFeed.id);

    // Anyone else sees only their own feeds, in one group.
    const own = await planner.get('/api/feeds');
    expect((own.json.groups as GroupJson[]).map((g) => g.holderId)).toEqual([ws.users.planner.id]);
  });

  it('the settings page groups feeds by holder for a manager, and not for anyone else', async () => {
    const w = await createTestWorkspace('Feed page');
    const mgr = await w.client('manager');
    const distiller = await w.client('distiller');
    await createFeed(distiller, { scope: 'workspace', name: 'Leaving soon' });
    expect((await mgr.del(`/api/members/${w.users.distiller.id}`)).status).toBe(200);
    const page = await mgr.get('/settings/feeds', { accept: 'text/html' });
    expect(page.status).toBe(200);
    expect(page.text.match(/data-testid="feed-holder"/g)).toHaveLength(1);
    expect(page.text).toContain('Leaving soon');
    expect(page.text).toContain('no longer a member');
    const staff = await w.client('staff');
    await createFeed(staff, { scope: 'workspace', name: 'Mine' });
    const own = await staff.get('/settings/feeds', { accept: 'text/html' });
    expect(own.status).toBe(200);
    expect(own.text).toContain('Mine');
    expect(own.text).not.toContain('data-testid="feed-holder"');
  });
});
