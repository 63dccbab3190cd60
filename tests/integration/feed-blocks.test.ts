import { describe, it, expect, beforeAll } from 'vitest';
import ICAL from 'ical.js';
import { eq, sql } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { EventCache, buildFeed, describeRunEvent, runEventTitle, uidForRun, type FeedEvent } from '../../src/lib/calendar';
import { buildFeedWithStore, pruneBlocks, BLOCK_MAX_AGE_DAYS } from '../../src/server/feed-blocks';
import { createTestWorkspace, type TestWorkspace } from '../helpers/api';

const HOUR = 3_600_000;

function events(n: number, workspaceId: number, changed = -1): FeedEvent[] {
  const base = Date.UTC(2026, 11, 7, 6);
  return Array.from({ length: n }, (_, i) => {
    const start = new Date(base + i * 8 * HOUR);
    return {
      uid: uidForRun(i + 1, workspaceId),
      start,
      end: new Date(start.getTime() + 5 * HOUR),
      title: runEventTitle('stripping', `Still ${(i % 3) + 1}`),
      description: describeRunEvent({
        runType: 'stripping',
        stillName: `Still ${(i % 3) + 1}`,
        ferments: [],
        chargeLitres: 2000,
        operatorName: null,
        warnings: [],
        url: `https://plateau.example/runs/${i + 1}`,
        timeZone: 'Europe/London',
      }),
      location: `Still ${(i % 3) + 1}`,
      url: `https://plateau.example/runs/${i + 1}`,
      status: 'TENTATIVE',
      sequence: i === changed ? 1 : 0,
      lastModified: new Date(base - 86_400_000),
    };
  });
}

/** Stored VEVENT blocks: the first build after a restart reads them instead of writing every event again. */
describe('calendar event blocks kept in the database', () => {
  let ws: TestWorkspace;
  const now = new Date(Date.UTC(2026, 11, 6, 12));
  beforeAll(async () => {
    ws = await createTestWorkspace('Feed blocks');
  });

  it('stores what ics wrote, and a cold cache is filled from the store with the same text', async () => {
    // 250 events: a cold cache reads the workspace's blocks whole (from 200 missing); one changed event is looked up by key.
    const input = { name: 'Feed blocks', events: events(250, ws.workspaceId), now };
    const first = await buildFeedWithStore(ws.workspaceId, input, new EventCache());
    expect(first.fromStore).toBe(0);
    expect(first.written).toBe(250);
    const [{ n }] = (await getDb()
      .select({ n: sql<number>`COUNT(*)` })
      .from(t.calendarEventBlocks)
      .where(eq(t.calendarEventBlocks.workspaceId, ws.workspaceId))) as [{ n: number }];
    expect(Number(n)).toBe(250);

    // "After a restart": an empty memory cache. Every block comes from the store; ics writes none.
    const cold = new EventCache();
    const again = await buildFeedWithStore(ws.workspaceId, input, cold);
    expect(again.fromStore).toBe(250);
    expect(again.written).toBe(0);
    expect(again.body).toBe(first.body);
    // The same as a build without any store, and a calendar parser reads all 250 events (ical.js).
    expect(again.body).toBe(buildFeed(input, new EventCache()));
    expect(new ICAL.Component(ICAL.parse(again.body)).getAllSubcomponents('vevent')).toHaveLength(250);

    // One event changed: only that one is written and stored.
    const warm = new EventCache();
    await buildFeedWithStore(ws.workspaceId, input, warm);
    const changed = await buildFeedWithStore(ws.workspaceId, { ...input, events: events(250, ws.workspaceId, 7) }, warm);
    expect(changed.fromStore).toBe(0);
    expect(changed.written).toBe(1);
  });

  it('keeps workspaces apart: the same event text in another workspace is not served from here', async () => {
    const other = await createTestWorkspace('Feed blocks other');
    const input = { name: 'x', events: events(5, ws.workspaceId), now };
    const built = await buildFeedWithStore(other.workspaceId, input, new EventCache());
    expect(built.fromStore).toBe(0);
    expect(built.written).toBe(5);
  });

  it(`prunes blocks older than ${BLOCK_MAX_AGE_DAYS} days`, async () => {
    const old = await createTestWorkspace('Feed blocks prune');
    await buildFeedWithStore(old.workspaceId, { name: 'x', events: events(6, old.workspaceId), now }, new EventCache());
    await getDb()
      .update(t.calendarEventBlocks)
      .set({ createdAt: new Date(Date.now() - (BLOCK_MAX_AGE_DAYS + 1) * 86_400_000) })
      .where(eq(t.calendarEventBlocks.workspaceId, old.workspaceId));
    expect(await pruneBlocks(old.workspaceId)).toBe(6);
    const rebuilt = await buildFeedWithStore(old.workspaceId, { name: 'x', events: events(6, old.workspaceId), now }, new EventCache());
    expect(rebuilt.written).toBe(6);
  });
});
