import { describe, expect, it } from 'vitest';
import { findOverlap, moveRunPreservingWallClock, shiftRun, snapToSlot, wallClock, zonedDateTime, type Run } from '../../src/lib/schedule';
import { utc } from '../helpers/time';

const HOUR = 3_600_000;

// Offsets and change dates below are the IANA tz rules (from memory): the UK
// is on GMT (UTC+0) in winter and BST (UTC+1) in summer, clocks going back at
// 01:00 UTC on the last Sunday of October (25 Oct 2026) and forward at 01:00
// UTC on the last Sunday of March (29 Mar 2026); US Central is CST (UTC−6) /
// CDT (UTC−5), clocks going forward at 02:00 local on the second Sunday of
// March (8 Mar 2026). India is UTC+5:30 and Nepal UTC+5:45 all year.

describe('zonedDateTime / wallClock', () => {
  it.each([
    { ymd: '2026-07-01', hm: '06:00', tz: 'Europe/London', expected: '2026-07-01T05:00:00.000Z' },
    { ymd: '2026-12-01', hm: '06:00', tz: 'Europe/London', expected: '2026-12-01T06:00:00.000Z' },
    { ymd: '2026-03-07', hm: '20:00', tz: 'America/Chicago', expected: '2026-03-08T02:00:00.000Z' },
    { ymd: '2026-03-08', hm: '20:00', tz: 'America/Chicago', expected: '2026-03-09T01:00:00.000Z' },
    // Fall-back night: 01:30 happens twice; the earlier (BST) one is chosen.
    { ymd: '2026-10-25', hm: '01:30', tz: 'Europe/London', expected: '2026-10-25T00:30:00.000Z' },
    // Spring-forward gaps: a skipped time moves forward by the gap.
    { ymd: '2026-03-29', hm: '01:30', tz: 'Europe/London', expected: '2026-03-29T01:30:00.000Z' },
    { ymd: '2026-03-08', hm: '02:30', tz: 'America/Chicago', expected: '2026-03-08T08:30:00.000Z' },
    { ymd: '2026-12-03', hm: '24:00', tz: 'Asia/Kolkata', expected: '2026-12-03T18:30:00.000Z' },
  ])('$ymd $hm in $tz is $expected', ({ ymd, hm, tz, expected }) => {
    expect(zonedDateTime(ymd, hm, tz).toISOString()).toBe(expected);
  });

  it.each([
    { instant: '2026-10-25T00:30', tz: 'Europe/London', ymd: '2026-10-25', hm: '01:30', weekday: 0 },
    { instant: '2026-10-25T01:30', tz: 'Europe/London', ymd: '2026-10-25', hm: '01:30', weekday: 0 },
    { instant: '2026-03-08T07:59', tz: 'America/Chicago', ymd: '2026-03-08', hm: '01:59', weekday: 0 },
    { instant: '2026-03-08T08:00', tz: 'America/Chicago', ymd: '2026-03-08', hm: '03:00', weekday: 0 },
    { instant: '2026-12-03T20:00', tz: 'Asia/Kolkata', ymd: '2026-12-04', hm: '01:30', weekday: 5 },
  ])('$instant UTC reads $ymd $hm in $tz', ({ instant, tz, ymd, hm, weekday }) => {
    expect(wallClock(utc(instant), tz)).toMatchObject({ ymd, hm, weekday });
  });

  it('rejects an unknown time zone and malformed input', () => {
    expect(() => wallClock(new Date(), 'Mars/Olympus')).toThrow(RangeError);
    expect(() => zonedDateTime('2026-1-5', '06:00', 'UTC')).toThrow(RangeError);
    expect(() => zonedDateTime('2026-01-05', '6am', 'UTC')).toThrow(RangeError);
  });
});

describe('moving runs across daylight-saving changes', () => {
  const run = (startsAt: Date, endsAt: Date): Run => ({
    id: 1,
    stillId: 1,
    type: 'stripping',
    status: 'planned',
    startsAt,
    endsAt,
    operatorId: null,
    chargeLitres: null,
    ferments: [],
    feeds: [],
  });

  it('Europe/London, 25 Oct 2026: an overnight run keeps its 22:00 start and its 9 true hours', () => {
    // 24 Oct 22:00 BST = 21:00Z to 25 Oct 06:00 GMT = 06:00Z: 9 hours of still time.
    const r = run(utc('2026-10-24T21:00'), utc('2026-10-25T06:00'));
    const moved = moveRunPreservingWallClock(r, '2026-10-31', 'Europe/London');
    expect(moved.startsAt.toISOString()).toBe('2026-10-31T22:00:00.000Z'); // 22:00 GMT
    expect(moved.endsAt.toISOString()).toBe('2026-11-01T07:00:00.000Z');
    expect(moved.endsAt.getTime() - moved.startsAt.getTime()).toBe(9 * HOUR);
    expect(wallClock(moved.startsAt, 'Europe/London').hm).toBe('22:00');
  });

  it('Europe/London: a run moved onto the change night keeps its start, and its end reads an hour earlier', () => {
    // 17 Oct 22:00 BST (21:00Z) to 18 Oct 06:00 BST (05:00Z): 8 hours.
    const r = run(utc('2026-10-17T21:00'), utc('2026-10-18T05:00'));
    const moved = moveRunPreservingWallClock(r, '2026-10-24', 'Europe/London');
    expect(moved.startsAt.toISOString()).toBe('2026-10-24T21:00:00.000Z');
    expect(moved.endsAt.toISOString()).toBe('2026-10-25T05:00:00.000Z');
    expect(wallClock(moved.endsAt, 'Europe/London').hm).toBe('05:00');
  });

  it('America/Chicago, 8 Mar 2026: a run across the change keeps its 20:00 start and its 10 true hours', () => {
    // 7 Mar 20:00 CST = 8 Mar 02:00Z, to 12:00Z = 07:00 CDT.
    const r = run(utc('2026-03-08T02:00'), utc('2026-03-08T12:00'));
    expect(wallClock(r.endsAt, 'America/Chicago').hm).toBe('07:00');
    const moved = moveRunPreservingWallClock(r, '2026-03-14', 'America/Chicago');
    expect(moved.startsAt.toISOString()).toBe('2026-03-15T01:00:00.000Z'); // 20:00 CDT
    expect(moved.endsAt.toISOString()).toBe('2026-03-15T11:00:00.000Z'); // 06:00 CDT
    expect(wallClock(moved.startsAt, 'America/Chicago').hm).toBe('20:00');
  });

  it('shiftRun keeps the length in milliseconds and leaves the original alone', () => {
    const r = run(utc('2026-03-07T14:00'), utc('2026-03-08T14:00'));
    const moved = shiftRun(r, utc('2026-03-01T09:15'));
    expect(moved.endsAt.toISOString()).toBe('2026-03-02T09:15:00.000Z');
    expect(r.startsAt.toISOString()).toBe('2026-03-07T14:00:00.000Z');
  });
});

describe('snapToSlot on the distillery clock', () => {
  it.each([
    // 05:40 IST -> 05:30 / 06:00 IST; a UTC grid would give 00:00Z / 00:30Z = 05:30 / 06:00 by chance, so also Nepal.
    { instant: '2026-12-03T00:10', tz: 'Asia/Kolkata', slot: 30, mode: 'nearest', expected: '2026-12-03T00:00:00.000Z' },
    { instant: '2026-12-03T00:10', tz: 'Asia/Kolkata', slot: 30, mode: 'up', expected: '2026-12-03T00:30:00.000Z' },
    // 05:45 NPT: a 30-minute local grid puts the next slot at 06:00 NPT = 00:15Z (a UTC grid would say 00:30Z).
    { instant: '2026-12-03T00:00', tz: 'Asia/Kathmandu', slot: 30, mode: 'up', expected: '2026-12-03T00:15:00.000Z' },
    { instant: '2026-12-03T00:00', tz: 'Asia/Kathmandu', slot: 30, mode: 'down', expected: '2026-12-02T23:45:00.000Z' },
    { instant: '2026-07-01T05:07', tz: 'Europe/London', slot: 15, mode: 'nearest', expected: '2026-07-01T05:00:00.000Z' },
    { instant: '2026-07-01T05:08', tz: 'Europe/London', slot: 15, mode: 'nearest', expected: '2026-07-01T05:15:00.000Z' },
    { instant: '2026-07-01T05:15', tz: 'Europe/London', slot: 15, mode: 'up', expected: '2026-07-01T05:15:00.000Z' },
    // 23:50 local rounds up to the next day's 00:00.
    { instant: '2026-12-03T23:50', tz: 'Europe/London', slot: 30, mode: 'up', expected: '2026-12-04T00:00:00.000Z' },
  ])('$instant UTC in $tz, $slot min $mode -> $expected', ({ instant, tz, slot, mode, expected }) => {
    expect(snapToSlot(utc(instant), slot, tz, mode as 'nearest' | 'up' | 'down').toISOString()).toBe(expected);
  });

  it('never snaps up to an earlier instant around a clock change', () => {
    const d = utc('2026-10-25T01:10'); // 01:10 GMT, second time round
    expect(snapToSlot(d, 30, 'Europe/London', 'up').getTime()).toBeGreaterThanOrEqual(d.getTime());
  });
});

describe('findOverlap with cleaning slots', () => {
  // Still with a 60-minute cleaning slot after each distillation run.
  const still = { cleaningAfterRunMinutes: 60 };
  const existing: Run = {
    id: 1,
    stillId: 1,
    type: 'stripping',
    status: 'planned',
    startsAt: utc('2026-12-03T08:00'),
    endsAt: utc('2026-12-03T14:00'),
    operatorId: null,
    chargeLitres: null,
    ferments: [],
    feeds: [],
  };
  const candidate = (start: string, end: string, over: Partial<Run> = {}) => ({
    id: 2,
    stillId: 1,
    type: 'stripping' as const,
    startsAt: utc(start),
    endsAt: utc(end),
    ...over,
  });

  it.each([
    { what: 'starts inside the run', c: candidate('2026-12-03T13:00', '2026-12-03T16:00'), overlaps: true },
    { what: 'starts inside the cleaning after it', c: candidate('2026-12-03T14:30', '2026-12-03T17:00'), overlaps: true },
    { what: 'starts when the cleaning ends', c: candidate('2026-12-03T15:00', '2026-12-03T18:00'), overlaps: false },
    { what: 'its own cleaning runs into the run', c: candidate('2026-12-03T06:00', '2026-12-03T07:30'), overlaps: true },
    { what: 'its own cleaning ends as the run starts', c: candidate('2026-12-03T06:00', '2026-12-03T07:00'), overlaps: false },
    {
      what: 'is a cleaning run just before (no cleaning after cleaning)',
      c: candidate('2026-12-03T07:00', '2026-12-03T08:00', { type: 'cleaning' }),
      overlaps: false,
    },
    { what: 'is on another still', c: candidate('2026-12-03T09:00', '2026-12-03T10:00', { stillId: 2 }), overlaps: false },
    { what: 'is the same run moved a little', c: candidate('2026-12-03T09:00', '2026-12-03T15:00', { id: 1 }), overlaps: false },
  ])('a candidate that $what: overlap $overlaps', ({ c, overlaps }) => {
    expect(findOverlap(c, [existing], still)).toEqual(overlaps ? existing : null);
  });

  it('a cancelled run blocks nothing', () => {
    expect(findOverlap(candidate('2026-12-03T09:00', '2026-12-03T10:00'), [{ ...existing, status: 'cancelled' }], still)).toBeNull();
  });

  it('without a cleaning slot, back-to-back runs fit', () => {
    expect(findOverlap(candidate('2026-12-03T14:00', '2026-12-03T16:00'), [existing], { cleaningAfterRunMinutes: 0 })).toBeNull();
  });

  it('returns the earliest of several overlapping runs', () => {
    const later = { ...existing, id: 3, startsAt: utc('2026-12-03T16:00'), endsAt: utc('2026-12-03T18:00') };
    expect(findOverlap(candidate('2026-12-03T10:00', '2026-12-03T17:00'), [later, existing], still)?.id).toBe(1);
  });
});
