/**
 * One meaning of "at risk" end to end: a run booked before its wash is likely ready reads so,
 * never "wash late"; a run booked safely whose wash's ready window then moves past it reads
 * "wash late"; suggestions and the Book prefill land inside the still's hours with room for the
 * run and its cleaning; overnight shifts; closures beyond the booking horizon.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import type { Client } from '../helpers/api';
import { addFerment, at, boardFixture, iso, type BoardFixture } from '../helpers/board-fixture';
import { fermentBooking, hydrateBoard, runsAtRisk, type BoardPayload } from '../../src/lib/board';
import { addDaysYmd, wallClock, weekdayOfYmd, zonedDateTime } from '../../src/lib/schedule';

const HOUR = 3_600_000;
const TZ = 'Europe/London';
/** Normal table: z(0.8) / z(0.9) = 0.8416 / 1.2816, how far from the median towards P90 the 80 % quantile lies. */
const Q80_SHARE = 0.8416 / 1.2816;

interface Forecast {
  status: string;
  readyAt: string | null;
  readyP10: string | null;
  readyP90: string | null;
}
const q80 = (f: Forecast) => Date.parse(f.readyAt!) + (Date.parse(f.readyP90!) - Date.parse(f.readyAt!)) * Q80_SHARE;

async function board(c: Client, from: Date, to: Date): Promise<BoardPayload> {
  const r = await c.get(`/api/board?from=${encodeURIComponent(iso(from))}&to=${encodeURIComponent(iso(to))}`, { 'cache-control': 'no-cache' });
  expect(r.status, r.text).toBe(200);
  return r.json;
}

describe('risk words, suggestions inside the hours, overnight shifts, closures within the horizon', () => {
  let fx: BoardFixture;
  let planner: Client;
  let manager: Client;
  beforeAll(async () => {
    fx = await boardFixture('Risk Words Distillery', TZ);
    [planner, manager] = await Promise.all([fx.client('planner'), fx.client('manager')]);
  });

  it('a run booked before its wash is likely ready reads "booked before its wash is likely ready", never "wash late"', async () => {
    // Pitched a day ago and still falling fast: the ready window lies days ahead.
    const fermentId = await addFerment(fx, { code: 'RW-EARLY', fermenter: 0, pitchedDaysAgo: 1, og: 1.062, k: 0.35, volume: 2000 });
    const fc: Forecast = (await planner.get(`/api/ferments/${fermentId}/forecast`)).json.forecast;
    expect(fc.readyP10, JSON.stringify(fc)).not.toBeNull();
    const start = at(0, 3);
    expect(start.getTime()).toBeLessThan(Date.parse(fc.readyP10!));
    const r = await planner.post('/api/runs', {
      stillId: fx.stills.ws2,
      type: 'stripping',
      startsAt: iso(start),
      durationMinutes: 240,
      ferments: [{ fermentId, litres: 2000 }],
    });
    expect(r.status, r.text).toBe(201);
    expect(r.json.run.bookedAtRisk).toBe(true);
    const ready = r.json.warnings.find((w: { code: string }) => w.code === 'booked_before_ready');
    expect(ready.severity).toBe('danger');
    expect(ready.message).toMatch(/^Booked before its wash is likely ready: wash RW-EARLY /);
    expect(JSON.stringify(r.json.warnings)).not.toMatch(/wash late/i);

    const payload = await board(planner, at(-1), at(14));
    expect(payload.atRiskThreshold).toBe(0.8);
    const b = hydrateBoard(payload);
    const mine = runsAtRisk(b.runs, b.ferments, b.now, b.atRiskThreshold).find((x) => x.run.id === r.json.run.id);
    expect(mine?.reasons.map((x) => x.why)).toEqual(['early']);
  });

  it('judges the risk at booking on the forecast even when nobody has looked at the wash yet', async () => {
    // No forecast has been read or cached for this wash before the booking.
    const fermentId = await addFerment(fx, { code: 'RW-FRESH', fermenter: 0, pitchedDaysAgo: 1, og: 1.062, k: 0.35, volume: 400 });
    const r = await planner.post('/api/runs', {
      stillId: fx.stills.small,
      type: 'stripping',
      startsAt: iso(at(0, 5)),
      durationMinutes: 120,
      ferments: [{ fermentId, litres: 300 }],
    });
    expect(r.status, r.text).toBe(201);
    expect(r.json.run.bookedAtRisk).toBe(true);
    const b = hydrateBoard(await board(planner, at(-1), at(14)));
    const mine = runsAtRisk(b.runs, b.ferments, b.now, b.atRiskThreshold).find((x) => x.run.id === r.json.run.id);
    expect(mine?.reasons.map((x) => x.why)).toEqual(['early']);
  });

  it('a run booked safely whose wash then falls behind reads "wash late"', async () => {
    // A quick ferment: pitched two days ago, falling with k = 0.9 a day towards 1.005.
    const fermentId = await addFerment(fx, { code: 'RW-LATE', fermenter: 1, pitchedDaysAgo: 2, og: 1.062, k: 0.9, volume: 2000 });
    const before: Forecast = (await planner.get(`/api/ferments/${fermentId}/forecast`)).json.forecast;
    expect(before.readyP90, JSON.stringify(before)).not.toBeNull();
    // Booked a little after the 80 % quantile: not at risk.
    const start = new Date(Math.ceil((q80(before) + HOUR) / HOUR) * HOUR);
    const r = await planner.post('/api/runs', {
      stillId: fx.stills.ws2,
      type: 'stripping',
      startsAt: iso(start),
      durationMinutes: 240,
      ferments: [{ fermentId, litres: 2000 }],
    });
    expect(r.status, r.text).toBe(201);
    expect(r.json.run.bookedAtRisk).toBe(false);
    expect(r.json.warnings.filter((w: { code: string }) => w.code === 'booked_before_ready')).toEqual([]);

    // The distiller's readings show it has slowed right down (still well above the finish range): the window moves later.
    const distiller = await fx.client('distiller');
    for (const [hoursAgo, sg] of [
      [6, 1.031],
      [3, 1.03],
      [1, 1.03],
    ] as const) {
      const added = await distiller.post(`/api/ferments/${fermentId}/readings`, {
        value: sg,
        unit: 'sg',
        method: 'hydrometer',
        sampleTemp: 20,
        takenAt: new Date(Date.now() - hoursAgo * HOUR).toISOString(),
        confirm: true,
      });
      expect(added.status, added.text).toBe(201);
    }
    const after: Forecast = (await planner.get(`/api/ferments/${fermentId}/forecast`)).json.forecast;
    // The premise of the case: the wash is still fermenting and its 80 % quantile now lies after the run's start.
    expect(['active', 'slowing', 'lag'], JSON.stringify(after)).toContain(after.status);
    expect(q80(after), JSON.stringify(after)).toBeGreaterThan(start.getTime());

    const run = await planner.get(`/api/runs/${r.json.run.id}`);
    expect(run.status, run.text).toBe(200);
    expect(run.json.run.bookedAtRisk).toBe(false);
    const late = run.json.warnings.find((w: { code: string }) => w.code === 'booked_before_ready');
    expect(late.message).toMatch(/^Wash late: wash RW-LATE /);
    const b = hydrateBoard(await board(planner, at(-1), at(14)));
    const mine = runsAtRisk(b.runs, b.ferments, b.now, b.atRiskThreshold).find((x) => x.run.id === r.json.run.id);
    expect(mine?.reasons.map((x) => x.why)).toEqual(['late']);

    // Moved again while at risk, it is booked early now, not late.
    const moved = await planner.patch(`/api/runs/${r.json.run.id}`, { version: run.json.run.version, startsAt: iso(new Date(start.getTime() - HOUR)) });
    expect(moved.status, moved.text).toBe(200);
    expect(moved.json.run.bookedAtRisk).toBe(true);
    expect(moved.json.warnings.find((w: { code: string }) => w.code === 'booked_before_ready').message).toMatch(/^Booked before its wash is likely ready/);
  });

  it('suggests a slot for a wash whose window ends on a closed day and after closing inside the next opening, with room for the run and its cleaning', async () => {
    // A day still: weekdays 08:00–18:00 with an hour of cleaning after each run; the only still that takes 2800 L.
    const hours = [1, 2, 3, 4, 5].map((weekday) => ({ weekday, open: '08:00', close: '18:00' }));
    const typicalMinutes = { stripping: 240, spirit: 420, redistillation: 360, cleaning: 120, maintenance: 240 };
    const created = await manager.post('/api/stills', {
      name: 'Day Still',
      kind: 'pot',
      capacityLitres: 3000,
      heatingKw: 60,
      operatingHours: hours,
      cleaningAfterRunMinutes: 60,
      typicalMinutes,
    });
    expect(created.status, created.text).toBe(201);
    const dayStill = created.json.still.id as number;
    const fermentId = await addFerment(fx, { code: 'RW-SLOT', fermenter: 2, pitchedDaysAgo: 1, og: 1.062, k: 0.35, volume: 2800 });
    const fc: Forecast = (await planner.get(`/api/ferments/${fermentId}/forecast`)).json.forecast;
    const safe = q80(fc);
    // Close the still on the day the wash stops being at risk, and the day after.
    const closedOn = wallClock(new Date(safe), TZ).ymd;
    const closure = await manager.post('/api/stills/closures', {
      stillId: dayStill,
      startsOn: closedOn,
      endsOn: addDaysYmd(closedOn, 1),
      reason: 'Boiler service',
    });
    expect(closure.status, closure.text).toBe(201);

    // Booked early on the day still, so it is at risk and the board offers to move it.
    const startYmd = wallClock(at(1), TZ).ymd;
    let bookYmd = startYmd;
    while (![1, 2, 3, 4, 5].includes(weekdayOfYmd(bookYmd)) || bookYmd >= closedOn) bookYmd = addDaysYmd(bookYmd, bookYmd >= closedOn ? -1 : 1);
    const r = await planner.post('/api/runs', {
      stillId: dayStill,
      type: 'stripping',
      startsAt: iso(zonedDateTime(bookYmd, '08:00', TZ)),
      durationMinutes: 300,
      ferments: [{ fermentId, litres: 2800 }],
    });
    expect(r.status, r.text).toBe(201);
    const s = await planner.get(`/api/board/suggestions?runId=${r.json.run.id}`);
    expect(s.status, s.text).toBe(200);
    expect(Math.abs(Date.parse(s.json.notBefore) - safe)).toBeLessThan(5 * 60_000);
    expect(s.json.slots.length).toBeGreaterThan(0);
    for (const slot of s.json.slots as Array<{ stillId: number; startsAt: string; endsAt: string }>) {
      expect(Date.parse(slot.startsAt)).toBeGreaterThanOrEqual(Date.parse(s.json.notBefore));
      expect(slot.stillId).toBe(dayStill);
      const start = wallClock(new Date(slot.startsAt), TZ);
      const end = wallClock(new Date(Date.parse(slot.endsAt) + 60 * 60_000), TZ);
      expect(start.ymd).toBe(end.ymd);
      expect([1, 2, 3, 4, 5]).toContain(start.weekday);
      expect([closedOn, addDaysYmd(closedOn, 1)]).not.toContain(start.ymd);
      expect(start.hm >= '08:00').toBe(true);
      // The run and its hour of cleaning end by 18:00.
      expect(end.hm <= '18:00').toBe(true);
    }

    // Book, from Washes to book, starts inside the hours of the still it picks, with room for run and cleaning.
    const b = hydrateBoard(await board(planner, at(-1), at(30)));
    const f = b.ferments.find((x) => x.id === fermentId)!;
    const booking = fermentBooking(f, b.stills, b.now, b.range.from, 12, TZ, { runs: b.runs.filter((x) => x.id !== r.json.run.id), atRiskThreshold: 0.8 })!;
    expect(booking.stillId).toBe(dayStill);
    const w = wallClock(booking.startsAt, TZ);
    expect(booking.startsAt.getTime()).toBeGreaterThanOrEqual(safe);
    expect([closedOn, addDaysYmd(closedOn, 1)]).not.toContain(w.ymd);
    expect([1, 2, 3, 4, 5]).toContain(w.weekday);
    expect(w.hm >= '08:00' && w.hm <= '18:00').toBe(true);
  });

  it('an overnight-shift still accepts a 23:00 run without an hours warning; the same opening and closing time is refused', async () => {
    const night = [0, 1, 2, 3, 4, 5, 6].map((weekday) => ({ weekday, open: '22:00', close: '06:00' }));
    const typicalMinutes = { stripping: 240, spirit: 420, redistillation: 360, cleaning: 120, maintenance: 240 };
    const base = { kind: 'pot', capacityLitres: 1000, heatingKw: 40, cleaningAfterRunMinutes: 30, typicalMinutes };
    const created = await manager.post('/api/stills', { ...base, name: 'Night Still', operatingHours: night });
    expect(created.status, created.text).toBe(201);
    expect(created.json.still.operatingHours[0]).toMatchObject({ open: '22:00', close: '06:00' });
    const ymd = wallClock(at(2), TZ).ymd;
    const startsAt = zonedDateTime(ymd, '23:00', TZ);
    const r = await planner.post('/api/runs', { stillId: created.json.still.id, type: 'cleaning', startsAt: iso(startsAt), durationMinutes: 180 });
    expect(r.status, r.text).toBe(201);
    expect(r.json.warnings.map((w: { code: string }) => w.code)).not.toContain('outside_hours');
    const past = await planner.post('/api/runs', {
      stillId: created.json.still.id,
      type: 'cleaning',
      startsAt: iso(zonedDateTime(addDaysYmd(ymd, 1), '05:00', TZ)),
      durationMinutes: 120,
    });
    expect(past.status, past.text).toBe(201);
    expect(past.json.warnings.map((w: { code: string }) => w.code)).toContain('outside_hours');

    const same = await manager.post('/api/stills', { ...base, name: 'Odd Still', operatingHours: [{ weekday: 1, open: '06:00', close: '06:00' }] });
    expect(same.status).toBe(400);
    expect(same.json.error.fields['operatingHours.0.close']).toMatch(/same/);
  });

  it('refuses a closure ending past the booking horizon, or starting years back, naming the field', async () => {
    const today = wallClock(new Date(), TZ).ymd;
    const far = await manager.post('/api/stills/closures', {
      stillId: null,
      startsOn: addDaysYmd(today, 30),
      endsOn: addDaysYmd(today, 400),
      reason: 'Too far',
    });
    expect(far.status).toBe(400);
    expect(far.json.error.fields.endsOn).toMatch(/at most 365 days ahead/);
    const y3000 = await manager.post('/api/stills/closures', { stillId: null, startsOn: '3000-01-08', endsOn: '3000-01-09', reason: 'Year 3000' });
    expect(y3000.status).toBe(400);
    expect(Object.keys(y3000.json.error.fields)).toEqual(expect.arrayContaining(['startsOn']));
    const old = await manager.post('/api/stills/closures', { stillId: null, startsOn: '2001-01-01', endsOn: '2001-01-02', reason: 'Long ago' });
    expect(old.status).toBe(400);
    expect(old.json.error.fields.startsOn).toMatch(/two years back/);
    const near = await manager.post('/api/stills/closures', {
      stillId: null,
      startsOn: addDaysYmd(today, 364),
      endsOn: addDaysYmd(today, 365),
      reason: 'Last day in reach',
    });
    expect(near.status, near.text).toBe(201);
  });
});
