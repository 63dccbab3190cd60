/**
 * Calendar feeds over HTTP, read back by two independent iCalendar parsers (ical.js and
 * node-ical). Checks come from RFC 5545 / RFC 7986 (REFERENCES §8) and the OWASP notes on
 * capability URLs (REFERENCES §9).
 */
import { describe, it, expect, beforeAll } from 'vitest';
import ICAL from 'ical.js';
import nodeIcal from 'node-ical';
import { eq } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { Client, createTestWorkspace, type TestWorkspace } from '../helpers/api';
import { ALL_WEEK } from '../helpers/time';

const HOUR = 3_600_000;
const DAY = 24 * HOUR;
// Multi-byte still names (° is 2 octets in UTF-8, é 2, – 3) long enough that lines must fold.
const STILL_1 = 'Alambic numéro un — chauffé à 98 °C, côté café, près de la réserve';
const STILL_2 = 'Wash Still 2';

interface Parsed {
  uid: string;
  start: number;
  end: number;
  status: string;
  sequence: number;
  summary: string;
  description: string;
}

/** Both parsers must agree on every event; returns them by UID. */
function parseBoth(text: string): Map<string, Parsed> {
  const cal = new ICAL.Component(ICAL.parse(text));
  const a = new Map<string, Parsed>();
  for (const c of cal.getAllSubcomponents('vevent')) {
    const ev = new ICAL.Event(c);
    a.set(ev.uid, {
      uid: ev.uid,
      start: ev.startDate.toJSDate().getTime(),
      end: ev.endDate.toJSDate().getTime(),
      status: String(c.getFirstPropertyValue('status')),
      sequence: Number(c.getFirstPropertyValue('sequence')),
      summary: ev.summary,
      description: ev.description,
    });
  }
  const b = new Map<string, Parsed>();
  for (const v of Object.values(nodeIcal.sync.parseICS(text))) {
    if (v?.type !== 'VEVENT') continue;
    const ev = v as nodeIcal.VEvent;
    b.set(ev.uid, {
      uid: ev.uid,
      start: new Date(ev.start).getTime(),
      end: new Date(ev.end!).getTime(),
      status: String(ev.status),
      sequence: Number(ev.sequence),
      summary: String(ev.summary),
      description: String(ev.description),
    });
  }
  expect([...b.keys()].sort()).toEqual([...a.keys()].sort());
  for (const [uid, ev] of a) expect(b.get(uid)).toEqual(ev);
  return a;
}

function rawChecks(text: string): void {
  expect(text.endsWith('\r\n')).toBe(true);
  expect(text.replace(/\r\n/g, '')).not.toMatch(/[\r\n]/);
  const bytes = Buffer.from(text, 'utf8');
  const strict = new TextDecoder('utf-8', { fatal: true });
  let start = 0;
  for (let i = 0; i + 1 < bytes.length; i++) {
    if (bytes[i] === 0x0d && bytes[i + 1] === 0x0a) {
      const line = bytes.subarray(start, i);
      expect(line.length).toBeLessThanOrEqual(75); // RFC 5545 §3.1: 75 octets
      expect(() => strict.decode(line)).not.toThrow(); // no UTF-8 sequence split across a fold
      start = i + 2;
    }
  }
  const logical = text.replace(/\r\n[ \t]/g, '').split('\r\n');
  expect(logical.filter((l) => l === 'VERSION:2.0')).toHaveLength(1);
  expect(logical.filter((l) => l.startsWith('PRODID:'))).toHaveLength(1);
  expect(logical.some((l) => l.startsWith('METHOD'))).toBe(false);
  expect(logical).toContain('REFRESH-INTERVAL;VALUE=DURATION:PT1H');
  expect(logical.some((l) => l.startsWith('NAME:'))).toBe(true);
  for (const l of logical.filter((x) => /^(DTSTART|DTEND|DTSTAMP)/.test(x))) expect(l).toMatch(/:\d{8}T\d{6}Z$/);
}

async function fetchFeed(url: string, headers: Record<string, string> = {}) {
  const res = await fetch(url, { headers });
  return { status: res.status, headers: res.headers, text: await res.text() };
}

describe('calendar feeds', () => {
  let ws: TestWorkspace;
  let planner: Client;
  let staff: Client;
  let distiller: Client;
  let still1: number;
  let still2: number;
  let fermentId: number;
  const runs: Record<string, { id: number; startsAt: Date; endsAt: Date }> = {};
  const uid = (runId: number) => `run-${ws.workspaceId}-${runId}@`;

  beforeAll(async () => {
    ws = await createTestWorkspace('Feeds Distillery');
    const db = getDb();
    const mkStill = async (name: string) =>
      (
        await db
          .insert(t.stills)
          .values({
            workspaceId: ws.workspaceId,
            name,
            kind: 'pot',
            capacityLitres: 3000,
            heatingKw: 60,
            operatingHours: ALL_WEEK,
            typicalMinutes: {},
          })
          .$returningId()
      )[0]!.id;
    still1 = await mkStill(STILL_1);
    still2 = await mkStill(STILL_2);
    const [wt] = await db
      .insert(t.washTypes)
      .values({ workspaceId: ws.workspaceId, name: 'Sugar wash', category: 'sugar', terminalMin: 0.99, terminalMax: 1.0 })
      .$returningId();
    const now = Date.now();
    const [f] = await db
      .insert(t.ferments)
      .values({
        workspaceId: ws.workspaceId,
        code: 'F-É1',
        washTypeId: wt!.id,
        volumeLitres: 2400,
        pitchedAt: new Date(now - 9 * DAY),
        og: 1.08,
      })
      .$returningId();
    fermentId = f!.id;
    // Still falling: not finished.
    const falling: Array<[number, number]> = [
      [8.5, 1.07],
      [7.5, 1.05],
      [6.5, 1.03],
      [5.5, 1.015],
      [4.5, 1.006],
    ];
    await db.insert(t.readings).values(
      falling.map(([daysAgo, sg]) => ({
        workspaceId: ws.workspaceId,
        fermentId,
        takenAt: new Date(now - daysAgo * DAY),
        method: 'hydrometer' as const,
        rawValue: sg,
        rawUnit: 'sg' as const,
        sampleTempC: 20,
        sampleTempUnit: 'C' as const,
        correctedSg: sg,
      })),
    );
    planner = await ws.client('planner');
    staff = await ws.client('staff');
    distiller = await ws.client('distiller');
    const book = async (key: string, body: Record<string, unknown>) => {
      const r = await planner.post('/api/runs', body);
      expect(r.status, r.text).toBe(201);
      runs[key] = { id: r.json.run.id, startsAt: new Date(r.json.run.startsAt), endsAt: new Date(r.json.run.endsAt) };
    };
    const at = (days: number, hour: number) => new Date(Math.floor(now / DAY) * DAY + days * DAY + hour * HOUR).toISOString();
    await book('strip', {
      stillId: still1,
      type: 'stripping',
      startsAt: at(3, 7),
      durationMinutes: 360,
      operatorId: ws.users.distiller.id,
      ferments: [{ fermentId, litres: 2400 }],
    });
    await book('clean', { stillId: still1, type: 'cleaning', startsAt: at(4, 8), durationMinutes: 120 });
    await book('other', { stillId: still2, type: 'maintenance', startsAt: at(5, 8), durationMinutes: 240, operatorId: ws.users.staff.id });
    await book('gone', { stillId: still2, type: 'stripping', startsAt: at(6, 8), durationMinutes: 300 });
    await book('old', { stillId: still2, type: 'cleaning', startsAt: at(-40, 8), durationMinutes: 60 });
    const r = await planner.post(`/api/runs/${runs.gone!.id}/cancel`, { version: 1 });
    expect(r.status, r.text).toBe(200);
  });

  it('creates a feed for the whole distillery, shows its token once and never lists it', async () => {
    const created = await staff.post('/api/feeds', { scope: 'workspace', name: 'Office wall' });
    expect(created.status, created.text).toBe(201);
    const { token, url, webcal } = created.json;
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/); // 32 random bytes, base64url: 256 bits (OWASP: ≥ 128)
    expect(url).toMatch(new RegExp(`/api/feeds/${token}\\.ics$`));
    expect(webcal).toMatch(/^webcal:\/\//);
    const stored = await getDb().select().from(t.calendarFeeds).where(eq(t.calendarFeeds.id, created.json.feed.id));
    expect(stored[0]!.tokenHash).not.toContain(token);
    expect(stored[0]!.tokenHash).toMatch(/^[0-9a-f]{64}$/);
    const list = await staff.get('/api/feeds');
    expect(list.status).toBe(200);
    expect(list.text).not.toContain(token);
    expect(list.json.feeds.map((f: { name: string }) => f.name)).toContain('Office wall');
  });

  it('serves RFC 5545 text both parsers read the same way, with the runs, STATUS and SEQUENCE', async () => {
    const created = await staff.post('/api/feeds', { scope: 'workspace' });
    const res = await fetchFeed(created.json.url);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('text/calendar; charset=utf-8');
    expect(res.headers.get('cache-control')).toBe('private, max-age=300');
    expect(res.headers.get('referrer-policy')).toBe('no-referrer');
    expect(res.headers.get('etag')).toMatch(/^"[^"]+"$/);
    expect(Number.isNaN(Date.parse(res.headers.get('last-modified') ?? ''))).toBe(false);
    rawChecks(res.text);
    const events = parseBoth(res.text);
    const find = (key: string) => [...events.values()].find((e) => e.uid.startsWith(uid(runs[key]!.id)));
    const strip = find('strip')!;
    expect(strip.start).toBe(runs.strip!.startsAt.getTime());
    expect(strip.end).toBe(runs.strip!.endsAt.getTime());
    expect(strip.status).toBe('TENTATIVE'); // the wash is still falling
    expect(strip.sequence).toBe(0);
    expect(strip.summary).toContain(STILL_1); // multi-byte text survives folding
    expect(strip.description).toContain('Wash F-É1');
    expect(strip.description).toContain(`/runs/${runs.strip!.id}`);
    expect(strip.description).toContain('Operator: Distiller');
    expect(find('clean')!.status).toBe('CONFIRMED');
    expect(find('other')!.status).toBe('CONFIRMED');
    const gone = find('gone')!;
    expect(gone.status).toBe('CANCELLED'); // kept, with a higher SEQUENCE
    expect(gone.sequence).toBe(1);
    expect(find('old')).toBeUndefined(); // 40 days back: outside the window
  });

  it('keeps UIDs stable across fetches and answers 304 to If-None-Match and If-Modified-Since', async () => {
    const created = await staff.post('/api/feeds', { scope: 'workspace' });
    const first = await fetchFeed(created.json.url);
    const second = await fetchFeed(created.json.url);
    expect([...parseBoth(second.text).keys()]).toEqual([...parseBoth(first.text).keys()]);
    const etag = second.headers.get('etag')!;
    const again = await fetchFeed(created.json.url, { 'if-none-match': etag });
    expect(again.status).toBe(304);
    expect(again.text).toBe('');
    expect(again.headers.get('etag')).toBe(etag);
    const since = await fetchFeed(created.json.url, { 'if-modified-since': second.headers.get('last-modified')! });
    expect(since.status).toBe(304);
    const stale = await fetchFeed(created.json.url, { 'if-none-match': '"not-this-one"' });
    expect(stale.status).toBe(200);
  });

  it("a per-still feed never shows another still's runs; a person feed only the runs they operate", async () => {
    const s2 = await distiller.post('/api/feeds', { scope: 'still', stillId: still2 });
    expect(s2.status, s2.text).toBe(201);
    const events = parseBoth((await fetchFeed(s2.json.url)).text);
    const ids = [...events.keys()];
    expect(ids.some((u) => u.startsWith(uid(runs.other!.id)))).toBe(true);
    expect(ids.some((u) => u.startsWith(uid(runs.strip!.id)))).toBe(false);
    expect(ids.some((u) => u.startsWith(uid(runs.clean!.id)))).toBe(false);
    for (const e of events.values()) expect(e.summary).not.toContain(STILL_1);

    const mine = await distiller.post('/api/feeds', { scope: 'person' });
    expect(mine.status, mine.text).toBe(201);
    const own = [...parseBoth((await fetchFeed(mine.json.url)).text).keys()];
    expect(own).toHaveLength(1);
    expect(own[0]!.startsWith(uid(runs.strip!.id))).toBe(true);
  });

  it('answers a revoked, unknown or malformed token with the same bare 404', async () => {
    const created = await staff.post('/api/feeds', { scope: 'workspace' });
    expect((await fetchFeed(created.json.url)).status).toBe(200);
    const del = await staff.del(`/api/feeds/${created.json.feed.id}`);
    expect(del.status).toBe(204);
    const revoked = await fetchFeed(created.json.url);
    const base = created.json.url.replace(/[^/]+\.ics$/, '');
    const unknown = await fetchFeed(`${base}${'A'.repeat(43)}.ics`);
    const malformed = await fetchFeed(`${base}nope.ics`);
    for (const r of [revoked, unknown, malformed]) {
      expect(r.status).toBe(404);
      expect(r.text).toBe(revoked.text);
      expect(r.headers.get('content-type')).toContain('application/json');
    }
    expect(revoked.text).not.toMatch(/revok|feed|workspace|token/i);
  });

  it('turns TENTATIVE into CONFIRMED once readings settle the wash, without touching the run', async () => {
    const created = await staff.post('/api/feeds', { scope: 'still', stillId: still1 });
    const before = parseBoth((await fetchFeed(created.json.url)).text);
    const event = (m: Map<string, Parsed>) => [...m.values()].find((e) => e.uid.startsWith(uid(runs.strip!.id)))!;
    expect(event(before).status).toBe('TENTATIVE');
    // Common practice: the same reading (within 0.001) over three days, inside the sugar-wash range 0.990–1.000.
    const now = Date.now();
    for (const daysAgo of [3.5, 2.5, 1.5, 0.2]) {
      const r = await distiller.post(`/api/ferments/${fermentId}/readings`, {
        value: 0.996,
        unit: 'sg',
        method: 'hydrometer',
        sampleTemp: 20,
        takenAt: new Date(now - daysAgo * DAY).toISOString(),
      });
      expect(r.status, r.text).toBe(201);
    }
    const after = event(parseBoth((await fetchFeed(created.json.url)).text));
    expect(after.status).toBe('CONFIRMED');
    expect(after.sequence).toBe(event(before).sequence);
    expect(after.description).toContain('confirmed stable');
  });

  it('raises SEQUENCE and moves DTSTART when the run is moved on the board', async () => {
    const created = await staff.post('/api/feeds', { scope: 'workspace' });
    const event = (m: Map<string, Parsed>) => [...m.values()].find((e) => e.uid.startsWith(uid(runs.clean!.id)))!;
    const before = event(parseBoth((await fetchFeed(created.json.url)).text));
    const newStart = new Date(runs.clean!.startsAt.getTime() + 26 * HOUR);
    const moved = await planner.patch(`/api/runs/${runs.clean!.id}`, { version: 1, startsAt: newStart.toISOString() });
    expect(moved.status, moved.text).toBe(200);
    const after = event(parseBoth((await fetchFeed(created.json.url)).text));
    expect(after.uid).toBe(before.uid);
    expect(after.sequence).toBe(before.sequence + 1);
    expect(after.start).toBe(newStart.getTime());
  });

  it("lets each person see and revoke their own feeds; a manager sees and revokes everyone's", async () => {
    const plannersFeed = await planner.post('/api/feeds', { scope: 'workspace', name: 'Planner desk' });
    expect(plannersFeed.status).toBe(201);
    const distillerList = await distiller.get('/api/feeds');
    expect(distillerList.json.feeds.map((f: { name: string }) => f.name)).not.toContain('Planner desk');
    expect((await distiller.del(`/api/feeds/${plannersFeed.json.feed.id}`)).status).toBe(404);
    // Only a manager may make a feed of someone else's runs.
    expect((await staff.post('/api/feeds', { scope: 'person', personId: ws.users.distiller.id })).status).toBe(403);
    const manager = await ws.client('manager');
    const all = await manager.get('/api/feeds');
    expect(all.json.feeds.map((f: { name: string }) => f.name)).toContain('Planner desk');
    expect((await manager.del(`/api/feeds/${plannersFeed.json.feed.id}`)).status).toBe(204);
    expect((await fetchFeed(plannersFeed.json.url)).status).toBe(404);
    // A still of another distillery cannot be subscribed to.
    const other = await createTestWorkspace('Other Distillery');
    const [s] = await getDb()
      .insert(t.stills)
      .values({
        workspaceId: other.workspaceId,
        name: 'Theirs',
        kind: 'pot',
        capacityLitres: 1000,
        heatingKw: 20,
        operatingHours: ALL_WEEK,
        typicalMinutes: {},
      })
      .$returningId();
    expect((await staff.post('/api/feeds', { scope: 'still', stillId: s!.id })).status).toBe(400);
  });

  it('records when a feed was last fetched', async () => {
    const created = await staff.post('/api/feeds', { scope: 'workspace', name: 'Fetched one' });
    await fetchFeed(created.json.url);
    const list = await staff.get('/api/feeds');
    const row = list.json.feeds.find((f: { id: number }) => f.id === created.json.feed.id);
    expect(row.lastFetchedAt).not.toBeNull();
  });
});
