/**
 * Runs at their real times: Start and Finish ask for confirmation in words when something looks
 * wrong, a planner corrects the actual times afterwards (audited), the calendar event moves to
 * the actual times with SEQUENCE raised, reports count actual hours beside booked hours, and
 * bookings past the horizon or feed links without litres are refused naming the field.
 * Rules checked: RFC 5545 §3.8.2.2/§3.8.7.4 (DTEND after DTSTART, SEQUENCE raised on each
 * revision); "a finish minutes after a start is a mis-tap" and "start no earlier than the
 * booking allows" are common practice on the still floor.
 */
import { describe, it, expect, beforeAll } from 'vitest';
import ICAL from 'ical.js';
import { and, eq } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import type { Client } from '../helpers/api';
import { addFerment, at, boardFixture, iso, type BoardFixture } from '../helpers/board-fixture';

const HOUR = 3_600_000;
const MIN = 60_000;

async function auditRows(fx: BoardFixture, runId: number) {
  return getDb()
    .select()
    .from(t.auditLog)
    .where(and(eq(t.auditLog.workspaceId, fx.workspaceId), eq(t.auditLog.entityId, String(runId))));
}

/** The run's VEVENT as ical.js reads it (start, end in ms, SEQUENCE). */
async function feedEvent(url: string, workspaceId: number, runId: number) {
  const text = await (await fetch(url, { headers: { 'cache-control': 'no-cache' } })).text();
  const cal = new ICAL.Component(ICAL.parse(text));
  const c = cal.getAllSubcomponents('vevent').find((v) => String(v.getFirstPropertyValue('uid')).startsWith(`run-${workspaceId}-${runId}@`));
  if (!c) throw new Error(`run ${runId} is not in the feed`);
  const ev = new ICAL.Event(c);
  return {
    start: ev.startDate.toJSDate().getTime(),
    end: ev.endDate.toJSDate().getTime(),
    sequence: Number(c.getFirstPropertyValue('sequence')),
    description: ev.description,
  };
}
const wholeSecond = (d: Date | string) => Math.floor(new Date(d).getTime() / 1000) * 1000;

describe('runs at their real times', () => {
  let fx: BoardFixture;
  let manager: Client;
  let planner: Client;
  let distiller: Client;
  let staff: Client;

  beforeAll(async () => {
    fx = await boardFixture('Actual Times Distillery');
    [manager, planner, distiller, staff] = await Promise.all([fx.client('manager'), fx.client('planner'), fx.client('distiller'), fx.client('staff')]);
  });

  async function book(body: Record<string, unknown>) {
    const r = await planner.post('/api/runs', body);
    expect(r.status, r.text).toBe(201);
    return r.json.run as { id: number; version: number; sequence: number; startsAt: string; endsAt: string };
  }

  it('asks before a start well ahead of the booking, in words, and records what was accepted', async () => {
    // Booked 3 h from the hour: more than the default margin ahead.
    const startsAt = new Date(at(0, 3).getTime());
    const run = await book({ stillId: fx.stills.ws2, type: 'cleaning', startsAt: iso(startsAt), endsAt: iso(new Date(startsAt.getTime() + 2 * HOUR)) });
    const asked = await distiller.post(`/api/runs/${run.id}/start`, { version: run.version });
    expect(asked.status, asked.text).toBe(409);
    expect(asked.json.error.code).toBe('confirm_required');
    expect(asked.json.warnings).toHaveLength(1);
    expect(asked.json.warnings[0]).toMatch(/^This is (\d+ h( \d+ min)?|\d+ min) before the booked start \(.*\d{2}:\d{2}\)\.$/);
    // Nothing changed.
    const still = await distiller.get(`/api/runs/${run.id}`);
    expect(still.json.run.status).toBe('planned');
    expect(still.json.run.startedAt).toBeNull();

    const started = await distiller.post(`/api/runs/${run.id}/start`, { version: run.version, confirm: true });
    expect(started.status, started.text).toBe(200);
    expect(started.json.run.status).toBe('running');
    expect(Math.abs(Date.parse(started.json.run.startedAt) - Date.now())).toBeLessThan(60_000);
    // The booking is kept for comparison.
    expect(started.json.run.startsAt).toBe(run.startsAt);
    const start = (await auditRows(fx, run.id)).find((a) => a.action === 'run.start')!;
    expect((start.details as { accepted?: string[] }).accepted).toEqual(asked.json.warnings);
  });

  it('asks before starting on a wash that is not confirmed stable, naming the wash', async () => {
    // Pitched a day ago: still fermenting hard, so nowhere near confirmed stable. Booked tomorrow, so the early start is asked too.
    const fermentId = await addFerment(fx, { code: 'AT-0412', fermenter: 0, pitchedDaysAgo: 1 });
    const startsAt = at(1, 8);
    const run = await book({
      stillId: fx.stills.ws1,
      type: 'stripping',
      startsAt: iso(startsAt),
      endsAt: iso(new Date(startsAt.getTime() + 4 * HOUR)),
      ferments: [{ fermentId, litres: 2000 }],
    });
    const asked = await distiller.post(`/api/runs/${run.id}/start`, { version: run.version });
    expect(asked.status, asked.text).toBe(409);
    expect(asked.json.error.code).toBe('confirm_required');
    expect(asked.json.warnings.some((w: string) => w.startsWith('Wash AT-0412 is not confirmed stable yet: '))).toBe(true);
    expect(asked.json.error.message).toContain('Wash AT-0412 is not confirmed stable yet');
    const started = await distiller.post(`/api/runs/${run.id}/start`, { version: run.version, confirm: true });
    expect(started.status, started.text).toBe(200);
  });

  it('starts at once when nothing needs asking', async () => {
    const startsAt = at(0, 0);
    const run = await book({ stillId: fx.stills.small, type: 'cleaning', startsAt: iso(startsAt), endsAt: iso(new Date(startsAt.getTime() + HOUR)) });
    const started = await distiller.post(`/api/runs/${run.id}/start`, { version: run.version });
    expect(started.status, started.text).toBe(200);
    const start = (await auditRows(fx, run.id)).find((a) => a.action === 'run.start')!;
    expect((start.details as { accepted?: string[] }).accepted).toBeUndefined();
  });

  it('questions a finish seconds after the start, and finishes with confirm', async () => {
    const startsAt = at(1, 2);
    const run = await book({ stillId: fx.stills.small, type: 'maintenance', startsAt: iso(startsAt), endsAt: iso(new Date(startsAt.getTime() + HOUR)) });
    const started = await distiller.post(`/api/runs/${run.id}/start`, { version: run.version, confirm: true });
    expect(started.status, started.text).toBe(200);
    const asked = await distiller.post(`/api/runs/${run.id}/finish`, { version: started.json.run.version });
    expect(asked.status, asked.text).toBe(409);
    expect(asked.json.error.code).toBe('confirm_required');
    expect(asked.json.warnings).toHaveLength(1);
    expect(asked.json.warnings[0]).toMatch(/^Finished \d+ s after it started — is that right\?$/);
    expect((await distiller.get(`/api/runs/${run.id}`)).json.run.status).toBe('running');
    const done = await distiller.post(`/api/runs/${run.id}/finish`, { version: started.json.run.version, confirm: true });
    expect(done.status, done.text).toBe(200);
    expect(done.json.run.status).toBe('done');
    expect(done.json.run.finishedAt).not.toBeNull();
    // The audit keeps the question as put when it was accepted (its seconds may have moved on since the first ask).
    const finish = (await auditRows(fx, run.id)).find((a) => a.action === 'run.finish')!;
    const accepted = (finish.details as { accepted?: string[] }).accepted ?? [];
    expect(accepted).toHaveLength(1);
    expect(accepted[0]).toMatch(/^Finished \d+ s after it started — is that right\?$/);
  });

  it('refuses a confirm flag that is not true (400 naming the field)', async () => {
    const r = await distiller.post('/api/runs/1/start', { version: 1, confirm: 'yes' });
    expect(r.status).toBe(400);
    expect(r.json.error.fields.confirm).toBeTruthy();
  });

  it('lets a planner correct the actual times (audited, version and SEQUENCE raised); distillers and staff may not', async () => {
    const startsAt = at(-1, 0);
    const endsAt = new Date(startsAt.getTime() + 4 * HOUR);
    const run = await book({ stillId: fx.stills.ws2, type: 'stripping', startsAt: iso(startsAt), endsAt: iso(endsAt), chargeLitres: 1500 });
    const started = await distiller.post(`/api/runs/${run.id}/start`, { version: run.version, confirm: true });
    const done = await distiller.post(`/api/runs/${run.id}/finish`, { version: started.json.run.version, confirm: true });
    expect(done.status, done.text).toBe(200);
    const v = done.json.run.version;
    const body = {
      version: v,
      startedAt: iso(new Date(startsAt.getTime() + 40 * MIN)),
      finishedAt: iso(new Date(endsAt.getTime() - 65 * MIN)),
      reason: 'Started late: steam valve',
    };

    expect((await distiller.patch(`/api/runs/${run.id}/actual-times`, body)).status).toBe(403);
    expect((await staff.patch(`/api/runs/${run.id}/actual-times`, body)).status).toBe(403);

    const noReason = await planner.patch(`/api/runs/${run.id}/actual-times`, { ...body, reason: undefined });
    expect(noReason.status).toBe(400);
    expect(noReason.json.error.fields.reason).toBeTruthy();
    const backwards = await planner.patch(`/api/runs/${run.id}/actual-times`, { ...body, finishedAt: iso(new Date(startsAt.getTime() + 10 * MIN)) });
    expect(backwards.status).toBe(400);
    expect(backwards.json.error.fields.finishedAt).toMatch(/^The finish must come after the start/);
    const future = await planner.patch(`/api/runs/${run.id}/actual-times`, { ...body, finishedAt: iso(new Date(Date.now() + 2 * HOUR)) });
    expect(future.status).toBe(400);
    expect(future.json.error.fields.finishedAt).toBe('A run cannot have finished in the future.');
    const far = await planner.patch(`/api/runs/${run.id}/actual-times`, { ...body, startedAt: iso(new Date(startsAt.getTime() - 9 * 24 * HOUR)) });
    expect(far.status).toBe(400);
    expect(far.json.error.fields.startedAt).toMatch(/within 7 days of the booked start/);
    const nothing = await planner.patch(`/api/runs/${run.id}/actual-times`, { version: v, reason: 'nothing to say' });
    expect(nothing.status).toBe(400);
    expect(nothing.json.error.fields.startedAt).toBeTruthy();

    const fixed = await planner.patch(`/api/runs/${run.id}/actual-times`, body);
    expect(fixed.status, fixed.text).toBe(200);
    expect(fixed.json.run.startedAt).toBe(body.startedAt);
    expect(fixed.json.run.finishedAt).toBe(body.finishedAt);
    expect(fixed.json.run.version).toBe(v + 1);
    expect(fixed.json.run.sequence).toBe(done.json.run.sequence + 1);
    // The booking is untouched.
    expect(fixed.json.run.startsAt).toBe(run.startsAt);
    expect(fixed.json.run.endsAt).toBe(run.endsAt);
    const row = (await auditRows(fx, run.id)).find((a) => a.action === 'run.correct_times')!;
    expect(row.userId).toBe(fx.users.planner.id);
    expect(row.details).toMatchObject({
      before: { startedAt: done.json.run.startedAt, finishedAt: done.json.run.finishedAt },
      after: { startedAt: body.startedAt, finishedAt: body.finishedAt },
      reason: body.reason,
    });
    // A stale version is refused; a manager may correct too.
    expect((await manager.patch(`/api/runs/${run.id}/actual-times`, body)).status).toBe(409);
    const byManager = await manager.patch(`/api/runs/${run.id}/actual-times`, {
      version: v + 1,
      finishedAt: iso(endsAt),
      reason: 'Finish was on time after all',
    });
    expect(byManager.status, byManager.text).toBe(200);
  });

  it('refuses a correction of a run that has not started (409)', async () => {
    const run = await book({ stillId: fx.stills.ws2, type: 'cleaning', startsAt: iso(at(3, 2)), endsAt: iso(at(3, 3)) });
    const r = await planner.patch(`/api/runs/${run.id}/actual-times`, { version: run.version, startedAt: iso(at(0, -1)), reason: 'typo' });
    expect(r.status).toBe(409);
    expect(r.json.error.message).toBe('A planned run has not started, so it has no actual times to correct.');
  });

  it('moves the calendar event to the actual times with SEQUENCE raised on start, finish and correction', async () => {
    const feed = await staff.post('/api/feeds', { scope: 'workspace', name: 'Actual times wall' });
    expect(feed.status, feed.text).toBe(201);
    const url = feed.json.url as string;
    const startsAt = at(0, -2);
    const endsAt = new Date(startsAt.getTime() + 5 * HOUR);
    const run = await book({ stillId: fx.stills.ws1, type: 'cleaning', startsAt: iso(startsAt), endsAt: iso(endsAt) });
    const booked = await feedEvent(url, fx.workspaceId, run.id);
    expect(booked.start).toBe(startsAt.getTime());

    const started = await distiller.post(`/api/runs/${run.id}/start`, { version: run.version, confirm: true });
    expect(started.status, started.text).toBe(200);
    const running = await feedEvent(url, fx.workspaceId, run.id);
    expect(running.start).toBe(wholeSecond(started.json.run.startedAt));
    expect(running.end).toBe(endsAt.getTime()); // while running: until the booked end
    expect(running.sequence).toBe(booked.sequence + 1);
    expect(running.description).toMatch(/^Started 2 h( \d+ min)? late \(booked /m);

    const done = await distiller.post(`/api/runs/${run.id}/finish`, { version: started.json.run.version, confirm: true });
    expect(done.status, done.text).toBe(200);
    const finished = await feedEvent(url, fx.workspaceId, run.id);
    expect(finished.start).toBe(wholeSecond(done.json.run.startedAt));
    // Finished seconds after starting: DTEND is kept a minute after DTSTART (RFC 5545: DTEND later than DTSTART).
    expect(finished.end).toBeGreaterThan(finished.start);
    expect(finished.sequence).toBe(running.sequence + 1);

    const realStart = new Date(startsAt.getTime() + 30 * MIN);
    const realEnd = new Date(startsAt.getTime() + 90 * MIN);
    const fixed = await planner.patch(`/api/runs/${run.id}/actual-times`, {
      version: done.json.run.version,
      startedAt: iso(realStart),
      finishedAt: iso(realEnd),
      reason: 'Entered late from the paper log',
    });
    expect(fixed.status, fixed.text).toBe(200);
    const corrected = await feedEvent(url, fx.workspaceId, run.id);
    expect(corrected.start).toBe(realStart.getTime());
    expect(corrected.end).toBe(realEnd.getTime());
    expect(corrected.sequence).toBe(finished.sequence + 1);
    expect(corrected.description).toContain('Started 30 min late, finished 3 h 30 min early');
  });

  it('sends the actual times to the board with the booking', async () => {
    const startsAt = at(2, 5);
    const run = await book({ stillId: fx.stills.ws2, type: 'maintenance', startsAt: iso(startsAt), endsAt: iso(new Date(startsAt.getTime() + HOUR)) });
    const started = await distiller.post(`/api/runs/${run.id}/start`, { version: run.version, confirm: true });
    const from = encodeURIComponent(iso(at(-1, 0)));
    const to = encodeURIComponent(iso(at(6, 0)));
    const board = await staff.get(`/api/board?from=${from}&to=${to}`, { 'cache-control': 'no-cache' });
    const onBoard = board.json.runs.find((r: { id: number }) => r.id === run.id);
    expect(onBoard.startedAt).toBe(started.json.run.startedAt);
    expect(onBoard.finishedAt).toBeNull();
    expect(onBoard.startsAt).toBe(run.startsAt);
  });
});

describe('reports count actual hours beside booked hours', () => {
  it('throughput and utilisation use the corrected actual hours and show the booked ones', async () => {
    const fx = await boardFixture('Actual Hours Distillery', 'UTC');
    const planner = await fx.client('planner');
    const distiller = await fx.client('distiller');
    const manager = await fx.client('manager');
    // Booked two days ago 08:00–12:00 UTC (4 h); really ran 08:30–13:00 (4.5 h).
    const day = new Date(Date.now() - 2 * 86_400_000).toISOString().slice(0, 10);
    const startsAt = new Date(`${day}T08:00:00Z`);
    const endsAt = new Date(`${day}T12:00:00Z`);
    const created = await planner.post('/api/runs', {
      stillId: fx.stills.ws2,
      type: 'stripping',
      startsAt: iso(startsAt),
      endsAt: iso(endsAt),
      chargeLitres: 2000,
    });
    expect(created.status, created.text).toBe(201);
    const run = created.json.run;
    const started = await distiller.post(`/api/runs/${run.id}/start`, { version: run.version, confirm: true });
    const done = await distiller.post(`/api/runs/${run.id}/finish`, { version: started.json.run.version, confirm: true });
    expect(done.status, done.text).toBe(200);
    const fixed = await planner.patch(`/api/runs/${run.id}/actual-times`, {
      version: done.json.run.version,
      startedAt: `${day}T08:30:00Z`,
      finishedAt: `${day}T13:00:00Z`,
      reason: 'Times from the still log',
    });
    expect(fixed.status, fixed.text).toBe(200);

    const r = await manager.get(`/api/reports?from=${day}&to=${day}&still=${fx.stills.ws2}`);
    expect(r.status, r.text).toBe(200);
    const report = r.json.report;
    const throughput = report.throughput.filter((w: { runs: number }) => w.runs > 0);
    expect(throughput).toHaveLength(1);
    // Hand-worked: booked 12:00 − 08:00 = 4 h; actual 13:00 − 08:30 = 4.5 h.
    expect(throughput[0].bookedHours).toBeCloseTo(4, 9);
    expect(throughput[0].actualHours).toBeCloseTo(4.5, 9);
    const util = report.utilisation.filter((u: { stillId: number }) => u.stillId === fx.stills.ws2);
    const sum = (k: string) => util.reduce((s: number, u: Record<string, number>) => s + u[k]!, 0);
    // The still is open around the clock: nothing is clipped.
    expect(sum('doneHours')).toBeCloseTo(4.5, 9);
    expect(sum('doneBookedHours')).toBeCloseTo(4, 9);
    expect(sum('actualHours')).toBeCloseTo(4.5, 9);
    expect(sum('bookedHours')).toBeCloseTo(4, 9);
    // Utilisation: 4.5 h over the one day's 24 open hours.
    const open = sum('availableHours');
    expect(open).toBeCloseTo(24, 9);
    expect(util.find((u: { availableHours: number }) => u.availableHours > 0).utilisation).toBeCloseTo(4.5 / 24, 9);
  });
});

describe('bookings the horizon and feed links refuse', () => {
  let fx: BoardFixture;
  let planner: Client;
  beforeAll(async () => {
    fx = await boardFixture('Horizon Distillery');
    planner = await fx.client('planner');
  });

  it('refuses a run more than the booking horizon ahead or back, naming the field', async () => {
    const ahead = await planner.post('/api/runs', { stillId: fx.stills.ws1, type: 'cleaning', startsAt: '3000-01-08T08:00:00Z', durationMinutes: 60 });
    expect(ahead.status).toBe(400);
    expect(ahead.json.error.fields.startsAt).toBe('Runs can be booked at most 365 days ahead; check the year.');
    const endOnly = await planner.post('/api/runs', {
      stillId: fx.stills.ws1,
      type: 'maintenance',
      startsAt: iso(at(364, 20)),
      endsAt: iso(at(366, 0)),
    });
    expect(endOnly.status).toBe(400);
    expect(endOnly.json.error.fields.endsAt).toBe('Runs can be booked at most 365 days ahead; check the year.');
    const back = await planner.post('/api/runs', { stillId: fx.stills.ws1, type: 'cleaning', startsAt: '2020-01-08T08:00:00Z', durationMinutes: 60 });
    expect(back.status).toBe(400);
    expect(back.json.error.fields.startsAt).toBe('Runs can be booked at most 365 days back; check the year.');
    const ok = await planner.post('/api/runs', { stillId: fx.stills.ws1, type: 'cleaning', startsAt: iso(at(300, 0)), durationMinutes: 60 });
    expect(ok.status, ok.text).toBe(201);
    const moved = await planner.patch(`/api/runs/${ok.json.run.id}`, { version: ok.json.run.version, startsAt: '3000-01-08T08:00:00Z' });
    expect(moved.status).toBe(400);
    expect(moved.json.error.fields.startsAt).toBe('Runs can be booked at most 365 days ahead; check the year.');
  });

  it('follows the distillery’s own horizon setting', async () => {
    await getDb().update(t.workspaces).set({ bookingHorizonDays: 30 }).where(eq(t.workspaces.id, fx.workspaceId));
    try {
      const r = await planner.post('/api/runs', { stillId: fx.stills.ws2, type: 'cleaning', startsAt: iso(at(40, 0)), durationMinutes: 60 });
      expect(r.status).toBe(400);
      expect(r.json.error.fields.startsAt).toBe('Runs can be booked at most 30 days ahead; check the year.');
    } finally {
      await getDb().update(t.workspaces).set({ bookingHorizonDays: 365 }).where(eq(t.workspaces.id, fx.workspaceId));
    }
  });

  it('refuses a spirit run’s link to a stripping run without litres instead of dropping it', async () => {
    const strip = await planner.post('/api/runs', { stillId: fx.stills.ws1, type: 'stripping', startsAt: iso(at(5, 6)), endsAt: iso(at(5, 10)) });
    expect(strip.status, strip.text).toBe(201);
    for (const line of [{ runId: strip.json.run.id, litres: 0 }, { runId: strip.json.run.id }]) {
      const r = await planner.post('/api/runs', { stillId: fx.stills.ws2, type: 'spirit', startsAt: iso(at(6, 6)), endsAt: iso(at(6, 12)), feeds: [line] });
      expect(r.status, r.text).toBe(400);
      expect(r.json.error.fields['feeds.0.litres']).toBe('Say how many litres of low wines come from this stripping run, or remove the link.');
    }
    const fine = await planner.post('/api/runs', {
      stillId: fx.stills.ws2,
      type: 'spirit',
      startsAt: iso(at(6, 6)),
      endsAt: iso(at(6, 12)),
      feeds: [{ runId: strip.json.run.id, litres: 400 }],
    });
    expect(fine.status, fine.text).toBe(201);
    expect(fine.json.run.feeds).toEqual([{ runId: strip.json.run.id, litres: 400 }]);
  });
});
