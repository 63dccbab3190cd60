/**
 * Run records over HTTP: PUT replaces every fraction in one transaction, computes strength at
 * 20 °C and LAA, may finish a running run, and refuses out-of-range values with field messages.
 */
import { describe, expect, it, beforeAll } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { createTestWorkspace, type TestWorkspace, type Client } from '../helpers/api';

let ws: TestWorkspace;
let distiller: Client;
let stillId: number;
let fermentId: number;

async function makeRun(status: 'planned' | 'running' | 'done', type: 'stripping' | 'spirit' = 'stripping'): Promise<number> {
  const db = getDb();
  const startsAt = new Date(Date.now() - 3 * 3600_000);
  const [run] = await db
    .insert(t.runs)
    .values({
      workspaceId: ws.workspaceId,
      stillId,
      type,
      status,
      startsAt,
      endsAt: new Date(startsAt.getTime() + 6 * 3600_000),
      chargeLitres: 1000,
      chargeAbv: 8,
      startedAt: status === 'planned' ? null : startsAt,
      createdBy: ws.users.planner.id,
    })
    .$returningId();
  if (type === 'stripping') await db.insert(t.runFerments).values({ runId: run!.id, fermentId, workspaceId: ws.workspaceId, litres: 1000 });
  return run!.id;
}

const lowWines = (over: Record<string, unknown> = {}) => ({
  fraction: 'low_wines',
  volumeLitres: 250,
  alcoholmeterReading: 30,
  readingTempC: 20,
  cutNote: 'Stopped at 2 % off the spout',
  ...over,
});

beforeAll(async () => {
  ws = await createTestWorkspace('Outcomes');
  const db = getDb();
  const [still] = await db
    .insert(t.stills)
    .values({
      workspaceId: ws.workspaceId,
      name: 'Wash Still',
      kind: 'pot',
      capacityLitres: 1200,
      heatingKw: 40,
      operatingHours: [1, 2, 3, 4, 5].map((weekday) => ({ weekday, open: '06:00', close: '20:00' })),
      typicalMinutes: { stripping: 300 },
    })
    .$returningId();
  stillId = still!.id;
  const [wt] = await db
    .insert(t.washTypes)
    .values({ workspaceId: ws.workspaceId, name: 'Sugar wash', category: 'sugar', terminalMin: 0.99, terminalMax: 1.0 })
    .$returningId();
  const [f] = await db
    .insert(t.ferments)
    .values({ workspaceId: ws.workspaceId, code: 'OC-1', washTypeId: wt!.id, volumeLitres: 1000, pitchedAt: new Date(Date.now() - 10 * 86400_000), og: 1.08 })
    .$returningId();
  fermentId = f!.id;
  distiller = await ws.client('distiller');
});

describe('PUT /api/runs/:id/outcomes', () => {
  it('records low wines, computes LAA and recovery (LAA = litres × ABV / 100, REFERENCES §5)', async () => {
    const id = await makeRun('running');
    const r = await distiller.put(`/api/runs/${id}/outcomes`, { version: 1, fractions: [lowWines()] });
    expect(r.status, r.text).toBe(200);
    const rec = r.json.record;
    // 250 L at 30 % vol read at 20 °C: no correction; 250 × 30 / 100 = 75 LAA
    expect(rec.fractions).toHaveLength(1);
    expect(rec.fractions[0].abv20).toBe(30);
    expect(rec.fractions[0].laa).toBeCloseTo(75, 9);
    expect(rec.fractions[0].cutNote).toBe('Stopped at 2 % off the spout');
    // Charge 1000 L at 8 % = 80 LAA; recovery 75 / 80 = 0.9375
    expect(rec.totals.chargedLaa).toBeCloseTo(80, 9);
    expect(rec.totals.recovery).toBeCloseTo(0.9375, 9);
    expect(rec.run.status).toBe('running');
    expect(rec.run.version).toBe(2);
  });

  it('corrects a warm reading to 20 °C: 40.0 at 25 °C -> 37.99 % vol (OIML R 22 check value [computed])', async () => {
    const id = await makeRun('running');
    const r = await distiller.put(`/api/runs/${id}/outcomes`, {
      version: 1,
      fractions: [lowWines({ volumeLitres: 100, alcoholmeterReading: 40, readingTempC: 25 })],
    });
    expect(r.status, r.text).toBe(200);
    expect(Math.abs(r.json.record.fractions[0].abv20 - 37.99)).toBeLessThanOrEqual(0.006);
    expect(Math.abs(r.json.record.fractions[0].laa - 37.99)).toBeLessThanOrEqual(0.006);
  });

  it('finish: true marks a running run done with finished_at, version and sequence bumped, in the same write', async () => {
    const id = await makeRun('running');
    const before = (await getDb().select().from(t.runs).where(eq(t.runs.id, id)))[0]!;
    const r = await distiller.put(`/api/runs/${id}/outcomes`, { version: 1, fractions: [lowWines()], finish: true });
    expect(r.status, r.text).toBe(200);
    const after = (await getDb().select().from(t.runs).where(eq(t.runs.id, id)))[0]!;
    expect(after.status).toBe('done');
    expect(after.finishedAt).not.toBeNull();
    expect(after.version).toBe(before.version + 1);
    expect(after.sequence).toBe(before.sequence + 1);
    const log = await getDb()
      .select()
      .from(t.auditLog)
      .where(and(eq(t.auditLog.workspaceId, ws.workspaceId), eq(t.auditLog.entityId, String(id))));
    expect(log.map((l) => l.action).sort()).toEqual(['run.finish', 'run.record']);
  });

  it('a second PUT replaces the fractions (a done run can be corrected)', async () => {
    const id = await makeRun('done');
    expect((await distiller.put(`/api/runs/${id}/outcomes`, { version: 1, fractions: [lowWines()] })).status).toBe(200);
    const r = await distiller.put(`/api/runs/${id}/outcomes`, { version: 2, fractions: [lowWines({ volumeLitres: 260 })] });
    expect(r.status, r.text).toBe(200);
    const rows = await getDb().select().from(t.runOutcomes).where(eq(t.runOutcomes.runId, id));
    expect(rows.map((o) => o.volumeLitres)).toEqual([260]);
  });

  it.each([
    ['alcoholmeter over 100', { alcoholmeterReading: 101 }, 'fractions.0.alcoholmeterReading'],
    ['temperature over 40 °C', { readingTempC: 41 }, 'fractions.0.readingTempC'],
    ['temperature under −20 °C', { readingTempC: -25 }, 'fractions.0.readingTempC'],
    ['negative volume', { volumeLitres: -3 }, 'fractions.0.volumeLitres'],
    ['volume over 10 × the 1200 L still', { volumeLitres: 12001 }, 'fractions.0.volumeLitres'],
    ['hearts on a stripping run', { fraction: 'hearts' }, 'fractions.0.fraction'],
  ])('refuses %s with a field message (400)', async (_label, patch, field) => {
    const id = await makeRun('running');
    const r = await distiller.put(`/api/runs/${id}/outcomes`, { version: 1, fractions: [lowWines(patch)] });
    expect(r.status).toBe(400);
    expect(Object.keys(r.json.error.fields)).toContain(field);
  });

  it('an invalid record changes nothing: the earlier fractions and charge stay (one transaction)', async () => {
    const id = await makeRun('running');
    expect((await distiller.put(`/api/runs/${id}/outcomes`, { version: 1, fractions: [lowWines()] })).status).toBe(200);
    const bad = await distiller.put(`/api/runs/${id}/outcomes`, {
      version: 2,
      chargeLitres: 900,
      fractions: [lowWines({ volumeLitres: 100 }), lowWines({ readingTempC: 99 })],
    });
    expect(bad.status).toBe(400);
    const rows = await getDb().select().from(t.runOutcomes).where(eq(t.runOutcomes.runId, id));
    expect(rows.map((o) => o.volumeLitres)).toEqual([250]);
    const run = (await getDb().select().from(t.runs).where(eq(t.runs.id, id)))[0]!;
    expect(run.chargeLitres).toBe(1000);
    expect(run.version).toBe(2);
  });

  it('a stale version is a 409 with the current run; a planned run cannot be recorded (409)', async () => {
    const id = await makeRun('running');
    const stale = await distiller.put(`/api/runs/${id}/outcomes`, { version: 7, fractions: [lowWines()] });
    expect(stale.status).toBe(409);
    expect(stale.json.current.id).toBe(id);
    const planned = await makeRun('planned');
    const r = await distiller.put(`/api/runs/${planned}/outcomes`, { version: 1, fractions: [lowWines()] });
    expect(r.status).toBe(409);
  });

  it('staff cannot record (403); another workspace gets 404 and the run is untouched', async () => {
    const id = await makeRun('running');
    const staff = await ws.client('staff');
    expect((await staff.put(`/api/runs/${id}/outcomes`, { version: 1, fractions: [lowWines()] })).status).toBe(403);
    const other = await createTestWorkspace('Outcomes other');
    const intruder = await other.client('manager');
    expect((await intruder.put(`/api/runs/${id}/outcomes`, { version: 1, fractions: [lowWines()] })).status).toBe(404);
    expect((await intruder.get(`/api/runs/${id}/outcomes`)).status).toBe(404);
    expect(await getDb().select().from(t.runOutcomes).where(eq(t.runOutcomes.runId, id))).toEqual([]);
  });

  it('the record page opens for the distiller on a phone and shows the cautions', async () => {
    const id = await makeRun('running');
    const r = await distiller.get(`/runs/${id}/record`, { accept: 'text/html' });
    expect(r.status).toBe(200);
    expect(r.text).toContain('Heads are discarded');
    expect(r.text).toContain('never suggests them');
  });
});
