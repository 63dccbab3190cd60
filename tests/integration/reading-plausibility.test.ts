/**
 * Readings that look wrong are held. A manual reading that implies more than 100 % apparent
 * attenuation, lies above the OG, or sits far off the fitted curve gets 409 `confirm_reading`
 * (with the value and unit as entered) until it is sent again with `confirm: true`; uploaded rows,
 * which cannot answer, are stored with a review reason and left out of the forecast until
 * accepted. A manual and a logger reading within a minute are flagged as a likely duplicate, and
 * readings dated in the future are refused on every path.
 *
 * Apparent attenuation = (OG − SG) / (OG − 1) (common practice, the brewer's definition);
 * 0.001 SG is one hydrometer mark (common practice).
 */
import { describe, it, expect, beforeAll } from 'vitest';
import { and, desc, eq, isNull } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { createTestWorkspace, type Client, type TestWorkspace } from '../helpers/api';

const DAY = 86_400_000;
const attenuationPct = (og: number, sg: number) => Math.round(((og - sg) / (og - 1)) * 100);

async function rows(workspaceId: number, fermentId: number) {
  return getDb()
    .select()
    .from(t.readings)
    .where(and(eq(t.readings.workspaceId, workspaceId), eq(t.readings.fermentId, fermentId), isNull(t.readings.deletedAt)));
}

const upload = (c: Client, fermentId: number, csv: string) => c.request('POST', `/api/ferments/${fermentId}/uploads`, csv, { 'content-type': 'text/csv' });

describe('reading plausibility', () => {
  let ws: TestWorkspace;
  let planner: Client;
  let distiller: Client;
  let washTypeId: number;
  let n = 0;
  /** A grain ferment (terminal 1.002–1.008) pitched `daysAgo` days ago at OG 1.060. */
  const mk = async (daysAgo = 2) => {
    const pitchedAt = new Date(Math.floor((Date.now() - daysAgo * DAY) / 60_000) * 60_000);
    const f = await planner.post('/api/ferments', {
      code: `PL-${++n}`,
      washTypeId,
      fermenterId: null,
      volume: 2000,
      pitchedAt: pitchedAt.toISOString(),
      og: 1.06,
    });
    expect(f.status, f.text).toBe(201);
    return { id: f.json.ferment.id as number, pitchedAt };
  };
  const at = (pitchedAt: Date, days: number) => new Date(pitchedAt.getTime() + days * DAY).toISOString();

  beforeAll(async () => {
    ws = await createTestWorkspace('Plausibility');
    const manager = await ws.client('manager');
    const wt = await manager.post('/api/wash-types', { name: 'Grain', category: 'grain', terminalMin: 1.002, terminalMax: 1.008, typicalOg: 1.06 });
    expect(wt.status).toBe(201);
    washTypeId = wt.json.washType.id;
    planner = await ws.client('planner');
    distiller = await ws.client('distiller');
  });

  it('holds a reading past 100 % apparent attenuation, naming the value and unit entered, then stores it when confirmed', async () => {
    const f = await mk();
    const body = { value: 0.99, unit: 'sg', method: 'digital', takenAt: at(f.pitchedAt, 1) };
    const held = await distiller.post(`/api/ferments/${f.id}/readings`, body);
    expect(held.status, held.text).toBe(409);
    expect(held.json.error.code).toBe('confirm_reading');
    expect(held.json.error.message).toContain('0.990 SG');
    expect(held.json.error.message).toContain(`${attenuationPct(1.06, 0.99)} % apparent attenuation`); // 117 %
    expect(held.json.error.message).toContain('OG 1.060');
    expect(held.json.error.fields.value).toBe(held.json.error.message);
    expect(await rows(ws.workspaceId, f.id)).toHaveLength(0);

    const ok = await distiller.post(`/api/ferments/${f.id}/readings`, { ...body, confirm: true });
    expect(ok.status, ok.text).toBe(201);
    expect(ok.json.reading.reviewReason).toBeNull();
    const [row] = await rows(ws.workspaceId, f.id);
    expect(row!.reviewReason).toBeNull();
    const [entry] = await getDb()
      .select()
      .from(t.auditLog)
      .where(and(eq(t.auditLog.workspaceId, ws.workspaceId), eq(t.auditLog.action, 'reading.create'), eq(t.auditLog.entityId, String(row!.id))))
      .orderBy(desc(t.auditLog.id))
      .limit(1);
    expect((entry!.details as Record<string, unknown>).confirmed).toBe(true);
  });

  it('says °Bx when the unit entered was °Bx, and offers SG when the number reads as a gravity', async () => {
    const f = await mk();
    // A gravity typed while the form still said °Brix, read on a refractometer after fermentation started.
    const r = await distiller.post(`/api/ferments/${f.id}/readings`, { value: 1.012, unit: 'brix', method: 'refractometer', takenAt: at(f.pitchedAt, 1.5) });
    // Terrill's (2011) cubic reads 1.0 °Bx at OG 1.060 as about 0.981 SG: about 132 % apparent attenuation.
    expect(r.status, r.text).toBe(409);
    expect(r.json.error.message).toContain('You entered 1.012 °Bx');
    expect(r.json.error.message).toMatch(/13\d % apparent attenuation for OG 1\.060/);
    expect(r.json.error.message).toMatch(/Did you mean 1\.012 SG\?/);
    expect(r.json.confirm.suggestion).toEqual({ value: 1.012, unit: 'sg' });
    // A gravity typed with the SG unit where a Brix number was meant is refused outright, with the guess.
    const big = await distiller.post(`/api/ferments/${f.id}/readings`, {
      value: 12,
      unit: 'sg',
      method: 'hydrometer',
      sampleTemp: 20,
      takenAt: at(f.pitchedAt, 1.5),
    });
    expect(big.status).toBe(400);
    expect(big.json.error.fields.value).toMatch(/Did you mean 12 °Bx\?/);
  });

  it('holds a reading above the OG, and says so in the number format of the distillery', async () => {
    const f = await mk();
    const r = await distiller.post(`/api/ferments/${f.id}/readings`, { value: 1.07, unit: 'sg', method: 'digital', takenAt: at(f.pitchedAt, 0.5) });
    expect(r.status, r.text).toBe(409);
    expect(r.json.error.message).toContain('1.070 SG');
    expect(r.json.error.message).toContain('above the OG 1.060');
    // Within two hydrometer marks of the OG is a normal first reading.
    const near = await distiller.post(`/api/ferments/${f.id}/readings`, { value: 1.061, unit: 'sg', method: 'digital', takenAt: at(f.pitchedAt, 0.1) });
    expect(near.status, near.text).toBe(201);

    const commaWs = await createTestWorkspace('Plausibility comma', { numberFormat: 'comma' });
    const m = await commaWs.client('manager');
    const wt = await m.post('/api/wash-types', { name: 'Grain', category: 'grain', terminalMin: 1.002, terminalMax: 1.008 });
    const pitchedAt = new Date(Date.now() - DAY);
    const cf = await m.post('/api/ferments', {
      code: 'C-1',
      washTypeId: wt.json.washType.id,
      fermenterId: null,
      volume: 2000,
      pitchedAt: pitchedAt.toISOString(),
      og: 1.06,
    });
    expect(cf.status, cf.text).toBe(201);
    const cr = await m.post(`/api/ferments/${cf.json.ferment.id}/readings`, { value: 1.07, unit: 'sg', method: 'digital', takenAt: at(pitchedAt, 0.5) });
    expect(cr.status).toBe(409);
    expect(cr.json.error.message).toContain('1,070 SG');
    expect(cr.json.error.message).toContain('OG 1,060');
  });

  it('holds a reading far off the fitted curve once the fit stands on enough readings', async () => {
    const f = await mk(4);
    // A clean fall from 1.060 towards 1.005 (first-order shape), every 12 hours.
    const curve = (d: number) => 1.005 + 0.055 * Math.exp(-0.9 * d);
    for (const d of [0.25, 0.75, 1.25, 1.75, 2.25, 2.75, 3.25]) {
      const r = await distiller.post(`/api/ferments/${f.id}/readings`, {
        value: Math.round(curve(d) * 1000) / 1000,
        unit: 'sg',
        method: 'digital',
        takenAt: at(f.pitchedAt, d),
      });
      expect(r.status, r.text).toBe(201);
    }
    const fc = await distiller.get(`/api/ferments/${f.id}/forecast`);
    expect(fc.json.forecast.fit, 'the forecast has a fit').not.toBeNull();
    const expected = curve(3.6);
    const off = Math.round((expected + 0.02) * 1000) / 1000;
    const r = await distiller.post(`/api/ferments/${f.id}/readings`, { value: off, unit: 'sg', method: 'digital', takenAt: at(f.pitchedAt, 3.6) });
    expect(r.status, r.text).toBe(409);
    expect(r.json.error.message).toMatch(/SG off the fitted curve/);
    expect(r.json.confirm.reason).toMatch(/^0\.0[12]\d SG off the curve$/);
    // On the curve (within 0.010 SG) it is stored at once.
    const on = await distiller.post(`/api/ferments/${f.id}/readings`, {
      value: Math.round((expected + 0.002) * 1000) / 1000,
      unit: 'sg',
      method: 'digital',
      takenAt: at(f.pitchedAt, 3.6),
    });
    expect(on.status, on.text).toBe(201);
    // An edit that moves a reading off the curve asks the same question.
    const edit = await distiller.patch(`/api/readings/${on.json.reading.id}`, { value: off });
    expect(edit.status, edit.text).toBe(409);
    expect(edit.json.error.code).toBe('confirm_reading');
    const confirmed = await distiller.patch(`/api/readings/${on.json.reading.id}`, { value: off, confirm: true });
    expect(confirmed.status, confirmed.text).toBe(200);
    expect(confirmed.json.reading.rawValue).toBe(off);
  });

  it('stores uploaded rows that look wrong flagged for review, counts them in the preview, and leaves them out of the forecast until accepted', async () => {
    const f = await mk();
    const csv = [
      'time,value,unit,method,temperature',
      `${at(f.pitchedAt, 0.5)},1.050,sg,digital,`,
      `${at(f.pitchedAt, 1)},1.040,sg,digital,`,
      `${at(f.pitchedAt, 1.5)},0.985,sg,digital,`,
    ].join('\n');
    const staged = await upload(distiller, f.id, csv);
    expect(staged.status, staged.text).toBe(201);
    const p = staged.json.preview;
    expect(p.counts.rejected).toBe(0);
    expect(p.counts.held).toBe(1);
    const heldRow = p.accepted.find((r: { value: number }) => r.value === 0.985);
    expect(heldRow.review).toBe(`${attenuationPct(1.06, 0.985)} % apparent attenuation`); // 125 %
    const c = await distiller.post(`/api/ferments/${f.id}/uploads/${p.uploadId}/commit`, {});
    expect(c.status, c.text).toBe(200);
    expect(c.json).toMatchObject({ imported: 3, held: 1 });

    const stored = await rows(ws.workspaceId, f.id);
    expect(stored).toHaveLength(3);
    const held = stored.find((r) => r.rawValue === 0.985)!;
    expect(held.reviewReason).toBe('125 % apparent attenuation');
    const list = await distiller.get(`/api/ferments/${f.id}/readings`);
    expect(list.json.readings.find((r: { id: number }) => r.id === held.id).reviewReason).toBe('125 % apparent attenuation');

    // The forecast's last reading is the last one that counts, not the held one.
    const before = await distiller.get(`/api/ferments/${f.id}/forecast`);
    expect(before.json.forecast.lastSg).toBeCloseTo(1.04, 6);

    const staff = await ws.client('staff');
    expect((await staff.post(`/api/readings/${held.id}/accept`, {})).status).toBe(403);
    const accepted = await distiller.post(`/api/readings/${held.id}/accept`, {});
    expect(accepted.status, accepted.text).toBe(200);
    expect(accepted.json.reading.reviewReason).toBeNull();
    const after = await distiller.get(`/api/ferments/${f.id}/forecast`);
    expect(after.json.forecast.lastSg).toBeCloseTo(0.985, 6);
    const again = await distiller.post(`/api/readings/${held.id}/accept`, {});
    expect(again.status).toBe(409);
    const [audit] = await getDb()
      .select()
      .from(t.auditLog)
      .where(and(eq(t.auditLog.workspaceId, ws.workspaceId), eq(t.auditLog.action, 'reading.accept'), eq(t.auditLog.entityId, String(held.id))));
    expect((audit!.details as Record<string, unknown>).reviewReason).toBe('125 % apparent attenuation');
  });

  it('flags a manual and a logger reading within the same minute as a likely duplicate, whichever came second', async () => {
    const f = await mk();
    // Europe/London in winter is UTC+0, in summer UTC+1: the workspace clock time is what the reason shows.
    const manualAt = new Date(f.pitchedAt.getTime() + DAY);
    manualAt.setUTCSeconds(5, 0);
    const clock = new Intl.DateTimeFormat('en-GB', { timeZone: 'Europe/London', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(manualAt);
    const m = await distiller.post(`/api/ferments/${f.id}/readings`, { value: 1.04, unit: 'sg', method: 'digital', takenAt: manualAt.toISOString() });
    expect(m.status, m.text).toBe(201);
    expect(m.json.reading.reviewReason).toBeNull();
    const loggerAt = new Date(manualAt.getTime() + 30_000).toISOString();
    const laterAt = new Date(manualAt.getTime() + 3 * 3_600_000);
    const csv = ['time,value,unit,method,temperature', `${loggerAt},1.040,sg,digital,`, `${laterAt.toISOString()},1.035,sg,digital,`].join('\n');
    const staged = await upload(distiller, f.id, csv);
    expect(staged.status, staged.text).toBe(201);
    expect(staged.json.preview.counts.held).toBe(1);
    expect(staged.json.preview.accepted[0].review).toBe(`likely duplicate of a manual reading at ${clock}`);
    expect((await distiller.post(`/api/ferments/${f.id}/uploads/${staged.json.preview.uploadId}/commit`, {})).status).toBe(200);

    // A manual reading typed after the logger's, in the same minute as it.
    const later = await distiller.post(`/api/ferments/${f.id}/readings`, {
      value: 1.035,
      unit: 'sg',
      method: 'digital',
      takenAt: new Date(laterAt.getTime() + 20_000).toISOString(),
    });
    expect(later.status, later.text).toBe(201);
    const laterClock = new Intl.DateTimeFormat('en-GB', { timeZone: 'Europe/London', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(laterAt);
    expect(later.json.reading.reviewReason).toBe(`likely duplicate of a logger reading at ${laterClock}`);
  });

  it('refuses readings dated in the future on the manual, edit and upload paths', async () => {
    const f = await mk();
    const far = '3000-01-08T08:00:00.000Z';
    const soon = new Date(Date.now() + 60 * 60_000).toISOString(); // an hour ahead: beyond clock skew
    for (const takenAt of [far, soon]) {
      const r = await distiller.post(`/api/ferments/${f.id}/readings`, { value: 1.05, unit: 'sg', method: 'digital', takenAt });
      expect(r.status, r.text).toBe(400);
      expect(r.json.error.fields.takenAt).toMatch(/future/);
    }
    const ok = await distiller.post(`/api/ferments/${f.id}/readings`, { value: 1.05, unit: 'sg', method: 'digital', takenAt: at(f.pitchedAt, 0.5) });
    expect(ok.status, ok.text).toBe(201);
    const edit = await distiller.patch(`/api/readings/${ok.json.reading.id}`, { takenAt: far });
    expect(edit.status, edit.text).toBe(400);
    expect(edit.json.error.fields.takenAt).toMatch(/future/);

    const csv = ['time,value,unit,method,temperature', `${at(f.pitchedAt, 1)},1.040,sg,digital,`, `${far},1.030,sg,digital,`].join('\n');
    const staged = await upload(distiller, f.id, csv);
    expect(staged.status, staged.text).toBe(201);
    expect(staged.json.preview.counts.accepted).toBe(1);
    expect(staged.json.preview.rejected).toHaveLength(1);
    expect(staged.json.preview.rejected[0].reason).toMatch(/future/);
    expect((await distiller.post(`/api/ferments/${f.id}/uploads/${staged.json.preview.uploadId}/commit`, {})).status).toBe(200);
    const stored = await rows(ws.workspaceId, f.id);
    expect(stored.every((r) => r.takenAt.getTime() < Date.now() + 5 * 60_000)).toBe(true);
  });
});
