import { describe, it, expect, beforeAll } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { createTestWorkspace } from '../helpers/api';

/** Water density, Tanaka et al. (2001), Metrologia 38, 301–309 (REFERENCES §2), written out here from the paper. */
function tanaka(tC: number): number {
  const a1 = -3.983035,
    a2 = 301.797,
    a3 = 522528.9,
    a4 = 69.34881,
    a5 = 999.97495;
  return a5 * (1 - ((tC + a1) ** 2 * (tC + a2)) / (a3 * (tC + a4)));
}

const PITCH = '2025-03-01T08:00:00Z';

async function setup(units: 'metric' | 'us') {
  const ws = await createTestWorkspace(`Readings ${units}`, { units });
  const manager = await ws.client('manager');
  const wt = await manager.post('/api/wash-types', { name: 'Grain', category: 'grain', terminalMin: 1.002, terminalMax: 1.008, typicalOg: 1.06 });
  expect(wt.status).toBe(201);
  const fv = await manager.post('/api/fermenters', { name: 'FV1', capacity: units === 'us' ? 800 : 3000 });
  expect(fv.status).toBe(201);
  const planner = await ws.client('planner');
  const f = await planner.post('/api/ferments', {
    code: 'R-1',
    washTypeId: wt.json.washType.id,
    fermenterId: fv.json.fermenter.id,
    volume: units === 'us' ? 600 : 2000,
    pitchedAt: PITCH,
    og: 1.06,
  });
  expect(f.status, f.text).toBe(201);
  return { ws, fermentId: f.json.ferment.id as number, distiller: await ws.client('distiller'), staff: await ws.client('staff') };
}

async function readingRows(workspaceId: number, fermentId: number) {
  return getDb()
    .select()
    .from(t.readings)
    .where(and(eq(t.readings.workspaceId, workspaceId), eq(t.readings.fermentId, fermentId)));
}

describe('reading entry', () => {
  let metric: Awaited<ReturnType<typeof setup>>;
  let us: Awaited<ReturnType<typeof setup>>;
  beforeAll(async () => {
    metric = await setup('metric');
    us = await setup('us');
  });

  it('stores the raw reading as entered and the SG corrected to 20 °C by Tanaka water density', async () => {
    const r = await metric.distiller.post(`/api/ferments/${metric.fermentId}/readings`, {
      value: 1.05,
      unit: 'sg',
      method: 'hydrometer',
      sampleTemp: 28,
      takenAt: '2025-03-02T08:00:00Z',
    });
    expect(r.status, r.text).toBe(201);
    // Tanaka et al. 2001: SG(20) = R × ρ(20)/ρ(28)
    const expected = (1.05 * tanaka(20)) / tanaka(28);
    expect(expected).toBeGreaterThan(1.052);
    const [row] = (await readingRows(metric.ws.workspaceId, metric.fermentId)).filter((x) => x.id === r.json.reading.id);
    expect(row!.rawValue).toBe(1.05);
    expect(row!.rawUnit).toBe('sg');
    expect(row!.method).toBe('hydrometer');
    expect(row!.sampleTempC).toBe(28);
    expect(row!.sampleTempUnit).toBe('C');
    expect(row!.correctedSg).toBeCloseTo(expected, 6);
    expect(row!.lowConfidence).toBe(false);
    expect(row!.takenBy).toBe(metric.ws.users.distiller.id);
  });

  it('gives the same corrected SG for 82.4 °F in a US workspace as for 28 °C in a metric one', async () => {
    const r = await us.distiller.post(`/api/ferments/${us.fermentId}/readings`, {
      value: 1.05,
      unit: 'sg',
      method: 'hydrometer',
      sampleTemp: 82.4,
      takenAt: '2025-03-02T08:00:00Z',
    });
    expect(r.status, r.text).toBe(201);
    const [row] = (await readingRows(us.ws.workspaceId, us.fermentId)).filter((x) => x.id === r.json.reading.id);
    expect(row!.sampleTempC).toBeCloseTo(28, 9);
    expect(row!.sampleTempUnit).toBe('F');
    expect(row!.correctedSg).toBeCloseTo((1.05 * tanaka(20)) / tanaka(28), 6);
    // And the ferment's volume: 600 US gal is stored as litres (1 US gal = 3.785411784 L, exact by definition).
    const [f] = await getDb().select().from(t.ferments).where(eq(t.ferments.id, us.fermentId));
    expect(f!.volumeLitres).toBeCloseTo(600 * 3.785411784, 6);
    const m = await metric.distiller.get(`/api/ferments/${metric.fermentId}/readings`);
    const u = await us.distiller.get(`/api/ferments/${us.fermentId}/readings`);
    expect(u.json.readings[0].correctedSg).toBeCloseTo(m.json.readings[0].correctedSg, 9);
  });

  it('marks refractometer readings lower-confidence', async () => {
    const r = await metric.distiller.post(`/api/ferments/${metric.fermentId}/readings`, {
      value: 8.0,
      unit: 'brix',
      method: 'refractometer',
      takenAt: '2025-03-03T08:00:00Z',
    });
    expect(r.status, r.text).toBe(201);
    expect(r.json.reading.lowConfidence).toBe(true);
    // Terrill 2011 cubic with WCF 1.04 gives well below the raw Brix's own SG (alcohol correction applied).
    expect(r.json.reading.correctedSg).toBeLessThan(1.032);
  });

  it.each([
    ['SG above 1.200', { value: 1.25, unit: 'sg', method: 'hydrometer', sampleTemp: 20 }, 'value'],
    ['SG below 0.980', { value: 0.95, unit: 'sg', method: 'digital' }, 'value'],
    ['sample at 65 °C', { value: 1.03, unit: 'sg', method: 'hydrometer', sampleTemp: 65 }, 'sampleTemp'],
    ['sample below 0 °C', { value: 1.03, unit: 'sg', method: 'hydrometer', sampleTemp: -2 }, 'sampleTemp'],
    ['hydrometer without a temperature', { value: 1.03, unit: 'sg', method: 'hydrometer' }, 'sampleTemp'],
    ['time before pitching', { value: 1.03, unit: 'sg', method: 'digital', takenAt: '2025-02-28T08:00:00Z' }, 'takenAt'],
    ['time in the future', { value: 1.03, unit: 'sg', method: 'digital', takenAt: new Date(Date.now() + 3_600_000).toISOString() }, 'takenAt'],
    ['refractometer Brix above the original', { value: 25, unit: 'brix', method: 'refractometer', takenAt: '2025-03-03T09:00:00Z' }, 'value'],
    ['pH out of range', { value: 1.03, unit: 'sg', method: 'digital', ph: 15 }, 'ph'],
    ['not a number', { value: 'abc', unit: 'sg', method: 'digital' }, 'value'],
  ])('refuses %s with a field-level message and stores nothing', async (_name, body, field) => {
    const before = (await readingRows(metric.ws.workspaceId, metric.fermentId)).length;
    const r = await metric.distiller.post(`/api/ferments/${metric.fermentId}/readings`, body);
    expect(r.status).toBe(400);
    expect(r.json.error.fields[field]).toBeTruthy();
    expect(r.json.error.message.length).toBeGreaterThan(5);
    expect((await readingRows(metric.ws.workspaceId, metric.fermentId)).length).toBe(before);
  });

  it('accepts a time up to 5 minutes ahead (clock skew)', async () => {
    const r = await metric.distiller.post(`/api/ferments/${metric.fermentId}/readings`, {
      value: 1.02,
      unit: 'sg',
      method: 'digital',
      takenAt: new Date(Date.now() + 3 * 60_000).toISOString(),
    });
    expect(r.status, r.text).toBe(201);
  });

  it('keeps history: an edit is audited with old and new values, a delete is soft', async () => {
    const r = await metric.distiller.post(`/api/ferments/${metric.fermentId}/readings`, {
      value: 1.04,
      unit: 'sg',
      method: 'hydrometer',
      sampleTemp: 20,
      takenAt: '2025-03-02T20:00:00Z',
    });
    const id = r.json.reading.id;
    const e = await metric.distiller.patch(`/api/readings/${id}`, { value: 1.041 });
    expect(e.status, e.text).toBe(200);
    expect(e.json.reading.rawValue).toBe(1.041);
    expect(e.json.reading.correctedSg).toBeCloseTo(1.041, 9); // read at the calibration temperature: no correction
    const audits = await getDb()
      .select()
      .from(t.auditLog)
      .where(and(eq(t.auditLog.workspaceId, metric.ws.workspaceId), eq(t.auditLog.entityId, String(id))));
    const upd = audits.find((a) => a.action === 'reading.update');
    expect((upd!.details as any).before.rawValue).toBe(1.04);
    expect((upd!.details as any).after.rawValue).toBe(1.041);
    const d = await metric.distiller.del(`/api/readings/${id}`);
    expect(d.status).toBe(204);
    const [row] = await getDb().select().from(t.readings).where(eq(t.readings.id, id));
    expect(row!.deletedAt).not.toBeNull();
    expect(row!.rawValue).toBe(1.041);
    const list = await metric.distiller.get(`/api/ferments/${metric.fermentId}/readings`);
    expect(list.json.readings.some((x: any) => x.id === id)).toBe(false);
    const audits2 = await getDb()
      .select()
      .from(t.auditLog)
      .where(and(eq(t.auditLog.workspaceId, metric.ws.workspaceId), eq(t.auditLog.entityId, String(id))));
    expect(audits2.some((a) => a.action === 'reading.delete')).toBe(true);
    expect((await metric.distiller.del(`/api/readings/${id}`)).status).toBe(404);
  });

  it('refuses staff (read only) and answers 404 across workspaces', async () => {
    const s = await metric.staff.post(`/api/ferments/${metric.fermentId}/readings`, { value: 1.03, unit: 'sg', method: 'digital' });
    expect(s.status).toBe(403);
    const other = await us.distiller.post(`/api/ferments/${metric.fermentId}/readings`, { value: 1.03, unit: 'sg', method: 'digital' });
    expect(other.status).toBe(404);
    expect((await us.distiller.get(`/api/ferments/${metric.fermentId}`)).status).toBe(404);
    const [mine] = await readingRows(metric.ws.workspaceId, metric.fermentId);
    expect((await us.distiller.patch(`/api/readings/${mine!.id}`, { value: 1.0 })).status).toBe(404);
    expect((await us.distiller.del(`/api/readings/${mine!.id}`)).status).toBe(404);
  });
});
