import { describe, expect, it } from 'vitest';
import { availableHours, bookedHours, idleWaitingHours, type FermentState, type Run, type Still } from '../../src/lib/schedule';
import { utc } from '../helpers/time';

// Europe/London in January is GMT (UTC+0). Mon 5 Jan 2026 to Sat 10 Jan 2026 00:00.
const TZ = 'Europe/London';
const week = { start: utc('2026-01-05T00:00'), end: utc('2026-01-10T00:00') };

const still: Still = {
  id: 1,
  name: 'Still 1',
  capacityLitres: 1000,
  heatingKw: 30,
  operatingHours: ([1, 2, 3, 4, 5] as const).map((weekday) => ({ weekday, open: '08:00', close: '18:00' })),
  closures: [{ startsOn: '2026-01-07', endsOn: '2026-01-07', reason: 'Boiler inspection' }],
  cleaningAfterRunMinutes: 60,
  typicalMinutes: { stripping: 300, spirit: 420, redistillation: 360, cleaning: 60, maintenance: 120 },
};

const run = (id: number, start: string, end: string, over: Partial<Run> = {}): Run => ({
  id,
  stillId: 1,
  type: 'stripping',
  status: 'done',
  startsAt: utc(start),
  endsAt: utc(end),
  operatorId: null,
  chargeLitres: null,
  ferments: [],
  feeds: [],
  ...over,
});

const wash = (id: number, confirmedAt: string | null): FermentState => ({
  id,
  code: `F-${id}`,
  volumeLitres: 1000,
  pitchedAt: utc('2026-01-01T08:00'),
  emptiedAt: null,
  status: confirmedAt ? 'finished' : 'slowing',
  readyAt: null,
  readyP10: null,
  readyP90: null,
  confirmedAt: confirmedAt ? utc(confirmedAt) : null,
});

const runs: Run[] = [
  run(1, '2026-01-05T08:00', '2026-01-05T14:00', { ferments: [{ fermentId: 1, litres: 900 }] }), // Mon, 6 h
  run(2, '2026-01-06T16:00', '2026-01-06T20:00', { ferments: [{ fermentId: 2, litres: 900 }] }), // Tue, 2 h inside hours
  run(3, '2026-01-08T08:00', '2026-01-08T18:00', { status: 'cancelled' }), // Thu, counts for nothing
  run(4, '2026-01-08T08:00', '2026-01-08T18:00', { stillId: 2 }), // another still
  run(7, '2026-01-08T10:00', '2026-01-08T12:00', { ferments: [{ fermentId: 4, litres: 500 }] }), // Thu, 2 h
  run(5, '2026-01-09T09:00', '2026-01-09T10:00', { type: 'cleaning' }), // Fri, 1 h, no cleaning slot after
  run(6, '2026-01-09T14:00', '2026-01-09T17:00', { ferments: [{ fermentId: 3, litres: 900 }] }), // Fri, 3 h
];
const ferments = new Map([
  [1, wash(1, '2026-01-04T12:00')], // confirmed on the Sunday before
  [2, wash(2, '2026-01-06T10:00')],
  [3, wash(3, '2026-01-09T12:00')],
  [4, wash(4, null)], // never confirmed: nothing to measure
]);

describe('utilisation on a hand-worked week', () => {
  it('availableHours: Mon, Tue, Thu, Fri 08:00–18:00 = 4 × 10 h = 40 h (Wednesday closed)', () => {
    expect(availableHours(still, week, TZ)).toBeCloseTo(40, 9);
  });

  it('bookedHours: 6 (Mon) + 2 (Tue until 18:00 close) + 2 (Thu) + 1 (Fri cleaning) + 3 (Fri) = 14 h', () => {
    expect(bookedHours(runs, still, week, TZ)).toBeCloseTo(14, 9);
  });

  it('idleWaitingHours: Mon 15:00–18:00 + Tue 08:00–10:00 waiting for F-2, Fri 10:00–12:00 for F-3 = 7 h', () => {
    // Run 2: previous run 1 ends Mon 14:00 + 60 min cleaning = 15:00; F-2 confirmed Tue 10:00 -> 3 h + 2 h.
    // Run 6: previous run 5 (cleaning, no cleaning slot) ends Fri 10:00; F-3 confirmed 12:00 -> 2 h.
    // Run 1: F-1 was confirmed before the week began -> 0. Run 7: F-4 unconfirmed -> skipped.
    expect(idleWaitingHours(runs, still, ferments, week, TZ)).toBeCloseTo(7, 9);
  });

  it('a range clips the figures: Tuesday only', () => {
    const tuesday = { start: utc('2026-01-06T00:00'), end: utc('2026-01-07T00:00') };
    expect(availableHours(still, tuesday, TZ)).toBeCloseTo(10, 9);
    expect(bookedHours(runs, still, tuesday, TZ)).toBeCloseTo(2, 9);
    expect(idleWaitingHours(runs, still, ferments, tuesday, TZ)).toBeCloseTo(2, 9);
  });

  it('counts elapsed hours: a round-the-clock Sunday on the 25 Oct 2026 clock change has 25 h (from memory: UK clocks go back that night)', () => {
    const allDay = { ...still, closures: [], operatingHours: [{ weekday: 0 as const, open: '00:00', close: '24:00' }] };
    const day = { start: utc('2026-10-24T23:00'), end: utc('2026-10-26T00:00') }; // local 25 Oct 00:00 BST to 26 Oct 00:00 GMT
    expect(availableHours(allDay, day, 'Europe/London')).toBeCloseTo(25, 9);
  });
});
