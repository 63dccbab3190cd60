import { describe, it, expect, beforeAll } from 'vitest';
import { and, eq, ne } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import type { Client } from '../helpers/api';
import { addFerment, at, boardFixture, iso, type BoardFixture } from '../helpers/board-fixture';

const MIN = 60_000;

async function book(c: Client, body: Record<string, unknown>) {
  const r = await c.post('/api/runs', body);
  expect(r.status, r.text).toBe(201);
  return r.json.run as { id: number; version: number; sequence: number; startsAt: string; endsAt: string; stillId: number };
}

describe('runs API', () => {
  let fx: BoardFixture;
  let planner: Client;
  let distiller: Client;
  let staff: Client;
  let manager: Client;
  beforeAll(async () => {
    fx = await boardFixture();
    [planner, distiller, staff, manager] = await Promise.all([fx.client('planner'), fx.client('distiller'), fx.client('staff'), fx.client('manager')]);
  });

  it("books a run with the default length: heat-up of the charge plus the still's typical minutes", async () => {
    // REFERENCES §7 formula, worked by hand [computed]: 2400 L × 0.9982 kg/L = 2395.7 kg; bubble point of an
    // 8 % vol wash 94.0 °C (Perry's), so ΔT = 74 K; 2395.7 × 4.18 × 74 = 741 030 kJ over 60 kW × η 0.85 = 51 kW
    // -> 14 530 s = 242 min heat-up, plus the still's 240 typical minutes for a stripping run.
    const run = await book(planner, { stillId: fx.stills.ws2, type: 'stripping', startsAt: iso(at(20, 6)), chargeLitres: 2400 });
    const minutes = (Date.parse(run.endsAt) - Date.parse(run.startsAt)) / MIN;
    expect(minutes).toBeGreaterThanOrEqual(240 + 235);
    expect(minutes).toBeLessThanOrEqual(240 + 250);
  });

  it('refuses an overlapping booking with 409, counting the cleaning slot after a run as booked', async () => {
    const first = await book(planner, { stillId: fx.stills.ws1, type: 'stripping', startsAt: iso(at(2, 6)), endsAt: iso(at(2, 12)) });
    const overlap = await planner.post('/api/runs', { stillId: fx.stills.ws1, type: 'stripping', startsAt: iso(at(2, 10)), endsAt: iso(at(2, 14)) });
    expect(overlap.status).toBe(409);
    expect(overlap.json.overlapping.id).toBe(first.id);
    // 12:00–13:00 is Wash Still 1's cleaning slot after the first run.
    const inCleaning = await planner.post('/api/runs', { stillId: fx.stills.ws1, type: 'stripping', startsAt: iso(at(2, 12)), endsAt: iso(at(2, 15)) });
    expect(inCleaning.status).toBe(409);
    const after = await planner.post('/api/runs', { stillId: fx.stills.ws1, type: 'stripping', startsAt: iso(at(2, 13)), endsAt: iso(at(2, 15)) });
    expect(after.status).toBe(201);
    // Moving a run onto another is refused as well, and nothing changes.
    const move = await planner.patch(`/api/runs/${after.json.run.id}`, { version: after.json.run.version, startsAt: iso(at(2, 7)) });
    expect(move.status).toBe(409);
    const [row] = await getDb().select().from(t.runs).where(eq(t.runs.id, after.json.run.id));
    expect(row!.startsAt.toISOString()).toBe(iso(at(2, 13)));
  });

  it('answers a stale version with 409 and the current run, and bumps version and sequence on each move', async () => {
    const run = await book(planner, { stillId: fx.stills.ws2, type: 'stripping', startsAt: iso(at(4, 6)), endsAt: iso(at(4, 10)) });
    const moved = await planner.patch(`/api/runs/${run.id}`, { version: run.version, startsAt: iso(at(4, 8)) });
    expect(moved.status, moved.text).toBe(200);
    expect(moved.json.run.version).toBe(run.version + 1);
    expect(moved.json.run.sequence).toBe(run.sequence + 1);
    expect(moved.json.run.endsAt).toBe(iso(at(4, 12))); // true length kept
    const stale = await distiller.patch(`/api/runs/${run.id}`, { version: run.version, startsAt: iso(at(4, 9)) });
    expect(stale.status).toBe(409);
    expect(stale.json.error.code).toBe('stale');
    expect(stale.json.current.id).toBe(run.id);
    expect(stale.json.current.version).toBe(run.version + 1);
    expect(stale.json.current.startsAt).toBe(iso(at(4, 8)));
    // A note changes the version but not the calendar sequence.
    const noted = await planner.patch(`/api/runs/${run.id}`, { version: run.version + 1, notes: 'Check the condenser first.' });
    expect(noted.json.run.version).toBe(run.version + 2);
    expect(noted.json.run.sequence).toBe(run.sequence + 1);
    const audits = await getDb()
      .select()
      .from(t.auditLog)
      .where(and(eq(t.auditLog.workspaceId, fx.workspaceId), eq(t.auditLog.entityId, String(run.id))));
    expect(audits.map((a) => a.action)).toEqual(expect.arrayContaining(['run.create', 'run.move', 'run.update']));
  });

  it('lets exactly one of 50 concurrent moves into the same slot win, leaving no overlap in the database', async () => {
    const target = { start: at(10, 6), end: at(10, 10) };
    // 50 runs of 4 h spread over the three stills on other days, each then moved onto Wash Still 2 at the same time.
    const runs = [];
    for (let i = 0; i < 50; i++) {
      const still = [fx.stills.ws1, fx.stills.ws2, fx.stills.small][i % 3]!;
      runs.push(await book(planner, { stillId: still, type: 'maintenance', startsAt: iso(at(11 + i, 0)), endsAt: iso(at(11 + i, 4)) }));
    }
    const answers = await Promise.all(
      runs.map((r) => planner.patch(`/api/runs/${r.id}`, { version: r.version, stillId: fx.stills.ws2, startsAt: iso(target.start), endsAt: iso(target.end) })),
    );
    const statuses = answers.map((a) => a.status);
    expect(statuses.filter((s) => s === 200)).toHaveLength(1);
    expect(statuses.filter((s) => s === 409)).toHaveLength(49);
    const live = await getDb()
      .select()
      .from(t.runs)
      .where(and(eq(t.runs.workspaceId, fx.workspaceId), eq(t.runs.stillId, fx.stills.ws2), ne(t.runs.status, 'cancelled')));
    for (const a of live) {
      for (const b of live) {
        if (a.id >= b.id) continue;
        const overlaps = a.startsAt < b.endsAt && b.startsAt < a.endsAt;
        expect(overlaps, `runs ${a.id} and ${b.id} overlap`).toBe(false);
      }
    }
  });

  it('lets distillers move, start and finish runs but not book, cancel or change a booking; staff only read', async () => {
    const run = await book(planner, { stillId: fx.stills.ws2, type: 'stripping', startsAt: iso(at(6, 6)), endsAt: iso(at(6, 10)) });
    expect((await distiller.post('/api/runs', { stillId: fx.stills.ws2, type: 'stripping', startsAt: iso(at(7, 6)), endsAt: iso(at(7, 8)) })).status).toBe(403);
    expect((await staff.patch(`/api/runs/${run.id}`, { version: run.version, startsAt: iso(at(6, 7)) })).status).toBe(403);
    expect((await staff.post(`/api/runs/${run.id}/start`, { version: run.version })).status).toBe(403);
    expect((await staff.get(`/api/runs/${run.id}`)).status).toBe(200);
    expect((await distiller.patch(`/api/runs/${run.id}`, { version: run.version, operatorId: fx.users.distiller.id })).status).toBe(403);
    expect((await distiller.post(`/api/runs/${run.id}/cancel`, { version: run.version })).status).toBe(403);
    const moved = await distiller.patch(`/api/runs/${run.id}`, { version: run.version, startsAt: iso(at(6, 7)) });
    expect(moved.status, moved.text).toBe(200);
    // Booked days ahead and finished at once: both questions are accepted here (run-actual-times.test.ts checks them).
    const started = await distiller.post(`/api/runs/${run.id}/start`, { version: moved.json.run.version, confirm: true });
    expect(started.status).toBe(200);
    expect(started.json.run.status).toBe('running');
    // A running run stays where it is.
    expect((await planner.patch(`/api/runs/${run.id}`, { version: started.json.run.version, startsAt: iso(at(6, 9)) })).status).toBe(409);
    const finished = await distiller.post(`/api/runs/${run.id}/finish`, { version: started.json.run.version, confirm: true });
    expect(finished.status).toBe(200);
    expect(finished.json.run.status).toBe('done');
    expect(finished.json.run.sequence).toBe(run.sequence + 3);
    // Planners and managers do all of it.
    const other = await book(manager, { stillId: fx.stills.ws2, type: 'cleaning', startsAt: iso(at(8, 6)), endsAt: iso(at(8, 7)) });
    const assigned = await planner.patch(`/api/runs/${other.id}`, { version: other.version, operatorId: fx.users.distiller.id, status: 'confirmed' });
    expect(assigned.status).toBe(200);
    const cancelled = await planner.post(`/api/runs/${other.id}/cancel`, { version: assigned.json.run.version });
    expect(cancelled.status).toBe(200);
    expect(cancelled.json.run.status).toBe('cancelled');
    const audits = await getDb()
      .select()
      .from(t.auditLog)
      .where(and(eq(t.auditLog.workspaceId, fx.workspaceId), eq(t.auditLog.entityId, String(other.id))));
    expect(audits.map((a) => a.action)).toContain('run.cancel');
  });

  it('keeps runs of one distillery out of reach of another (404)', async () => {
    const run = await book(planner, { stillId: fx.stills.ws2, type: 'stripping', startsAt: iso(at(30, 6)), endsAt: iso(at(30, 8)) });
    const other = await boardFixture('Other Distillery');
    const outsider = await other.client('planner');
    expect((await outsider.get(`/api/runs/${run.id}`)).status).toBe(404);
    expect((await outsider.patch(`/api/runs/${run.id}`, { version: run.version, startsAt: iso(at(30, 9)) })).status).toBe(404);
    expect((await outsider.post(`/api/runs/${run.id}/cancel`, { version: run.version })).status).toBe(404);
    expect((await outsider.get(`/api/board/suggestions?runId=${run.id}`)).status).toBe(404);
    // Booking on another distillery's still, or with its ferment, is refused too.
    expect((await outsider.post('/api/runs', { stillId: fx.stills.ws2, type: 'stripping', startsAt: iso(at(31, 6)), endsAt: iso(at(31, 8)) })).status).toBe(
      404,
    );
    const theirFerment = await addFerment(fx, { code: 'XW-1', fermenter: 2, pitchedDaysAgo: 1, readings: false });
    const r = await outsider.post('/api/runs', {
      stillId: other.stills.ws2,
      type: 'stripping',
      startsAt: iso(at(31, 6)),
      endsAt: iso(at(31, 8)),
      ferments: [{ fermentId: theirFerment, litres: 100 }],
    });
    expect(r.status).toBe(400);
    const [row] = await getDb().select().from(t.runs).where(eq(t.runs.id, run.id));
    expect(row!.version).toBe(run.version);
  });

  it('validates input: end before start, unknown run type, a feed that is not a stripping run', async () => {
    expect((await planner.post('/api/runs', { stillId: fx.stills.ws2, type: 'stripping', startsAt: iso(at(40, 6)), endsAt: iso(at(40, 5)) })).status).toBe(400);
    expect((await planner.post('/api/runs', { stillId: fx.stills.ws2, type: 'brewing', startsAt: iso(at(40, 6)) })).status).toBe(400);
    const clean = await book(planner, { stillId: fx.stills.ws2, type: 'cleaning', startsAt: iso(at(41, 6)), endsAt: iso(at(41, 7)) });
    const r = await planner.post('/api/runs', {
      stillId: fx.stills.ws2,
      type: 'spirit',
      startsAt: iso(at(42, 6)),
      endsAt: iso(at(42, 12)),
      feeds: [{ runId: clean.id, litres: 300 }],
    });
    expect(r.status).toBe(400);
    expect(r.json.error.fields.feeds).toBeDefined();
  });
});
