import { describe, expect, it } from 'vitest';
import { availableHours, closesNextDay, computeRunWarnings, findEarliestSlots, openIntervals, type Run, type Still } from '../../src/lib/schedule';
import { utc } from '../helpers/time';

// Europe/London: GMT in December (wall clock = UTC). 7 Dec 2026 is a Monday.
const TZ = 'Europe/London';
const iso = (d: Date) => d.toISOString().slice(0, 16);

/** A night-shift still: Monday to Friday, opens 22:00 and closes at 06:00 the next morning. */
const nightStill = (over: Partial<Still> = {}): Still => ({
  id: 1,
  name: 'Night Still',
  capacityLitres: 2000,
  heatingKw: 45,
  operatingHours: ([1, 2, 3, 4, 5] as const).map((weekday) => ({ weekday, open: '22:00', close: '06:00' })),
  closures: [],
  cleaningAfterRunMinutes: 60,
  typicalMinutes: { stripping: 240, spirit: 360, redistillation: 300, cleaning: 60, maintenance: 120 },
  ...over,
});

const run = (start: string, end: string, over: Partial<Run> = {}): Run => ({
  id: 1,
  stillId: 1,
  type: 'stripping',
  status: 'planned',
  startsAt: utc(start),
  endsAt: utc(end),
  operatorId: null,
  chargeLitres: null,
  ferments: [],
  feeds: [],
  ...over,
});

const warningCodes = (r: Run, still = nightStill()) =>
  computeRunWarnings(r, { still, runs: [r], ferments: new Map(), timeZone: TZ, now: utc('2026-12-01T00:00') }).map((w) => w.code);

describe('overnight shifts: a closing time at or before the opening time closes the next day', () => {
  it.each([
    ['22:00', '06:00', true],
    ['22:00', '00:00', true],
    ['06:00', '22:00', false],
    ['00:00', '24:00', false],
  ])('%s–%s closes next day: %s', (open, close, expected) => {
    expect(closesNextDay({ open, close })).toBe(expected);
  });

  it('opens Monday 22:00 until Tuesday 06:00', () => {
    const open = openIntervals(nightStill(), { start: utc('2026-12-07T00:00'), end: utc('2026-12-08T12:00') }, TZ);
    expect(open.map((r) => `${iso(r.start)}–${iso(r.end)}`)).toEqual(['2026-12-07T22:00–2026-12-08T06:00']);
  });

  it('a Friday shift runs into Saturday, and one already open at the start of a range is kept', () => {
    const open = openIntervals(nightStill(), { start: utc('2026-12-12T02:00'), end: utc('2026-12-14T00:00') }, TZ);
    expect(open.map((r) => `${iso(r.start)}–${iso(r.end)}`)).toEqual(['2026-12-12T02:00–2026-12-12T06:00']);
  });

  it('a closed date takes its whole day: Monday night stops at midnight, Tuesday night opens again at midnight', () => {
    const still = nightStill({ closures: [{ startsOn: '2026-12-08', endsOn: '2026-12-08', reason: 'Inspection' }] });
    const open = openIntervals(still, { start: utc('2026-12-07T00:00'), end: utc('2026-12-09T12:00') }, TZ);
    expect(open.map((r) => `${iso(r.start)}–${iso(r.end)}`)).toEqual(['2026-12-07T22:00–2026-12-08T00:00', '2026-12-09T00:00–2026-12-09T06:00']);
  });

  it('counts 8 h a night for available hours: Mon–Fri nights = 40 h a week', () => {
    expect(availableHours(nightStill(), { start: utc('2026-12-07T00:00'), end: utc('2026-12-14T00:00') }, TZ)).toBe(40);
  });

  it('a night across the autumn clock change lasts 9 h (from memory: UK clocks go back at 02:00 BST on Sunday 25 Oct 2026)', () => {
    const still = nightStill({ operatingHours: [{ weekday: 6, open: '22:00', close: '06:00' }] });
    expect(availableHours(still, { start: utc('2026-10-24T00:00'), end: utc('2026-10-26T00:00') }, TZ)).toBe(9);
  });

  it('accepts a 23:00 run overnight without an hours warning, and warns from 06:00 on a run that goes past closing', () => {
    expect(warningCodes(run('2026-12-07T23:00', '2026-12-08T03:00'))).not.toContain('outside_hours');
    const late = computeRunWarnings(run('2026-12-08T03:00', '2026-12-08T08:00'), {
      still: nightStill(),
      runs: [],
      ferments: new Map(),
      timeZone: TZ,
      now: utc('2026-12-01T00:00'),
    });
    expect(late.find((w) => w.code === 'outside_hours')?.message).toContain('from 8 Dec 06:00');
    // A day still does warn about 23:00.
    const dayStill = nightStill({ operatingHours: ([1, 2, 3, 4, 5] as const).map((weekday) => ({ weekday, open: '06:00', close: '22:00' })) });
    expect(warningCodes(run('2026-12-07T23:00', '2026-12-08T03:00'), dayStill)).toContain('outside_hours');
  });

  it('suggests slots inside the night, leaving room for cleaning before 06:00', () => {
    const slots = findEarliestSlots({
      durationMinutes: 240,
      chargeLitres: 1000,
      notBefore: utc('2026-12-07T12:00'),
      stills: [nightStill()],
      runs: [run('2026-12-07T22:00', '2026-12-08T01:30', { id: 9 })],
      timeZone: TZ,
      limit: 2,
    });
    // Monday night: after the booked run and its hour of cleaning (02:30) a 4 h run would end 06:30: no. Tuesday night from
    // 22:00; 02:00–06:00 would leave no hour to clean before closing, so the next is Wednesday night.
    expect(slots.map((s) => `${iso(s.startsAt)}–${iso(s.endsAt)}`)).toEqual(['2026-12-08T22:00–2026-12-09T02:00', '2026-12-09T22:00–2026-12-10T02:00']);
  });
});
