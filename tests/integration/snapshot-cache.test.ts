import { describe, it, expect, beforeAll } from 'vitest';
import { eq } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { SnapshotCache, forgetFingerprints, currentFingerprint, workspaceFingerprint } from '../../src/server/snapshot-cache';
import { createTestWorkspace, type TestWorkspace } from '../helpers/api';

/** The cache behind the board and the feeds, against the real database. */
describe('workspace snapshot cache', () => {
  let ws: TestWorkspace;
  let stillId: number;
  beforeAll(async () => {
    ws = await createTestWorkspace('Snapshot Cache Distillery');
    const [s] = await getDb()
      .insert(t.stills)
      .values({
        workspaceId: ws.workspaceId,
        name: 'Cache Still',
        kind: 'pot',
        capacityLitres: 1000,
        heatingKw: 30,
        operatingHours: [],
        cleaningAfterRunMinutes: 0,
        typicalMinutes: {},
        position: 0,
      })
      .$returningId();
    stillId = s!.id;
  });

  it('builds once for many concurrent requests of the same missing value', async () => {
    const cache = new SnapshotCache<number>(60_000);
    let builds = 0;
    const build = async () => {
      builds++;
      await new Promise((r) => setTimeout(r, 50));
      return 42;
    };
    const now = new Date();
    const answers = await Promise.all(Array.from({ length: 20 }, () => cache.get(ws.workspaceId, 'k', now, build)));
    expect(answers).toEqual(Array(20).fill(42));
    expect(builds).toBe(1);
    // And reuses it afterwards.
    expect(await cache.get(ws.workspaceId, 'k', now, build)).toBe(42);
    expect(builds).toBe(1);
  });

  it("rebuilds after a change that this process announces, and after a fresh read sees another writer's change", async () => {
    const cache = new SnapshotCache<string>(60_000);
    const build = async () => {
      const [row] = await getDb().select({ name: t.stills.name }).from(t.stills).where(eq(t.stills.id, stillId));
      return row!.name;
    };
    expect(await cache.get(ws.workspaceId, 'name', new Date(), build)).toBe('Cache Still');

    // A write from this process: the middleware forgets fingerprints after every state-changing request.
    await getDb().update(t.stills).set({ name: 'Cache Still A' }).where(eq(t.stills.id, stillId));
    forgetFingerprints();
    expect(await cache.get(ws.workspaceId, 'name', new Date(), build)).toBe('Cache Still A');

    // A write from elsewhere, not announced: a fresh read finds it at once.
    await getDb().update(t.stills).set({ name: 'Cache Still B' }).where(eq(t.stills.id, stillId));
    expect(await cache.get(ws.workspaceId, 'name', new Date(), build, { fresh: true })).toBe('Cache Still B');
  });

  it('trusts a fingerprint read for its time-to-live only', async () => {
    forgetFingerprints();
    const t0 = Date.now();
    const first = await currentFingerprint(ws.workspaceId, t0);
    await getDb()
      .update(t.stills)
      .set({ name: `Cache Still ${t0}` })
      .where(eq(t.stills.id, stillId));
    // Within the TTL the remembered value stands; after it, the database is asked again.
    expect(await currentFingerprint(ws.workspaceId, t0 + 1)).toBe(first);
    const later = await currentFingerprint(ws.workspaceId, t0 + 60_000);
    expect(later).not.toBe(first);
    expect(later).toBe(await workspaceFingerprint(ws.workspaceId));
  });
});
