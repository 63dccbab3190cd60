import { describe, expect, it } from 'vitest';
import { findEarliestSlots, type Run, type Still } from '../../src/lib/schedule';
import { utc } from '../helpers/time';

// Europe/London in December is GMT (UTC+0): wall-clock times equal UTC.
// 1 Dec 2026 is a Tuesday; 4 Dec a Friday; 7 Dec a Monday.
const TZ = 'Europe/London';
const iso = (d: Date) => d.toISOString().slice(0, 16);

const weekdays = ([1, 2, 3, 4, 5] as const).map((weekday) => ({ weekday, open: '08:00', close: '18:00' }));
const typicalMinutes = { stripping: 240, spirit: 360, redistillation: 300, cleaning: 60, maintenance: 120 };
const still1: Still = {
  id: 1,
  name: 'Still 1',
  capacityLitres: 1000,
  heatingKw: 30,
  operatingHours: weekdays,
  closures: [],
  cleaningAfterRunMinutes: 60,
  typicalMinutes,
};
const still2: Still = {
  id: 2,
  name: 'Still 2',
  capacityLitres: 2000,
  heatingKw: 45,
  operatingHours: weekdays,
  closures: [],
  cleaningAfterRunMinutes: 0,
  typicalMinutes,
};

const booked = (id: number, stillId: number, start: string, end: string, over: Partial<Run> = {}): Run => ({
  id,
  stillId,
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

// Still 1: 10:00–13:00 on Tue 1 Dec, then cleaning until 14:00. Still 2: 08:00–16:00 the same day.
const runs = [booked(1, 1, '2026-12-01T10:00', '2026-12-01T13:00'), booked(2, 2, '2026-12-01T08:00', '2026-12-01T16:00')];
const base = { durationMinutes: 240, chargeLitres: 800, notBefore: utc('2026-12-01T09:10'), stills: [still1, still2], runs, timeZone: TZ };

const slots = (over: Partial<Parameters<typeof findEarliestSlots>[0]> = {}) =>
  findEarliestSlots({ ...base, ...over }).map((s) => `${s.stillId} ${iso(s.startsAt)}–${iso(s.endsAt).slice(11)}`);

describe('findEarliestSlots', () => {
  it.each([
    {
      what: 'the grid starts at 09:30; after its cleaning at 14:00 Still 1 has 4 h but no hour left to clean before 18:00; Still 2 has no 4 h left on Tuesday',
      over: {},
      expected: ['1 2026-12-02T08:00–12:00', '2 2026-12-02T08:00–12:00', '1 2026-12-02T12:00–16:00'],
    },
    {
      what: "Still 1's run and its hour of cleaning must both fit before 18:00: 13:00–17:00 does, 14:00–18:00 does not",
      over: { stills: [still1], runs: [], notBefore: utc('2026-12-01T13:00'), limit: 1 },
      expected: ['1 2026-12-01T13:00–17:00'],
    },
    {
      what: 'no room for cleaning before closing after 13:30: the next morning',
      over: { stills: [still1], runs: [], notBefore: utc('2026-12-01T13:10'), limit: 1 },
      expected: ['1 2026-12-02T08:00–12:00'],
    },
    {
      what: 'a 1500 L charge fits only Still 2; its suggestions do not overlap each other',
      over: { chargeLitres: 1500 },
      expected: ['2 2026-12-02T08:00–12:00', '2 2026-12-02T12:00–16:00', '2 2026-12-03T08:00–12:00'],
    },
    {
      what: 'a closure on Wed 2 Dec moves Still 2 to Thursday',
      over: { chargeLitres: 1500, stills: [still1, { ...still2, closures: [{ startsOn: '2026-12-02', endsOn: '2026-12-02', reason: 'Inspection' }] }] },
      expected: ['2 2026-12-03T08:00–12:00', '2 2026-12-03T12:00–16:00', '2 2026-12-04T08:00–12:00'],
    },
    {
      what: "moving Still 2's own run: it does not block itself",
      over: { chargeLitres: 1500, excludeRunId: 2, limit: 1 },
      expected: ['2 2026-12-01T09:30–13:30'],
    },
    {
      what: 'a cancelled run blocks nothing',
      over: { chargeLitres: 1500, limit: 1, runs: [runs[0], { ...runs[1], status: 'cancelled' as const }] },
      expected: ['2 2026-12-01T09:30–13:30'],
    },
    {
      what: 'from Friday afternoon, the weekend is skipped',
      over: { chargeLitres: 1500, notBefore: utc('2026-12-04T15:00'), limit: 1 },
      expected: ['2 2026-12-07T08:00–12:00'],
    },
    {
      what: 'a slot ending exactly at closing time is fine, a minute longer is not',
      over: { chargeLitres: 1500, durationMinutes: 600, notBefore: utc('2026-12-02T00:00'), limit: 1 },
      expected: ['2 2026-12-02T08:00–18:00'],
    },
    {
      what: 'longer than any open interval: nothing within the horizon',
      over: { durationMinutes: 601 },
      expected: [],
    },
    {
      what: 'a candidate whose cleaning would run into the next booking is refused',
      over: {
        stills: [still1],
        notBefore: utc('2026-12-02T06:00'),
        runs: [booked(3, 1, '2026-12-02T12:30', '2026-12-02T16:00')],
        limit: 2,
      },
      // Wed: 08:00–12:00 plus its cleaning to 13:00 clashes with the 12:30 run; after that run and
      // its cleaning (17:00) only 1 h is left. So Thursday, twice.
      expected: ['1 2026-12-03T08:00–12:00', '1 2026-12-03T12:00–16:00'],
    },
  ])('$what', ({ over, expected }) => {
    expect(slots(over)).toEqual(expected);
  });

  it('uses the distillery clock: in July, 08:00 BST is 07:00 UTC', () => {
    const [first] = findEarliestSlots({ ...base, runs: [], notBefore: utc('2026-07-01T06:00'), limit: 1 });
    expect(first.startsAt.toISOString()).toBe('2026-07-01T07:00:00.000Z');
    expect(first.stillId).toBe(1);
  });

  it('lets a run span midnight on a still open round the clock', () => {
    const allDay = ([0, 1, 2, 3, 4, 5, 6] as const).map((weekday) => ({ weekday, open: '00:00', close: '24:00' }));
    const [first] = findEarliestSlots({
      ...base,
      stills: [{ ...still2, operatingHours: allDay }],
      runs: [],
      durationMinutes: 30 * 60,
      notBefore: utc('2026-12-01T20:05'),
      limit: 1,
    });
    expect(iso(first.startsAt)).toBe('2026-12-01T20:30');
    expect(iso(first.endsAt)).toBe('2026-12-03T02:30');
  });

  it('stops at the horizon', () => {
    expect(slots({ chargeLitres: 1500, notBefore: utc('2026-12-04T15:00'), horizonDays: 2 })).toEqual([]);
  });
});
