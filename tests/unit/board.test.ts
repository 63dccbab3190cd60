import { describe, it, expect } from 'vitest';
import {
  boardWindow,
  bookableFerments,
  defaultRunMinutes,
  describeChanges,
  moveTarget,
  movedMessage,
  notBeforeForRisk,
  resizeTarget,
  runsAtRisk,
  slotAtX,
  vesselBars,
  windowPlacement,
  boardWarnings,
  mondayOf,
} from '../../src/lib/board';
import { utc } from '../helpers/time';
import { ferment, run, still } from '../helpers/board-rows';

const H = 3_600_000;
const D = 24 * H;
const TZ = 'Europe/London';

describe('boardWindow', () => {
  // UK clocks go forward at 01:00 UTC on Sunday 29 March 2026 and back at 01:00 UTC on Sunday 25 October 2026 (from memory: last Sundays of March and October).
  it.each([
    ['a winter week starts on Monday and lasts 168 h', '2026-12-03', 'week', '2026-11-30T00:00:00.000Z', 168],
    ['the spring-forward week lasts 167 h', '2026-03-26', 'week', '2026-03-23T00:00:00.000Z', 167],
    ['the fall-back week lasts 169 h', '2026-10-21', 'week', '2026-10-18T23:00:00.000Z', 169],
    ['a day is its local midnight to the next', '2026-03-29', 'day', '2026-03-29T00:00:00.000Z', 23],
    ['six weeks are 42 days', '2026-12-03', 'six-weeks', '2026-11-30T00:00:00.000Z', 42 * 24],
  ] as const)('%s', (_what, anchor, zoom, start, hours) => {
    const w = boardWindow(anchor, zoom, TZ);
    expect(w.start.toISOString()).toBe(start);
    expect((w.end.getTime() - w.start.getTime()) / H).toBe(hours);
  });
  it('finds the Monday of a Sunday', () => expect(mondayOf('2026-12-06')).toBe('2026-11-30'));
});

describe('moveTarget: where a dragged run lands', () => {
  const base = { rowHeight: 66, stillIds: [1, 2, 3], pxPerHour: 12, slotMinutes: 60, timeZone: TZ };
  it.each([
    ['one day right and one still down', 288, 66, 2, '2026-12-04T06:00'],
    ['snaps 20 minutes of drag back to the hour', 4, 0, 1, '2026-12-03T06:00'],
    ['snaps 40 minutes of drag on to the next hour', 8, 0, 1, '2026-12-03T07:00'],
    ['clamps below the last still', -12, 66 * 5, 3, '2026-12-03T05:00'],
    ['clamps above the first still', 0, -200, 1, '2026-12-03T06:00'],
  ])('%s', (_what, dx, dy, stillId, start) => {
    const t = moveTarget({ ...base, run: run(1), deltaX: dx, deltaY: dy });
    expect(t.stillId).toBe(stillId);
    expect(t.startsAt.toISOString()).toBe(utc(start).toISOString());
    expect(t.endsAt.getTime() - t.startsAt.getTime()).toBe(6 * H);
  });
  it('keeps the true length of a run that crosses the spring-forward night', () => {
    // Sat 28 Mar 2026 22:00 GMT to Sun 29 Mar 04:00 BST = 5 h elapsed (01:00–02:00 GMT is skipped on the clock).
    const r = run(1, { startsAt: utc('2026-03-28T22:00'), endsAt: utc('2026-03-29T03:00') });
    const t = moveTarget({ ...base, run: r, deltaX: 12, deltaY: 0 });
    expect(t.startsAt.toISOString()).toBe(utc('2026-03-28T23:00').toISOString());
    expect(t.endsAt.getTime() - t.startsAt.getTime()).toBe(5 * H);
  });
});

describe('resizing and empty-slot selection', () => {
  it.each([
    ['lengthens by two hours', 24, '2026-12-03T14:00'],
    ['never shorter than one slot', -1000, '2026-12-03T07:00'],
  ])('%s', (_what, dx, end) => {
    expect(resizeTarget(run(1), dx, 12, 60, TZ).toISOString()).toBe(utc(end).toISOString());
  });
  it('a click inside an hour books from the start of that slot', () => {
    const w = boardWindow('2026-12-03', 'day', TZ);
    expect(slotAtX(56 * 6.9, w.start, 56, 30, TZ).toISOString()).toBe(utc('2026-12-03T06:30').toISOString());
  });
});

describe('windowPlacement of a run against its wash', () => {
  it.each([
    ['before the window (P10)', '2026-12-01T06:00', {}, 'before'],
    ['inside the window', '2026-12-03T06:00', {}, 'inside'],
    ['after the window (P90)', '2026-12-05T06:00', {}, 'after'],
    ['no forecast yet', '2026-12-05T06:00', { readyAt: null, readyP10: null, readyP90: null }, 'unknown'],
    ['before a confirmed finish', '2026-11-30T06:00', { status: 'finished' as const, confirmedAt: utc('2026-12-01T00:00') }, 'before'],
    ['after a confirmed finish', '2026-12-01T06:00', { status: 'finished' as const, confirmedAt: utc('2026-12-01T00:00') }, 'after'],
  ])('%s', (_what, start, over, expected) => {
    expect(windowPlacement(utc(start), ferment(1, over))).toBe(expected);
  });
});

describe('washes to book and runs at risk', () => {
  const now = utc('2026-12-01T07:00');
  const fs = [
    ferment(1, { code: 'LATE', readyAt: utc('2026-12-06T00:00'), readyP90: utc('2026-12-07T00:00') }),
    ferment(2, { code: 'DONE', status: 'finished', confirmedAt: utc('2026-11-30T08:00') }),
    ferment(3, { code: 'STUCK', status: 'stalled', readyAt: null, readyP10: null, readyP90: null }),
    ferment(4, { code: 'SOON', readyAt: utc('2026-12-02T00:00') }),
    ferment(5, { code: 'GONE', emptiedAt: utc('2026-11-30T00:00') }),
    ferment(6, { code: 'FULL' }),
  ];
  const runs = [
    run(10, { ferments: [{ fermentId: 6, litres: 2400 }], startsAt: utc('2026-12-08T06:00'), endsAt: utc('2026-12-08T12:00') }),
    run(11, { ferments: [{ fermentId: 3, litres: 1000 }], startsAt: utc('2026-12-04T07:00'), endsAt: utc('2026-12-04T13:00') }),
    run(12, { ferments: [{ fermentId: 1, litres: 1000 }], startsAt: utc('2026-12-05T07:00'), endsAt: utc('2026-12-05T13:00') }),
    run(13, { ferments: [{ fermentId: 2, litres: 1000 }], startsAt: utc('2026-12-02T07:00'), endsAt: utc('2026-12-02T13:00') }),
    run(14, { status: 'cancelled', ferments: [{ fermentId: 4, litres: 2400 }] }),
  ];
  it('lists washes still in their fermenters with unbooked wash: finished first, then soonest, stalled last', () => {
    const list = bookableFerments(fs, runs);
    expect(list.map((b) => b.ferment.code)).toEqual(['DONE', 'SOON', 'LATE', 'STUCK']);
    expect(list.find((b) => b.ferment.code === 'LATE')!.unbookedLitres).toBe(1400);
    expect(list.find((b) => b.ferment.code === 'SOON')!.unbookedLitres).toBe(2400); // a cancelled run books nothing
  });
  it('flags runs on a stalled wash or starting before the 80 % quantile of the ready time, soonest first', () => {
    // LATE: P10 1 Dec 12:00, median 6 Dec 00:00, P90 7 Dec 00:00, so its 80 % quantile is near 6 Dec 15:46; run 12 starts 5 Dec 07:00.
    const risk = runsAtRisk(runs, fs, now);
    expect(risk.map((r) => [r.run.id, r.reasons.map((x) => x.why)])).toEqual([
      [11, ['stalled']],
      [12, ['at_risk']],
    ]);
  });
  it('says early before P10, and late only for a run that was not at risk when booked', () => {
    const early = run(20, { ferments: [{ fermentId: 1, litres: 100 }], startsAt: utc('2026-12-01T08:00'), endsAt: utc('2026-12-01T12:00') });
    const late = { ...runs[2]!, bookedAtRisk: false };
    const bookedEarly = { ...runs[2]!, bookedAtRisk: true };
    const why = (list: typeof runs) => runsAtRisk(list, fs, now).map((r) => r.reasons.map((x) => x.why)[0]);
    expect(why([early])).toEqual(['early']);
    expect(why([late])).toEqual(['late']);
    expect(why([bookedEarly])).toEqual(['at_risk']);
  });
  it('follows the threshold setting: at 60 % the same run is no longer at risk', () => {
    // Normal table: z(0.6) = 0.2533, z(0.8) = 0.8416, z(0.9) = 1.2816. From the median (6 Dec 00:00) towards P90 (24 h later),
    // the 60 % quantile lies 24 h × 0.2533 / 1.2816 = 4.7 h on (04:45), the 80 % one 15.8 h on (15:46): a 6 Dec 08:00 start
    // is at risk at 80 % only.
    const later = run(21, { ferments: [{ fermentId: 1, litres: 100 }], startsAt: utc('2026-12-06T08:00'), endsAt: utc('2026-12-06T12:00') });
    expect(runsAtRisk([later], fs, now, 0.8).map((r) => r.run.id)).toEqual([21]);
    expect(runsAtRisk([later], fs, now, 0.6)).toEqual([]);
  });
  it.each([
    ['a stalled wash waits a fresh stable period from now (3 days, the product default)', [{ fermentId: 3, litres: 1 }], now.getTime() + 3 * D],
    ['a late wash waits for the late edge of its window (P90)', [{ fermentId: 1, litres: 1 }], utc('2026-12-07T00:00').getTime()],
    ['a finished wash does not hold the run back', [{ fermentId: 2, litres: 1 }], now.getTime()],
  ])('%s', (_what, charges, expected) => {
    expect(notBeforeForRisk({ ferments: charges }, fs, now, 3).getTime()).toBe(expected);
  });
});

describe('vessel occupancy', () => {
  it('runs each ferment from pitching to the earliest live run that takes it, or to its emptying', () => {
    const fs = [
      ferment(1, { fermenterId: 7 }),
      ferment(2, { fermenterId: 7, pitchedAt: utc('2026-11-01T00:00'), emptiedAt: utc('2026-11-10T00:00') }),
      ferment(3, { fermenterId: 8 }),
    ];
    const runs = [
      run(1, { ferments: [{ fermentId: 1, litres: 1000 }], startsAt: utc('2026-12-06T06:00') }),
      run(2, { ferments: [{ fermentId: 1, litres: 1000 }], startsAt: utc('2026-12-05T06:00') }),
      run(3, { status: 'cancelled', ferments: [{ fermentId: 3, litres: 1000 }], startsAt: utc('2026-12-02T06:00') }),
    ];
    const bars = vesselBars([{ id: 7 }, { id: 8 }], fs, runs);
    expect(bars.get(7)!.map((b) => [b.code, b.freeAt?.toISOString(), b.freedBy])).toEqual([
      ['F-2', utc('2026-11-10T00:00').toISOString(), 'emptied'],
      ['F-1', utc('2026-12-05T06:00').toISOString(), 'run'],
    ]);
    expect(bars.get(8)![0]!.freeAt).toBeNull();
  });
});

describe('defaultRunMinutes', () => {
  // REFERENCES §7 check value: 100 L of an 8 % vol wash from 20 °C on 10 kW at η = 1 heats in 51.2 min [computed];
  // at the default η = 0.85 that is 51.2 / 0.85 ≈ 60.2 min (SG taken as 1.000 here, +0.5 % over FG 0.995).
  it('adds the heat-up of the charge to the typical minutes', () => {
    const minutes = defaultRunMinutes(
      still(1, { heatingKw: 10, typicalMinutes: { stripping: 100, spirit: 0, redistillation: 0, cleaning: 60, maintenance: 60 } }),
      'stripping',
      100,
      8,
    );
    expect(minutes).toBeGreaterThanOrEqual(160);
    expect(minutes).toBeLessThanOrEqual(162);
  });
  it.each([
    ['cleaning takes its typical minutes', 'cleaning', 2400, 120],
    ['a run without a charge takes its typical minutes', 'stripping', null, 300],
  ] as const)('%s', (_what, type, charge, expected) => {
    expect(defaultRunMinutes(still(1), type, charge)).toBe(expected);
  });
});

describe('words', () => {
  it("announces a move in the product's own words, on the distillery's clock", () => {
    const now = utc('2026-11-30T12:00');
    expect(movedMessage('stripping', 'Wash Still 2', utc('2026-12-01T06:00'), TZ, now)).toBe('Stripping run moved to Wash Still 2, Tuesday 06:00');
    // 06:00 BST on Tuesday 2 June 2026 is 05:00 UTC.
    expect(movedMessage('spirit', 'Spirit Still', utc('2026-06-02T05:00'), TZ, utc('2026-06-01T12:00'))).toBe(
      'Spirit run moved to Spirit Still, Tuesday 06:00',
    );
    // More than six days away, the day is named with its date.
    expect(movedMessage('spirit', 'Spirit Still', utc('2026-06-02T05:00'), TZ, now)).toBe('Spirit run moved to Spirit Still, Tue 2 Jun 06:00');
  });
  it('says what another person changed', () => {
    const mine = run(1);
    const theirs = run(1, { stillId: 2, startsAt: utc('2026-12-03T08:00'), operatorId: 5 });
    expect(
      describeChanges(mine, theirs, { still: (id) => `Still ${id}`, person: (id) => (id === 5 ? 'Ines' : 'nobody') }, TZ, utc('2026-12-01T00:00')),
    ).toEqual(['still is now Still 2', 'starts Thursday 08:00', 'operator is now Ines']);
  });
});

describe('boardWarnings', () => {
  it('warns on the run booked before its wash can be ready and not on the one after', () => {
    const f = ferment(1, { readyAt: utc('2026-12-04T00:00'), readyP10: utc('2026-12-03T12:00'), readyP90: utc('2026-12-05T00:00') });
    const runs = [
      run(1, { ferments: [{ fermentId: 1, litres: 1000 }], startsAt: utc('2026-12-03T06:00'), endsAt: utc('2026-12-03T10:00') }),
      run(2, { stillId: 2, ferments: [{ fermentId: 1, litres: 1000 }], startsAt: utc('2026-12-06T06:00'), endsAt: utc('2026-12-06T10:00') }),
    ];
    const w = boardWarnings({ stills: [still(1), still(2)], runs, ferments: [f], timeZone: TZ, now: utc('2026-12-01T00:00') });
    expect(w.get(1)!.map((x) => x.code)).toContain('booked_before_ready');
    expect(w.get(2)!.filter((x) => x.severity !== 'info')).toEqual([]);
  });
});
