/**
 * A second level under the in-memory VEVENT cache: blocks the `ics` package wrote are kept in
 * calendar_event_blocks, so the first feed build after a restart (or on another instance)
 * reads them back instead of writing thousands of events again. Content-addressed by the
 * workspace and the event's cache key (everything written into it), so a stored block is
 * never stale; blocks older than BLOCK_MAX_AGE_DAYS are pruned as new ones arrive.
 */
import { createHash } from 'node:crypto';
import { and, eq, inArray, lt, sql } from 'drizzle-orm';
import { getDb } from '../db/client';
import { calendarEventBlocks } from '../db/schema';
import { buildFeed, buildFeedAsync, feedEventKeys, sharedEventCache, type EventCache } from '../lib/calendar';

export const BLOCK_MAX_AGE_DAYS = 120;
const CHUNK = 500;
/** From this many missing blocks on, read the workspace's blocks whole instead of by key. */
const WHOLE_READ_FROM = 200;

const hashOf = (workspaceId: number, key: string) => createHash('sha256').update(`${workspaceId}|${key}`).digest('hex');

type FeedInput = Parameters<typeof buildFeedAsync>[0];

export interface StoredBuild {
  body: string;
  fromStore: number;
  written: number;
}

/**
 * Build a feed's text: events missing from the memory cache are looked up in the database
 * first; those still missing are written by `ics`, then stored for next time.
 */
export async function buildFeedWithStore(workspaceId: number, input: FeedInput, cache: EventCache = sharedEventCache): Promise<StoredBuild> {
  const db = getDb();
  const keys = feedEventKeys(input);
  const missing = [...new Set(keys.filter((k) => cache.get(k) === undefined))];
  const byHash = new Map(missing.map((k) => [hashOf(workspaceId, k), k]));
  let fromStore = 0;
  const hashes = [...byHash.keys()];
  const take = (rows: Array<{ keyHash: string; body: string }>) => {
    for (const r of rows) {
      const key = byHash.get(r.keyHash);
      if (key === undefined) continue;
      cache.set(key, r.body);
      byHash.delete(r.keyHash);
      fromStore++;
    }
  };
  const columns = { keyHash: calendarEventBlocks.keyHash, body: calendarEventBlocks.body };
  if (hashes.length >= WHOLE_READ_FROM) {
    // A cold cache (a restart): reading the workspace's blocks whole is several times quicker
    // than looking up thousands of keys (they are pruned, so "whole" stays a few feeds' worth).
    take(await db.select(columns).from(calendarEventBlocks).where(eq(calendarEventBlocks.workspaceId, workspaceId)));
  } else {
    for (let i = 0; i < hashes.length; i += CHUNK) {
      take(
        await db
          .select(columns)
          .from(calendarEventBlocks)
          .where(and(eq(calendarEventBlocks.workspaceId, workspaceId), inArray(calendarEventBlocks.keyHash, hashes.slice(i, i + CHUNK)))),
      );
    }
  }
  // Everything found: one plain pass; else the batched build that yields between ics batches.
  const body = byHash.size === 0 ? buildFeed(input, cache) : await buildFeedAsync(input, cache);
  // What ics wrote just now: keep it for the next cold build.
  const fresh = [...byHash.entries()].flatMap(([keyHash, key]) => {
    const block = cache.get(key);
    return block === undefined ? [] : [{ workspaceId, keyHash, body: block }];
  });
  for (let i = 0; i < fresh.length; i += CHUNK) {
    // Another instance may have stored the same block meanwhile: the same content, keep either.
    await db
      .insert(calendarEventBlocks)
      .values(fresh.slice(i, i + CHUNK))
      .onDuplicateKeyUpdate({ set: { keyHash: sql`${calendarEventBlocks.keyHash}` } });
  }
  if (fresh.length) await pruneBlocks(workspaceId);
  return { body, fromStore, written: fresh.length };
}

/** Drop blocks older than BLOCK_MAX_AGE_DAYS (a bounded batch per call). */
export async function pruneBlocks(workspaceId: number, now = new Date()): Promise<number> {
  const cutoff = new Date(now.getTime() - BLOCK_MAX_AGE_DAYS * 86_400_000);
  const [res] = (await getDb()
    .delete(calendarEventBlocks)
    .where(and(eq(calendarEventBlocks.workspaceId, workspaceId), lt(calendarEventBlocks.createdAt, cutoff)))
    .limit(5000)) as unknown as [{ affectedRows: number }];
  return res?.affectedRows ?? 0;
}
