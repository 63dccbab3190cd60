import { describe, it, expect, beforeAll } from 'vitest';
import type { Client } from '../helpers/api';
import { addFerment, at, boardFixture, iso, type BoardFixture } from '../helpers/board-fixture';
import { eq, sql } from 'drizzle-orm';
import { gunzipSync } from 'node:zlib';
import { get as httpGet } from 'node:http';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { FINGERPRINT_TTL_MS } from '../../src/server/snapshot-cache';

const DAY = 86_400_000;

describe('board API', () => {
  let fx: BoardFixture;
  let planner: Client;
  let stalled: number;
  let runId: number;
  beforeAll(async () => {
    fx = await boardFixture('Board API Distillery');
    planner = await fx.client('planner');
    // A grain wash pitched at 1.065 holding at 1.022 for days: stuck far above the 1.002–1.008 finish (common practice).
    stalled = await addFerment(fx, { code: 'ST-1', fermenter: 0, pitchedDaysAgo: 9, og: 1.065, holdAt: 1.022 });
    const r = await planner.post('/api/runs', {
      stillId: fx.stills.ws1,
      type: 'stripping',
      startsAt: iso(at(3, 6)),
      endsAt: iso(at(3, 12)),
      ferments: [{ fermentId: stalled, litres: 2400 }],
    });
    expect(r.status, r.text).toBe(201);
    runId = r.json.run.id;
    expect(r.json.warnings.map((w: { code: string }) => w.code)).toContain('ferment_stalled');
  });

  it('returns stills, runs with their washes, ferments with forecast state, fermenters and people for a range', async () => {
    const staff = await fx.client('staff');
    const r = await staff.get(`/api/board?from=${encodeURIComponent(iso(at(-1)))}&to=${encodeURIComponent(iso(at(7)))}`);
    expect(r.status, r.text).toBe(200);
    expect(r.json.stills.map((s: { name: string }) => s.name)).toEqual(['Wash Still 1', 'Wash Still 2', 'Small Still']);
    const run = r.json.runs.find((x: { id: number }) => x.id === runId);
    expect(run.ferments).toEqual([{ fermentId: stalled, litres: 2400 }]);
    const f = r.json.ferments.find((x: { id: number }) => x.id === stalled);
    expect(f.status).toBe('stalled');
    expect(r.json.fermenters).toHaveLength(3);
    expect(r.json.people.length).toBeGreaterThanOrEqual(4);
  });

  it('refuses a range that is backwards or longer than 50 days', async () => {
    expect((await planner.get(`/api/board?from=${encodeURIComponent(iso(at(7)))}&to=${encodeURIComponent(iso(at(1)))}`)).status).toBe(400);
    expect((await planner.get(`/api/board?from=${encodeURIComponent(iso(at(0)))}&to=${encodeURIComponent(iso(at(60)))}`)).status).toBe(400);
    expect((await planner.get('/api/board?from=yesterday&to=tomorrow')).status).toBe(400);
  });

  it('proposes the earliest free slots for a run on a stalled wash after a fresh stable period, and moves it in one step', async () => {
    const r = await planner.get(`/api/board/suggestions?runId=${runId}`);
    expect(r.status, r.text).toBe(200);
    const notBefore = Date.parse(r.json.notBefore);
    expect(notBefore).toBeGreaterThanOrEqual(Date.now() + 3 * DAY - 60_000); // 3 stable days (product default)
    expect(r.json.slots.length).toBeGreaterThan(0);
    for (const s of r.json.slots) {
      expect(Date.parse(s.startsAt)).toBeGreaterThanOrEqual(notBefore);
      // The small still cannot take a 2400 L charge.
      expect(s.stillId).not.toBe(fx.stills.small);
    }
    const slot = r.json.slots[0];
    const current = await planner.get(`/api/runs/${runId}`);
    const moved = await planner.patch(`/api/runs/${runId}`, {
      version: current.json.run.version,
      stillId: slot.stillId,
      startsAt: slot.startsAt,
      endsAt: slot.endsAt,
    });
    expect(moved.status, moved.text).toBe(200);
    expect(moved.json.run.startsAt).toBe(slot.startsAt);
    expect(moved.json.run.sequence).toBe(current.json.run.sequence + 1);
    const staff = await fx.client('staff');
    expect((await staff.get(`/api/board/suggestions?runId=${runId}`)).status).toBe(403);
  });

  it('answers gzip with a validator; a refresh gets 304 until something changes, and a change of ours shows at once', async () => {
    const path = `/api/board?from=${encodeURIComponent(iso(at(-1)))}&to=${encodeURIComponent(iso(at(7)))}`;
    // Raw bytes over node:http (fetch would unpack them for us).
    const raw = await new Promise<{ status: number; headers: Record<string, string | string[] | undefined>; body: Buffer }>((resolve, reject) => {
      const req = httpGet(planner.base + path, { headers: { cookie: planner.cookie, 'accept-encoding': 'gzip' } }, (res) => {
        const chunks: Buffer[] = [];
        res.on('data', (c: Buffer) => chunks.push(c));
        res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks) }));
      });
      req.on('error', reject);
    });
    expect(raw.status).toBe(200);
    expect(raw.headers['content-encoding']).toBe('gzip');
    expect(raw.headers['cache-control']).toBe('private, no-cache');
    const unpacked = JSON.parse(gunzipSync(raw.body).toString('utf8'));
    expect(unpacked.runs.some((x: { id: number }) => x.id === runId)).toBe(true);
    const etag = String(raw.headers.etag);
    expect(etag).toMatch(/^W\/".+"$/);
    const plain = await planner.get(path, { 'accept-encoding': 'identity' });
    expect(plain.headers.get('content-encoding')).toBeNull();
    expect(plain.json).toEqual(unpacked);

    expect((await planner.get(path, { 'if-none-match': etag })).status).toBe(304);

    // Our own change through the API: the very next refresh has it.
    const current = await planner.get(`/api/runs/${runId}`);
    const saved = await planner.patch(`/api/runs/${runId}`, { version: current.json.run.version, notes: 'Check the wash pH first' });
    expect(saved.status, saved.text).toBe(200);
    const after = await planner.get(path, { 'if-none-match': etag });
    expect(after.status).toBe(200);
    expect(after.json.runs.find((x: { id: number }) => x.id === runId).notes).toBe('Check the wash pH first');
    const etag2 = after.headers.get('etag')!;
    expect(etag2).not.toBe(etag);

    // A change this process did not make (another instance, another node): asked for fresh it
    // shows at once; otherwise within FINGERPRINT_TTL_MS.
    await getDb()
      .update(t.runs)
      .set({ notes: 'Changed elsewhere', version: sql`${t.runs.version} + 1` })
      .where(eq(t.runs.id, runId));
    const fresh = await planner.get(path, { 'if-none-match': etag2, 'cache-control': 'no-cache' });
    expect(fresh.status).toBe(200);
    expect(fresh.json.runs.find((x: { id: number }) => x.id === runId).notes).toBe('Changed elsewhere');
    await getDb()
      .update(t.runs)
      .set({ notes: 'Changed elsewhere again', version: sql`${t.runs.version} + 1` })
      .where(eq(t.runs.id, runId));
    await new Promise((r) => setTimeout(r, FINGERPRINT_TTL_MS + 200));
    const later = await planner.get(path);
    expect(later.json.runs.find((x: { id: number }) => x.id === runId).notes).toBe('Changed elsewhere again');
  });
});
