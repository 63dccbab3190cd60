import { describe, it, expect, beforeAll } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { createTestWorkspace, type Client, type TestWorkspace } from '../helpers/api';
import { insertDefaultWashTypes } from '../../src/server/vessels';
import { getForecast, getForecasts, historyFor } from '../../src/server/forecasts';
import { forecastFerment } from '../../src/lib/forecast';
import { systemCtx } from '../../src/server/context';
import { workspaceSettings } from '../../src/server/workspaces';

/** The server functions take the caller's context: the workspace's settings (as the session loads them). */
const ctxOf = async (workspaceId: number) => systemCtx((await workspaceSettings(workspaceId))!);

describe('fermenters, wash types and ferments', () => {
  let ws: TestWorkspace;
  let manager: Client;
  let planner: Client;
  let distiller: Client;
  let washTypeId: number;
  let fv1: number;
  beforeAll(async () => {
    ws = await createTestWorkspace('Ferments');
    await insertDefaultWashTypes(ws.workspaceId);
    manager = await ws.client('manager');
    planner = await ws.client('planner');
    distiller = await ws.client('distiller');
  });

  it('pre-fills the trade’s terminal ranges (common practice) and lets only managers edit them', async () => {
    const list = await distiller.get('/api/wash-types');
    const byCat = Object.fromEntries(list.json.washTypes.map((w: any) => [w.category, [w.terminalMin, w.terminalMax]]));
    expect(byCat).toMatchObject({ sugar: [0.99, 1.0], grain: [1.002, 1.008], fruit: [0.99, 0.996] });
    expect(byCat.molasses[1]).toBeCloseTo(1.02, 6);
    washTypeId = list.json.washTypes.find((w: any) => w.category === 'grain').id;
    expect((await planner.patch(`/api/wash-types/${washTypeId}`, { terminalMax: 1.009 })).status).toBe(403);
    const bad = await manager.patch(`/api/wash-types/${washTypeId}`, { terminalMin: 1.01, terminalMax: 1.005 });
    expect(bad.status).toBe(400);
    expect(bad.json.error.fields.terminalMax).toBeTruthy();
    const ok = await manager.patch(`/api/wash-types/${washTypeId}`, { terminalMax: 1.009 });
    expect(ok.status).toBe(200);
    expect(ok.json.washType.terminalMax).toBe(1.009);
  });

  it('manages fermenters (manager only)', async () => {
    expect((await planner.post('/api/fermenters', { name: 'FV1', capacity: 3000 })).status).toBe(403);
    const a = await manager.post('/api/fermenters', { name: 'FV1', capacity: 3000 });
    expect(a.status).toBe(201);
    fv1 = a.json.fermenter.id;
    const dup = await manager.post('/api/fermenters', { name: 'FV1', capacity: 100 });
    expect(dup.status).toBe(400);
    expect(dup.json.error.fields.name).toMatch(/already exists/);
    const e = await manager.patch(`/api/fermenters/${fv1}`, { capacity: 3200 });
    expect(e.json.fermenter.capacityLitres).toBe(3200);
  });

  it('creates a ferment, then refuses a second active ferment in the same fermenter (409) until it is emptied', async () => {
    const body = {
      code: 'F-1',
      washTypeId,
      fermenterId: fv1,
      volume: 2500,
      pitchedAt: '2025-04-01T08:00',
      og: 1.062,
      yeast: 'M strain',
      ingredients: [{ name: 'Malt', quantity: 700 }],
    };
    // Distillers may start ferments (PRODUCT.md roles); staff may not.
    expect((await (await ws.client('staff')).post('/api/ferments', body)).status).toBe(403);
    const r = await planner.post('/api/ferments', body);
    expect(r.status, r.text).toBe(201);
    // A wall-clock time is read in the distillery's zone (Europe/London, BST on 1 April).
    expect(r.json.ferment.pitchedAt).toBe('2025-04-01T07:00:00.000Z');
    expect(r.json.ferment.ingredients[0].quantityKg).toBe(700);
    const second = await planner.post('/api/ferments', { ...body, code: 'F-2' });
    expect(second.status).toBe(409);
    expect(second.json.error.message).toMatch(/FV1 already holds F-1/);
    const sameCode = await planner.post('/api/ferments', { ...body, fermenterId: null });
    expect(sameCode.status).toBe(409);
    const tooBig = await planner.post('/api/ferments', { ...body, code: 'F-3', volume: 5000, fermenterId: null });
    expect(tooBig.status).toBe(201); // no fermenter, no capacity to check
    const overCap = await planner.patch(`/api/ferments/${tooBig.json.ferment.id}`, { fermenterId: fv1 });
    expect(overCap.status).toBe(400);
    const f1 = r.json.ferment.id;
    const edit = await planner.patch(`/api/ferments/${f1}`, { notes: 'Checked the jacket.' });
    expect(edit.status).toBe(200);
    const empty = await planner.post(`/api/ferments/${f1}/empty`, { reason: 'distilled' });
    expect(empty.status, empty.text).toBe(200);
    expect(empty.json.ferment.emptiedReason).toBe('distilled');
    expect((await planner.post(`/api/ferments/${f1}/empty`, { reason: 'dumped' })).status).toBe(409);
    const again = await planner.post('/api/ferments', { ...body, code: 'F-4' });
    expect(again.status, again.text).toBe(201);
    const fvs = await distiller.get('/api/fermenters');
    expect(fvs.json.fermenters.find((f: any) => f.id === fv1).activeFerment.code).toBe('F-4');
    const emptied = await distiller.post(`/api/ferments/${f1}/readings`, { value: 1.0, unit: 'sg', method: 'digital' });
    expect(emptied.status).toBe(409);
  });

  it('shows the same ferment with consistent numbers in US units', async () => {
    const us = await createTestWorkspace('Ferments US', { units: 'us' });
    await insertDefaultWashTypes(us.workspaceId);
    const m = await us.client('manager');
    const wt = (await m.get('/api/wash-types')).json.washTypes[0].id;
    const fv = await m.post('/api/fermenters', { name: 'FV1', capacity: 800 });
    expect(fv.json.fermenter.capacityLitres).toBeCloseTo(800 * 3.785411784, 6); // 1 US gal = 3.785411784 L (exact)
    const f = await m.post('/api/ferments', {
      code: 'U-1',
      washTypeId: wt,
      fermenterId: fv.json.fermenter.id,
      volume: 500,
      pitchedAt: '2025-04-01T08:00:00Z',
      og: 1.06,
      ingredients: [{ name: 'Sugar', quantity: 100 }],
    });
    expect(f.status, f.text).toBe(201);
    expect(f.json.ferment.volumeLitres).toBeCloseTo(500 * 3.785411784, 6);
    expect(f.json.ferment.ingredients[0].quantityKg).toBeCloseTo(100 * 0.45359237, 6); // 1 lb = 0.45359237 kg (exact)
    const over = await m.post('/api/ferments', { code: 'U-2', washTypeId: wt, fermenterId: null, volume: 0, pitchedAt: '2025-04-01T08:00:00Z', og: 1.06 });
    expect(over.status).toBe(400);
    expect(over.json.error.fields.volume).toBeTruthy();
  });

  it('answers 404 for another workspace’s ferments, fermenters and wash types', async () => {
    const other = await createTestWorkspace('Stranger');
    const s = await other.client('manager');
    const [f] = await getDb().select().from(t.ferments).where(eq(t.ferments.workspaceId, ws.workspaceId)).limit(1);
    expect((await s.get(`/api/ferments/${f!.id}`)).status).toBe(404);
    expect((await s.patch(`/api/ferments/${f!.id}`, { notes: 'x' })).status).toBe(404);
    expect((await s.post(`/api/ferments/${f!.id}/empty`, { reason: 'dumped' })).status).toBe(404);
    expect((await s.get(`/api/ferments/${f!.id}/forecast`)).status).toBe(404);
    expect((await s.patch(`/api/fermenters/${fv1}`, { capacity: 1 })).status).toBe(404);
    expect((await s.patch(`/api/wash-types/${washTypeId}`, { terminalMax: 1.01 })).status).toBe(404);
    const list = await s.get('/api/ferments?state=all');
    expect(list.json.ferments).toEqual([]);
    const [after] = await getDb().select().from(t.ferments).where(eq(t.ferments.id, f!.id));
    expect(after!.notes).toEqual(f!.notes);
  });
});

describe('forecast wiring', () => {
  it('recomputes after each reading, caches by input key, and keeps history at most every 6 hours', async () => {
    const ws = await createTestWorkspace('Forecasts');
    await insertDefaultWashTypes(ws.workspaceId);
    const p = await ws.client('planner');
    const sugar = (await p.get('/api/wash-types')).json.washTypes.find((w: any) => w.category === 'sugar').id;
    const pitched = new Date(Date.now() - 9 * 86_400_000);
    const f = await p.post('/api/ferments', { code: 'FC-1', washTypeId: sugar, fermenterId: null, volume: 1000, pitchedAt: pitched.toISOString(), og: 1.08 });
    const id = f.json.ferment.id;
    // REFERENCES §6 sugar-wash vector (readings every 24 h): finished, steady from 192 h at 3 stable days.
    const series = [1.08, 1.05, 1.025, 1.01, 1.0, 0.996, 0.995, 0.995, 0.995];
    for (const [i, sg] of series.entries()) {
      const r = await p.post(`/api/ferments/${id}/readings`, {
        value: sg,
        unit: 'sg',
        method: 'digital',
        takenAt: new Date(pitched.getTime() + i * 86_400_000 + 60_000).toISOString(),
      });
      expect(r.status, r.text).toBe(201);
    }
    const fc = await p.get(`/api/ferments/${id}/forecast`);
    expect(fc.status).toBe(200);
    expect(fc.json.forecast.status).toBe('finished');
    expect(new Date(fc.json.forecast.ruleMetAt).getTime()).toBe(pitched.getTime() + 8 * 86_400_000 + 60_000);
    const [cached] = await getDb().select().from(t.fermentForecasts).where(eq(t.fermentForecasts.fermentId, id));
    expect(cached!.status).toBe('finished');
    const summaries = await getForecasts(await ctxOf(ws.workspaceId), [id]);
    expect(summaries.get(id)!.status).toBe('finished');
    expect(summaries.get(id)!.lastSg).toBe(0.995);
    const [again] = await getDb().select().from(t.fermentForecasts).where(eq(t.fermentForecasts.fermentId, id));
    expect(again!.computedAt.getTime()).toBe(cached!.computedAt.getTime()); // served from the cache
    const history = await getDb()
      .select()
      .from(t.forecastHistory)
      .where(and(eq(t.forecastHistory.workspaceId, ws.workspaceId), eq(t.forecastHistory.fermentId, id)));
    expect(history.length).toBe(1); // ten recomputes within minutes, one history row
    // Another workspace's ids give nothing.
    const other = await createTestWorkspace('Forecast stranger');
    expect((await getForecasts(await ctxOf(other.workspaceId), [id])).size).toBe(0);
  });

  it("learns from the wash type's finished ferments: same type only, not itself, only those finished by then", async () => {
    const DAY = 86_400_000;
    const ws = await createTestWorkspace('Forecast history');
    await insertDefaultWashTypes(ws.workspaceId);
    const p = await ws.client('planner');
    const types = (await p.get('/api/wash-types')).json.washTypes;
    const sugar = types.find((w: any) => w.category === 'sugar');
    const grain = types.find((w: any) => w.category === 'grain');
    const db = getDb();
    // Four sugar washes confirmed stable 6–7 days after pitching, one grain wash after 12 days (invented history).
    const past = [
      { type: sugar.id, days: 6.0, ago: 60 },
      { type: sugar.id, days: 6.5, ago: 50 },
      { type: sugar.id, days: 7.0, ago: 40 },
      { type: sugar.id, days: 6.5, ago: 30 },
      { type: grain.id, days: 12, ago: 45 },
    ];
    for (const [i, h] of past.entries()) {
      const pitchedAt = new Date(Date.now() - h.ago * DAY);
      const ruleMetAt = new Date(pitchedAt.getTime() + h.days * DAY);
      const [f] = await db
        .insert(t.ferments)
        .values({
          workspaceId: ws.workspaceId,
          code: `H-${i + 1}`,
          washTypeId: h.type,
          volumeLitres: 1000,
          pitchedAt,
          og: 1.08,
          emptiedAt: new Date(ruleMetAt.getTime() + DAY),
          emptiedReason: 'distilled',
        })
        .$returningId();
      await db.insert(t.fermentForecasts).values({
        fermentId: f!.id,
        workspaceId: ws.workspaceId,
        inputKey: 'seeded',
        status: 'finished',
        ruleMetAt,
        readyAt: ruleMetAt,
        readyP10: ruleMetAt,
        readyP90: ruleMetAt,
        payload: {},
        computedAt: new Date(),
      });
    }
    // A sugar wash 1.5 days in: the curve's bend not seen yet, so the fit is loose.
    const pitched = new Date(Date.now() - 1.5 * DAY);
    const live = (
      await p.post('/api/ferments', { code: 'H-LIVE', washTypeId: sugar.id, fermenterId: null, volume: 1000, pitchedAt: pitched.toISOString(), og: 1.08 })
    ).json.ferment.id;
    const series = [
      [0.25, 1.074],
      [0.5, 1.066],
      [0.75, 1.058],
      [1.0, 1.051],
      [1.25, 1.045],
      [1.5, 1.04],
    ] as const;
    for (const [d, sg] of series) {
      const r = await p.post(`/api/ferments/${live}/readings`, {
        value: sg,
        unit: 'sg',
        method: 'digital',
        takenAt: new Date(pitched.getTime() + d * DAY - 60_000).toISOString(),
      });
      expect(r.status, r.text).toBe(201);
    }
    const now = new Date();
    const withHistory = (await getForecast(await ctxOf(ws.workspaceId), live, now))!;
    expect(withHistory.history).not.toBeNull();
    expect(withHistory.history!.count).toBe(4); // the grain wash is not counted
    expect(withHistory.history!.medianDays).toBeCloseTo(6.5, 6);
    // The same inputs without history, straight from the forecaster: history pulls toward 6.5 days.
    const alone = forecastFerment({
      readings: series.map(([d, sg]) => ({ takenAt: new Date(pitched.getTime() + d * DAY - 60_000), sg })),
      og: 1.08,
      pitchedAt: pitched,
      terminalRange: { min: sugar.terminalMin, max: sugar.terminalMax },
      stableDays: 3,
      tolerance: 0.001,
      now,
      seed: live,
    });
    expect(alone.history).toBeNull();
    const days = (d: Date | null) => (d!.getTime() - pitched.getTime()) / DAY;
    expect(withHistory.history!.weight).toBeGreaterThan(0.05);
    expect(Math.abs(days(withHistory.readyAt) - 6.5)).toBeLessThan(Math.abs(days(alone.readyAt) - 6.5));

    // The selection itself: a ferment emptied at day 35 ago only knows those emptied before then.
    const finished = past.map((h, i) => {
      const pitchedAt = new Date(now.getTime() - h.ago * DAY);
      return {
        id: i + 1,
        washTypeId: h.type,
        pitchedAt,
        ruleMetAt: new Date(pitchedAt.getTime() + h.days * DAY),
        emptiedAt: new Date(pitchedAt.getTime() + (h.days + 1) * DAY),
      };
    });
    expect(historyFor({ id: 99, washTypeId: sugar.id, emptiedAt: new Date(now.getTime() - 35 * DAY) }, finished, now).sort()).toEqual([6, 6.5]);
    expect(historyFor({ id: 2, washTypeId: sugar.id, emptiedAt: null }, finished, now).sort()).toEqual([6, 6.5, 7]);
  });
});
