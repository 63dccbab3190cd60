/**
 * The manager's figures on a hand-built week. Europe/London in January is GMT (UTC+0), so the
 * wall clock equals UTC below. Range: Mon 6 Jan 2025 .. Sun 12 Jan 2025 (ISO week 2025-W02).
 *
 * Still: Mon–Fri 08:00–18:00, 60 min cleaning after each distillation run, closed Wed 8 Jan.
 *   Available = Mon, Tue, Thu, Fri × 10 h = 40 h.
 * Runs on it:
 *   R1 stripping, done, Mon 12:00–16:00, charged from F1 (2000 L)       -> 4 h booked, 4 h done
 *   R2 stripping, planned, Tue 15:00–18:00, charged from F2 (2000 L)    -> 3 h booked
 *   C  cleaning, done, Fri 08:00–09:00                                  -> 1 h booked, 1 h done
 *   M  maintenance, done, Wed 10:00–12:00 (closure day: outside open hours) -> 0 h
 *   X  stripping, cancelled, Fri 10:00–18:00                            -> 0 h
 *   Booked 4 + 3 + 1 = 8 h; utilisation 8 / 40 = 0.2; done 4 + 1 = 5 h.
 * Ferments (daily readings; the stability rule — 3 days, ≥ 3 readings, spread ≤ 0.001 — is first
 * met at the 4th equal reading):
 *   F1 sugar, pitched Mon 30 Dec 08:00, holds 0.995 from 3 Jan -> confirmed Mon 6 Jan 08:00 (7 days)
 *   F2 grain, pitched Wed 1 Jan 14:00, holds 1.005 from 4 Jan 14:00 -> confirmed Tue 7 Jan 14:00 (6 days)
 *   F3 grain, pitched Thu 2 Jan 08:00, holds 1.005 from 7 Jan -> confirmed Fri 10 Jan 08:00 (8 days)
 * Idle waiting (still free, wash not yet confirmed):
 *   R1: still free from the range start (Mon 00:00); F1 confirmed Mon 08:00 -> [00:00, 08:00) has no open hours: 0 h
 *   R2: the previous run is R1 (M on Wednesday comes after R2), so the still was free from R1's end + cleaning = Mon 17:00;
 *       F2 confirmed Tue 14:00, before R2's start -> waiting [Mon 17:00, Tue 14:00) = Mon 17–18 (1 h) + Tue 08–14 (6 h) = 7 h
 * Cycle time: Sugar [7] -> median 7; Grain [6, 8] -> median 7, p25 6.5, p75 7.5, IQR 1 (linear interpolation).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import type { RunStatus, RunType } from '../../src/lib/vocabulary';
import { createTestWorkspace, type Client, type TestWorkspace } from '../helpers/api';
import { utc } from '../helpers/time';

const DAY = 86_400_000;
let ws: TestWorkspace;
let manager: Client;
let report: any;
const ids: Record<string, number> = {};

async function ferment(code: string, washTypeId: number, pitched: string, og: number, sgs: number[], emptiedAt: Date | null = null): Promise<number> {
  const db = getDb();
  const pitchedAt = utc(pitched);
  const [f] = await db
    .insert(t.ferments)
    .values({ workspaceId: ws.workspaceId, code, washTypeId, volumeLitres: 2000, pitchedAt, og, emptiedAt, emptiedReason: emptiedAt ? 'distilled' : null })
    .$returningId();
  await db.insert(t.readings).values(
    sgs.map((sg, i) => ({
      workspaceId: ws.workspaceId,
      fermentId: f!.id,
      takenAt: new Date(pitchedAt.getTime() + i * DAY),
      method: 'hydrometer' as const,
      rawValue: sg,
      rawUnit: 'sg' as const,
      sampleTempC: 20,
      sampleTempUnit: 'C' as const,
      correctedSg: sg,
    })),
  );
  return f!.id;
}

beforeAll(async () => {
  ws = await createTestWorkspace('Reports fixture', { timeZone: 'Europe/London' });
  const db = getDb();
  const w = ws.workspaceId;
  const [still] = await db
    .insert(t.stills)
    .values({
      workspaceId: w,
      name: 'Wash Still A',
      kind: 'pot',
      capacityLitres: 2500,
      heatingKw: 60,
      cleaningAfterRunMinutes: 60,
      operatingHours: [1, 2, 3, 4, 5].map((weekday) => ({ weekday, open: '08:00', close: '18:00' })),
      typicalMinutes: { stripping: 300 },
    })
    .$returningId();
  ids.still = still!.id;
  await db.insert(t.stillClosures).values({ workspaceId: w, stillId: still!.id, startsOn: '2025-01-08', endsOn: '2025-01-08', reason: 'Boiler inspection' });
  const [sugar] = await db
    .insert(t.washTypes)
    .values({ workspaceId: w, name: 'Sugar wash', category: 'sugar', terminalMin: 0.99, terminalMax: 1.0 })
    .$returningId();
  const [grain] = await db
    .insert(t.washTypes)
    .values({ workspaceId: w, name: 'Grain wash', category: 'grain', terminalMin: 1.002, terminalMax: 1.008 })
    .$returningId();
  ids.f1 = await ferment('RF-1', sugar!.id, '2024-12-30T08:00', 1.08, [1.08, 1.06, 1.035, 1.01, 0.995, 0.995, 0.995, 0.995], utc('2025-01-06T11:00'));
  ids.f2 = await ferment('RF-2', grain!.id, '2025-01-01T14:00', 1.06, [1.06, 1.04, 1.02, 1.005, 1.005, 1.005, 1.005]);
  ids.f3 = await ferment('RF-3', grain!.id, '2025-01-02T08:00', 1.06, [1.06, 1.045, 1.03, 1.015, 1.01, 1.005, 1.005, 1.005, 1.005]);
  await db.insert(t.fermentIngredients).values({ workspaceId: w, fermentId: ids.f1, name: 'Cane sugar', quantityKg: 480 });
  const run = async (type: RunType, status: RunStatus, from: string, to: string, extra: Partial<typeof t.runs.$inferInsert> = {}) => {
    const [r] = await db
      .insert(t.runs)
      .values({
        workspaceId: w,
        stillId: still!.id,
        type,
        status,
        startsAt: utc(from),
        endsAt: utc(to),
        finishedAt: status === 'done' ? utc(to) : null,
        ...extra,
      })
      .$returningId();
    return r!.id;
  };
  ids.r1 = await run('stripping', 'done', '2025-01-06T12:00', '2025-01-06T16:00', { chargeLitres: 2000, chargeAbv: 7.5 });
  ids.r2 = await run('stripping', 'planned', '2025-01-07T15:00', '2025-01-07T18:00', { chargeLitres: 2000 });
  await run('cleaning', 'done', '2025-01-10T08:00', '2025-01-10T09:00');
  await run('maintenance', 'done', '2025-01-08T10:00', '2025-01-08T12:00');
  await run('stripping', 'cancelled', '2025-01-10T10:00', '2025-01-10T18:00');
  await db.insert(t.runFerments).values([
    { runId: ids.r1, fermentId: ids.f1, workspaceId: w, litres: 2000 },
    { runId: ids.r2, fermentId: ids.f2, workspaceId: w, litres: 2000 },
  ]);
  // R1's low wines: 500 L at 28 % vol read at 20 °C = 140 LAA.
  await db
    .insert(t.runOutcomes)
    .values({ workspaceId: w, runId: ids.r1, fraction: 'low_wines', volumeLitres: 500, alcoholmeterReading: 28, readingTempC: 20, abv20: 28, laa: 140 });
  // What the forecasts said about three days before each finish (F2 confirmed Tue 7 Jan 14:00; F3 Fri 10 Jan 08:00).
  await db.insert(t.forecastHistory).values([
    { workspaceId: w, fermentId: ids.f2, asOf: utc('2025-01-02T14:00'), status: 'active', readyAt: utc('2025-01-12T14:00'), readyP10: null, readyP90: null }, // 5 days before: not "3 days ahead"
    {
      workspaceId: w,
      fermentId: ids.f2,
      asOf: utc('2025-01-04T20:00'),
      status: 'slowing',
      readyAt: utc('2025-01-08T14:00'),
      readyP10: utc('2025-01-08T02:00'),
      readyP90: utc('2025-01-09T14:00'),
    },
    {
      workspaceId: w,
      fermentId: ids.f3,
      asOf: utc('2025-01-07T08:00'),
      status: 'slowing',
      readyAt: utc('2025-01-09T20:00'),
      readyP10: utc('2025-01-08T08:00'),
      readyP90: utc('2025-01-11T08:00'),
    },
  ]);
  manager = await ws.client('manager');
  const r = await manager.get('/api/reports?from=2025-01-06&to=2025-01-12');
  expect(r.status, r.text).toBe(200);
  report = r.json.report;
});

describe('reports on a hand-worked week', () => {
  it('precondition: the stability rule dates the confirmed finishes as worked out above', async () => {
    const rows = await getDb()
      .select({ id: t.fermentForecasts.fermentId, ruleMetAt: t.fermentForecasts.ruleMetAt, status: t.fermentForecasts.status })
      .from(t.fermentForecasts)
      .where(eq(t.fermentForecasts.workspaceId, ws.workspaceId));
    const at = (id: number) => rows.find((r) => r.id === id)?.ruleMetAt?.toISOString();
    expect(at(ids.f1)).toBe('2025-01-06T08:00:00.000Z');
    expect(at(ids.f2)).toBe('2025-01-07T14:00:00.000Z');
    expect(at(ids.f3)).toBe('2025-01-10T08:00:00.000Z');
  });

  it('utilisation: 40 h open, 8 h booked (20 %), 5 h done, 7 h idle waiting for F2', () => {
    expect(report.utilisation).toHaveLength(1);
    const u = report.utilisation[0];
    expect(u.week).toBe('2025-W02');
    expect(u.availableHours).toBeCloseTo(40, 9);
    expect(u.bookedHours).toBeCloseTo(8, 9);
    expect(u.doneHours).toBeCloseTo(5, 9);
    expect(u.idleWaitingHours).toBeCloseTo(7, 9);
    expect(u.utilisation).toBeCloseTo(0.2, 9);
  });

  it('cycle time: sugar 7 days; grain median 7, IQR 6.5–7.5', () => {
    const grain = report.cycle.find((c: any) => c.washType === 'Grain wash' && c.period === 'all');
    expect(grain).toMatchObject({ n: 2, min: 6, max: 8 });
    expect(grain.median).toBeCloseTo(7, 9);
    expect(grain.p25).toBeCloseTo(6.5, 9);
    expect(grain.p75).toBeCloseTo(7.5, 9);
    expect(grain.iqr).toBeCloseTo(1, 9);
    expect(report.cycle.find((c: any) => c.washType === 'Sugar wash' && c.period === 'all').median).toBeCloseTo(7, 9);
    expect(report.cycle.find((c: any) => c.washType === 'Grain wash' && c.period === '2025-01').n).toBe(2);
  });

  it('forecast accuracy three days ahead: F2 +1 day (outside P10–P90), F3 −0.5 day (inside); mean 0.75 d, half inside', () => {
    // F2: forecast of 4 Jan 20:00 (66 h before, the closest to 72 h) said 8 Jan 14:00; actual 7 Jan 14:00 -> +1 d; P10 8 Jan 02:00 > actual.
    // F3: forecast of 7 Jan 08:00 (72 h before) said 9 Jan 20:00; actual 10 Jan 08:00 -> −0.5 d; inside 8 Jan..11 Jan.
    const byCode = Object.fromEntries(report.accuracy.points.map((p: any) => [p.code, p]));
    expect(byCode['RF-2']).toMatchObject({ absErrorDays: 1, signedErrorDays: 1, insideWindow: false });
    expect(byCode['RF-3']).toMatchObject({ absErrorDays: 0.5, signedErrorDays: -0.5, insideWindow: true });
    expect(report.accuracy.months).toEqual([{ month: '2025-01', n: 2, meanAbsErrorDays: 0.75, medianAbsErrorDays: 0.75, insideShare: 0.5 }]);
  });

  it('throughput, recovery and yield of R1', () => {
    // Week 2025-W02: 3 done runs (R1, cleaning, maintenance); 2000 L of wash; 140 LAA of low wines.
    // Still hours of the three done runs: R1 4 h + C 1 h + M 2 h = 7 h booked; no start stamped, finished at the booked end, so 7 h actual too.
    expect(report.throughput).toEqual([{ week: '2025-W02', washLitres: 2000, lowWinesLaa: 140, heartsLaa: 0, runs: 3, bookedHours: 7, actualHours: 7 }]);
    const r1 = report.recoveries.find((r: any) => r.runId === ids.r1);
    // Charged 2000 L × 7.5 % = 150 LAA; recovery 140 / 150 = 0.93333
    expect(r1.chargedLaa).toBeCloseTo(150, 9);
    expect(r1.recovery).toBeCloseTo(140 / 150, 9);
    // Expected from F1: 2000 L × 11.386 % (1.080 -> 0.995, Balling check value, REFERENCES §3) = 227.72 LAA (± 0.01)
    expect(Math.abs(r1.expectedLaa - 227.72)).toBeLessThanOrEqual(0.015);
    // Yield: 140 LAA from 480 kg = 0.48 t -> 291.667 LAA/t
    expect(report.yields).toHaveLength(1);
    expect(report.yields[0].laaPerTonne).toBeCloseTo(140 / 0.48, 6);
  });

  it('filters: a still of another workspace is refused; a bad date is a 400 with a field', async () => {
    const other = await createTestWorkspace('Reports other');
    const intruder = await other.client('manager');
    expect((await intruder.get(`/api/reports?from=2025-01-06&to=2025-01-12&still=${ids.still}`)).status).toBe(400);
    const bad = await manager.get('/api/reports?from=2025-02-30&to=2025-03-01');
    expect(bad.status).toBe(400);
    expect(bad.json.error.fields.from).toBeTruthy();
    const planner = await ws.client('planner');
    expect((await planner.get('/api/reports?from=2025-01-06&to=2025-01-12')).status).toBe(200);
    const distiller = await ws.client('distiller');
    expect((await distiller.get('/api/reports')).status).toBe(403);
  });
});
