/**
 * Plateau on a three-node MariaDB Galera cluster with one app instance per node
 * (started by scripts/test-cluster.sh). Row locks are node-local on Galera, so these tests
 * prove the booking guarantee, the last-manager rule and the outbox claims hold across nodes, and that a node can
 * leave and rejoin without losing anything.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import mysql from 'mysql2/promise';
import { execFileSync } from 'node:child_process';
import { getDb, closeDb } from '../../src/db/client';
import { FINGERPRINT_TTL_MS } from '../../src/server/snapshot-cache';
import * as t from '../../src/db/schema';
import { enqueue } from '../../src/server/mail/outbox';
import { readMailbox } from '../../src/server/mail/fake-smtp';
import { Client, createTestWorkspace, type TestWorkspace } from '../helpers/api';

const APPS = (process.env.CLUSTER_APP_URLS ?? '').split(',').filter(Boolean);
const NODES = (process.env.CLUSTER_DB_URLS ?? '').split(',').filter(Boolean);
const MAILBOX = process.env.MAILBOX_DIR ?? '.data/cluster-mailbox';
const figures: Record<string, unknown> = {};

async function onNode<T>(i: number, fn: (c: mysql.Connection) => Promise<T>): Promise<T> {
  const c = await mysql.createConnection({ uri: NODES[i]!, timezone: 'Z' });
  try {
    return await fn(c);
  } finally {
    await c.end();
  }
}

/** Pairs of non-cancelled runs on one still whose [start, end) overlap, as seen by one node. */
async function overlapsOnNode(i: number, workspaceId: number): Promise<number> {
  return onNode(i, async (c) => {
    const [rows] = await c.query(
      `SELECT COUNT(*) AS n FROM runs a JOIN runs b ON a.still_id = b.still_id AND a.id < b.id
       WHERE a.workspace_id = ? AND a.status <> 'cancelled' AND b.status <> 'cancelled'
         AND a.starts_at < b.ends_at AND b.starts_at < a.ends_at`,
      [workspaceId],
    );
    return Number((rows as Array<{ n: number }>)[0]!.n);
  });
}

async function waitForSync(): Promise<void> {
  // wsrep_sync_wait makes a read wait until the node has applied everything committed before it.
  for (let i = 0; i < NODES.length; i++) await onNode(i, (c) => c.query('SET SESSION wsrep_sync_wait = 1').then(() => c.query('SELECT 1')));
}

describe.runIf(APPS.length >= 2 && NODES.length === 3)('Plateau on a Galera cluster', () => {
  let ws: TestWorkspace;
  let planners: Client[];
  let stillId: number;
  const day = (d: number, h: number) => {
    const x = new Date();
    x.setUTCHours(0, 0, 0, 0);
    return new Date(x.getTime() + d * 86400e3 + h * 3600e3);
  };

  beforeAll(async () => {
    ws = await createTestWorkspace('Cluster', { timeZone: 'UTC' });
    const [still] = await getDb()
      .insert(t.stills)
      .values({
        workspaceId: ws.workspaceId,
        name: 'Cluster still',
        kind: 'pot',
        capacityLitres: 2000,
        heatingKw: 40,
        operatingHours: [0, 1, 2, 3, 4, 5, 6].map((weekday) => ({ weekday, open: '00:00', close: '24:00' })),
        typicalMinutes: { stripping: 240 },
      })
      .$returningId();
    stillId = still!.id;
    await waitForSync();
    // The same planner signed in once per instance: sessions live in the database, so any instance accepts any.
    planners = await Promise.all(APPS.map((url) => new Client(url).signIn(ws.users.planner.email)));
  });
  afterAll(async () => {
    console.log('[cluster figures]', JSON.stringify(figures));
    await closeDb();
  });

  it('books one run when 30 planners race for the same slot through different instances and nodes', async () => {
    const startsAt = day(20, 6).toISOString();
    const started = performance.now();
    const results = await Promise.all(
      Array.from({ length: 30 }, (_, i) =>
        planners[i % planners.length]!.post('/api/runs', { stillId, type: 'maintenance', startsAt, durationMinutes: 120, notes: `race ${i}` }),
      ),
    );
    const statuses = results.map((r) => r.status);
    figures.raceBookings = {
      attempts: 30,
      created: statuses.filter((s) => s === 201).length,
      conflicts: statuses.filter((s) => s === 409).length,
      ms: Math.round(performance.now() - started),
    };
    expect(statuses.filter((s) => s === 201)).toHaveLength(1);
    expect(statuses.filter((s) => s !== 201 && s !== 409)).toEqual([]);
    for (const r of results.filter((x) => x.status === 409)) expect(r.json.error.code).toBe('conflict');
    await waitForSync();
    for (let i = 0; i < NODES.length; i++) expect(await overlapsOnNode(i, ws.workspaceId)).toBe(0);
  });

  it('lets exactly one of 24 concurrent moves into the same slot succeed', async () => {
    const ids: number[] = [];
    for (let i = 0; i < 24; i++) {
      const r = await planners[i % planners.length]!.post('/api/runs', {
        stillId,
        type: 'maintenance',
        startsAt: day(30 + i, 6).toISOString(),
        durationMinutes: 120,
      });
      expect(r.status).toBe(201);
      ids.push(r.json.run.id);
    }
    await waitForSync();
    const target = day(28, 8);
    const results = await Promise.all(
      ids.map((id, i) =>
        planners[i % planners.length]!.patch(`/api/runs/${id}`, {
          version: 1,
          startsAt: target.toISOString(),
          endsAt: new Date(target.getTime() + 2 * 3600e3).toISOString(),
        }),
      ),
    );
    const statuses = results.map((r) => r.status);
    figures.raceMoves = { attempts: ids.length, moved: statuses.filter((s) => s === 200).length, conflicts: statuses.filter((s) => s === 409).length };
    expect(statuses.filter((s) => s === 200)).toHaveLength(1);
    expect(statuses.filter((s) => s !== 200 && s !== 409)).toEqual([]);
    await waitForSync();
    for (let i = 0; i < NODES.length; i++) expect(await overlapsOnNode(i, ws.workspaceId)).toBe(0);
  });

  it('shows a move made through one instance on a board served by another: at once when asked fresh, else within the fingerprint TTL', async () => {
    const created = await planners[0]!.post('/api/runs', { stillId, type: 'maintenance', startsAt: day(60, 6).toISOString(), durationMinutes: 120 });
    expect(created.status, created.text).toBe(201);
    const run = created.json.run;
    const path = `/api/board?from=${encodeURIComponent(day(58, 0).toISOString())}&to=${encodeURIComponent(day(65, 0).toISOString())}`;
    const startOn = async (client: Client, headers: Record<string, string> = {}) =>
      (await client.get(path, headers)).json.runs.find((r: { id: number }) => r.id === run.id)?.startsAt;
    await waitForSync();
    // Instance 2 caches the board with the run at 06:00 ...
    expect(await startOn(planners[1]!, { 'cache-control': 'no-cache' })).toBe(day(60, 6).toISOString());
    // ... the run moves through instance 1 ...
    const moved = await planners[0]!.patch(`/api/runs/${run.id}`, {
      version: run.version,
      startsAt: day(61, 8).toISOString(),
      endsAt: day(61, 10).toISOString(),
    });
    expect(moved.status, moved.text).toBe(200);
    await waitForSync();
    // ... and instance 2 shows it at once to a client asking fresh (the island does after its own changes).
    expect(await startOn(planners[1]!, { 'cache-control': 'no-cache' })).toBe(day(61, 8).toISOString());
    const again = await planners[0]!.patch(`/api/runs/${run.id}`, {
      version: moved.json.run.version,
      startsAt: day(62, 8).toISOString(),
      endsAt: day(62, 10).toISOString(),
    });
    expect(again.status, again.text).toBe(200);
    await waitForSync();
    await new Promise((r) => setTimeout(r, FINGERPRINT_TTL_MS + 300));
    expect(await startOn(planners[1]!)).toBe(day(62, 8).toISOString());
  });

  it('keeps a manager when the two managers are demoted at the same moment through instances on different nodes', async () => {
    const w = await createTestWorkspace('Cluster managers', { timeZone: 'UTC' });
    await waitForSync();
    const first = await new Client(APPS[0]!).signIn(w.users.manager.email);
    expect((await first.patch(`/api/members/${w.users.planner.id}`, { role: 'manager' })).status).toBe(200);
    await waitForSync();
    const second = await new Client(APPS[1]!).signIn(w.users.planner.email); // a manager now, on another node
    const ids = { first: w.users.manager.id, second: w.users.planner.id };
    const managersPerNode = () =>
      Promise.all(
        NODES.map((_, i) =>
          onNode(i, async (c) => {
            await c.query('SET SESSION wsrep_sync_wait = 1');
            const [rows] = await c.query("SELECT COUNT(*) AS n FROM memberships WHERE workspace_id = ? AND role = 'manager'", [w.workspaceId]);
            return Number((rows as Array<{ n: number }>)[0]!.n);
          }),
        ),
      );
    const losers: number[] = [];
    const rounds = 10;
    for (let round = 0; round < rounds; round++) {
      const [r1, r2] = await Promise.all([
        first.patch(`/api/members/${ids.second}`, { role: 'distiller' }),
        second.patch(`/api/members/${ids.first}`, { role: 'distiller' }),
      ]);
      const statuses = [r1.status, r2.status];
      expect(
        statuses.filter((s) => s === 200),
        `round ${round}: ${JSON.stringify([r1.json, r2.json])}`,
      ).toHaveLength(1);
      const loser = r1.status === 200 ? r2 : r1;
      expect([403, 409]).toContain(loser.status);
      losers.push(loser.status);
      await waitForSync();
      expect(await managersPerNode()).toEqual(NODES.map(() => 1));
      const winner = r1.status === 200 ? first : second;
      const demoted = r1.status === 200 ? ids.second : ids.first;
      expect((await winner.patch(`/api/members/${demoted}`, { role: 'manager' })).status).toBe(200);
      await waitForSync();
    }
    figures.raceDemotions = { rounds, loserStatuses: losers, refusedByLastManagerRule: losers.filter((s) => s === 409).length };
  });

  it('sends every outbox message exactly once with a sender on every instance', async () => {
    const before = new Set(readMailbox(MAILBOX).map((m) => m.messageId));
    const ids: string[] = [];
    const db = getDb();
    for (let batch = 0; batch < 4; batch++) {
      await db.transaction(async (tx) => {
        for (let i = 0; i < 15; i++) {
          ids.push(
            await enqueue(tx, {
              workspaceId: ws.workspaceId,
              kind: 'cluster_test',
              to: `reader${i}@test.example`,
              subject: `Cluster message ${batch}-${i}`,
              text: 'Plateau cluster test.',
              html: '<p>Plateau cluster test.</p>',
            }),
          );
        }
      });
    }
    let got: string[] = [];
    for (let i = 0; i < 120; i++) {
      got = readMailbox(MAILBOX)
        .map((m) => m.messageId ?? '')
        .filter((m) => ids.includes(m) && !before.has(m));
      if (new Set(got).size === ids.length) break;
      await new Promise((r) => setTimeout(r, 500));
    }
    await new Promise((r) => setTimeout(r, 2000)); // give any duplicate time to arrive
    got = readMailbox(MAILBOX)
      .map((m) => m.messageId ?? '')
      .filter((m) => ids.includes(m));
    const senders = await onNode(0, async (c) => {
      const [rows] = await c.query('SELECT DISTINCT claimed_by AS s FROM mail_outbox WHERE kind = ? AND claimed_by IS NOT NULL', ['cluster_test']);
      return (rows as Array<{ s: string }>).map((r) => r.s);
    });
    figures.outbox = { messages: ids.length, delivered: got.length, distinct: new Set(got).size, senderInstances: senders.length };
    expect(new Set(got).size).toBe(ids.length);
    expect(got).toHaveLength(ids.length);
    expect(senders.length).toBeGreaterThanOrEqual(1);
  });

  it('survives a node leaving and rejoining with nothing lost', async () => {
    execFileSync('bash', ['scripts/cluster.sh', 'stop-node', '3'], { stdio: 'ignore' });
    let created = 0;
    let refusedWhileDown = 0;
    try {
      for (let i = 0; i < 12; i++) {
        const client = planners[i % 2]!; // instances on nodes 1 and 2
        const r = await client.post('/api/runs', { stillId, type: 'cleaning', startsAt: day(60 + i, 6).toISOString(), durationMinutes: 60 });
        expect(r.status).toBe(201);
        created++;
      }
      if (planners[2]) {
        const r = await planners[2].get('/api/health');
        expect(r.status).toBe(503);
        refusedWhileDown++;
      }
    } finally {
      execFileSync('bash', ['scripts/cluster.sh', 'start-node', '3'], { stdio: 'ignore' });
    }
    await waitForSync();
    const counts = await Promise.all(
      NODES.map((_, i) =>
        onNode(i, async (c) => {
          const [rows] = await c.query(
            'SELECT COUNT(*) AS n, COALESCE(SUM(CRC32(CONCAT(id, starts_at, ends_at, version))), 0) AS h FROM runs WHERE workspace_id = ?',
            [ws.workspaceId],
          );
          return `${(rows as any)[0].n}:${(rows as any)[0].h}`;
        }),
      ),
    );
    figures.nodeRejoin = { createdWhileNodeDown: created, healthWhileDown503: refusedWhileDown, perNode: counts };
    expect(new Set(counts).size).toBe(1);
    // The instance on the rejoined node serves again.
    if (planners[2]) {
      let ok = false;
      for (let i = 0; i < 40 && !ok; i++) {
        ok = (await planners[2].get('/api/health')).status === 200;
        if (!ok) await new Promise((r) => setTimeout(r, 500));
      }
      expect(ok).toBe(true);
      const r = await planners[2].post('/api/runs', { stillId, type: 'cleaning', startsAt: day(75, 6).toISOString(), durationMinutes: 60 });
      expect(r.status).toBe(201);
    }
  });
});
