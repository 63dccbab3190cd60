import { describe, expect, it } from 'vitest';
import {
  accuracyByMonth,
  accuracyPoints,
  chargedLaa,
  computeFraction,
  cycleTimes,
  expectedLaaFromFeeds,
  expectedLaaFromFerments,
  isoWeekOfYmd,
  quantileSorted,
  recoveryRatio,
  spreadOf,
  sumLaa,
  throughputByWeek,
  troubleRates,
  utilisationByStillWeek,
  validateRunRecord,
  weeksIn,
  yieldPerTonne,
  type FractionInput,
} from '../../src/lib/reports';
import type { FermentState, Run, Still } from '../../src/lib/schedule';
import { utc } from '../helpers/time';

const TZ = 'Europe/London';

describe('fraction strength, LAA and proof gallons', () => {
  it('read at 20 °C the alcoholmeter needs no correction; LAA = litres × ABV / 100 (REFERENCES §5 LAA definition)', () => {
    const f = computeFraction({ fraction: 'hearts', volumeLitres: 290, alcoholmeterReading: 70.5, readingTempC: 20 });
    expect(f.abv20).toBe(70.5);
    // 290 × 70.5 / 100 = 204.45
    expect(f.laa).toBeCloseTo(204.45, 9);
  });

  it('reading 40.0 at 25 °C is 37.99 % vol at 20 °C (OIML R 22 alcoholmeter check value [computed]); 100 L hold 37.99 LAA', () => {
    const f = computeFraction({ fraction: 'low_wines', volumeLitres: 100, alcoholmeterReading: 40, readingTempC: 25 });
    expect(Math.abs(f.abv20 - 37.99)).toBeLessThanOrEqual(0.006);
    expect(Math.abs(f.laa - 37.99)).toBeLessThanOrEqual(0.006);
  });

  it('proof gallons: 1 LAA = 0.528344 PG (27 CFR §19.1 with 1 US gal = 3.785411784 L)', () => {
    const f = computeFraction({ fraction: 'hearts', volumeLitres: 100, alcoholmeterReading: 50, readingTempC: 20 });
    // 50 LAA × 0.528344 = 26.4172 PG
    expect(f.proofGallons).toBeCloseTo(26.4172, 3);
  });
});

describe('recovery arithmetic (REFERENCES §5: LAA = litres × ABV / 100, all at 20 °C)', () => {
  // A spirit run charged with 1120 L of low wines at 28 % vol: 1120 × 0.28 = 313.6 LAA.
  // Cuts, all read at 20 °C: heads 18 L @ 81 = 14.58; hearts 290 L @ 70 = 203; tails 95 L @ 35 = 33.25; feints 60 L @ 20 = 12.
  // Collected = 14.58 + 203 + 33.25 + 12 = 262.83 LAA; recovery = 262.83 / 313.6 = 0.838106...
  const cuts: FractionInput[] = [
    { fraction: 'heads', volumeLitres: 18, alcoholmeterReading: 81, readingTempC: 20 },
    { fraction: 'hearts', volumeLitres: 290, alcoholmeterReading: 70, readingTempC: 20 },
    { fraction: 'tails', volumeLitres: 95, alcoholmeterReading: 35, readingTempC: 20 },
    { fraction: 'feints', volumeLitres: 60, alcoholmeterReading: 20, readingTempC: 20 },
  ];
  it('sums LAA over fractions', () => {
    expect(sumLaa(cuts.map(computeFraction))).toBeCloseTo(262.83, 9);
  });
  it('charged LAA and recovery', () => {
    expect(chargedLaa({ litres: 1120, abv: 28 })).toBeCloseTo(313.6, 9);
    expect(recoveryRatio(262.83, 313.6)).toBeCloseTo(262.83 / 313.6, 12);
    expect(recoveryRatio(262.83, 313.6)!).toBeCloseTo(0.838106, 6);
  });
  it('unknown or zero charge gives no recovery', () => {
    expect(chargedLaa({ litres: 1120, abv: null })).toBeNull();
    expect(recoveryRatio(10, null)).toBeNull();
    expect(recoveryRatio(10, 0)).toBeNull();
  });
  it('expected LAA from ferments: 2400 L of a 1.080 -> 0.995 wash at 11.386 % (Balling check value, REFERENCES §3) = 273.26 LAA', () => {
    // 2400 × 11.386 / 100 = 273.264 (11.386 is given to 3 decimals: ± 0.012 LAA)
    expect(Math.abs(expectedLaaFromFerments([{ litres: 2400, og: 1.08, fg: 0.995 }])! - 273.264)).toBeLessThanOrEqual(0.015);
    // Two lines add: 1200 L + 1200 L of the same wash give the same total.
    expect(
      Math.abs(
        expectedLaaFromFerments([
          { litres: 1200, og: 1.08, fg: 0.995 },
          { litres: 1200, og: 1.08, fg: 0.995 },
        ])! - 273.264,
      ),
    ).toBeLessThanOrEqual(0.015);
    expect(expectedLaaFromFerments([{ litres: 2400, og: 1.08, fg: null }])).toBeNull();
  });
  it("expected LAA of a spirit run by share of each feeding run's low wines (hand arithmetic)", () => {
    // Took 640 of 640 L from a run expected to give 180 LAA, and 480 of 900 L from one expected to give 270:
    // 180 + 480/900 × 270 = 180 + 144 = 324
    expect(
      expectedLaaFromFeeds([
        { litres: 640, lowWinesLitres: 640, expectedLaa: 180 },
        { litres: 480, lowWinesLitres: 900, expectedLaa: 270 },
      ]),
    ).toBeCloseTo(324, 9);
    expect(expectedLaaFromFeeds([{ litres: 480, lowWinesLitres: null, expectedLaa: 270 }])).toBeNull();
  });
});

describe('run record validation', () => {
  const ok: FractionInput = { fraction: 'hearts', volumeLitres: 100, alcoholmeterReading: 70, readingTempC: 20 };
  const base = { runType: 'spirit' as const, stillCapacityLitres: 1200, charge: { litres: 1100, abv: 28 } };
  it('accepts a sound record', () => {
    expect(validateRunRecord({ ...base, fractions: [ok] })).toEqual({});
  });
  it.each([
    ['alcoholmeter over 100', { alcoholmeterReading: 100.5 }, 'fractions.0.alcoholmeterReading'],
    ['alcoholmeter below 0', { alcoholmeterReading: -1 }, 'fractions.0.alcoholmeterReading'],
    ['temperature above 40 °C (OIML R 22 domain)', { readingTempC: 40.5 }, 'fractions.0.readingTempC'],
    ['temperature below −20 °C (OIML R 22 domain)', { readingTempC: -20.5 }, 'fractions.0.readingTempC'],
    ['negative volume', { volumeLitres: -1 }, 'fractions.0.volumeLitres'],
    ['volume over 10 × capacity (12 000 L)', { volumeLitres: 12001 }, 'fractions.0.volumeLitres'],
    ['low wines on a spirit run', { fraction: 'low_wines' as const }, 'fractions.0.fraction'],
    ['cut note too long', { cutNote: 'x'.repeat(201) }, 'fractions.0.cutNote'],
  ])('%s is refused with a field message', (_label, patch, field) => {
    const errors = validateRunRecord({ ...base, fractions: [{ ...ok, ...patch }] });
    expect(Object.keys(errors)).toEqual([field]);
    expect(errors[field]!.length).toBeGreaterThan(5);
  });
  it('ends of the ranges are accepted: 0 and 100 % vol, −20 and 40 °C, exactly 10 × capacity', () => {
    expect(validateRunRecord({ ...base, fractions: [{ ...ok, volumeLitres: 12000, alcoholmeterReading: 0, readingTempC: 20 }] })).toEqual({});
    expect(validateRunRecord({ ...base, fractions: [{ ...ok, volumeLitres: 0, alcoholmeterReading: 100, readingTempC: 40 }] })).toEqual({});
    expect(validateRunRecord({ ...base, fractions: [{ ...ok, readingTempC: -20 }] })).toEqual({});
  });
  it('a reading inside 0–100 and −20…40 °C that no mixture can show is refused too (water is not liquid at −20 °C)', () => {
    const errors = validateRunRecord({ ...base, fractions: [{ ...ok, alcoholmeterReading: 0, readingTempC: -20 }] });
    expect(errors['fractions.0.alcoholmeterReading']).toMatch(/outside the alcoholometric tables/);
  });
  it('a fraction listed twice, a bad charge, and fractions on a cleaning slot', () => {
    expect(Object.keys(validateRunRecord({ ...base, fractions: [ok, ok] }))).toEqual(['fractions.1.fraction']);
    expect(Object.keys(validateRunRecord({ ...base, charge: { litres: -5, abv: 101 }, fractions: [] })).sort()).toEqual(['chargeAbv', 'chargeLitres']);
    expect(Object.keys(validateRunRecord({ ...base, runType: 'cleaning', fractions: [ok] }))).toContain('fractions');
  });
});

describe('median and interquartile spread (linear interpolation, Hyndman & Fan type 7, R default: from memory)', () => {
  it.each([
    // values, p, expected
    [[1, 2, 3, 4], 0.25, 1.75],
    [[1, 2, 3, 4], 0.5, 2.5],
    [[1, 2, 3, 4], 0.75, 3.25],
    [[7], 0.25, 7],
    [[2, 4, 6, 8, 10], 0.25, 4],
  ])('quantile(%j, %s) = %s', (xs, p, q) => {
    expect(quantileSorted(xs, p)).toBeCloseTo(q, 12);
  });
  it('spreadOf sorts and reports the IQR', () => {
    expect(spreadOf([10, 2, 8, 4, 6])).toEqual({ n: 5, median: 6, p25: 4, p75: 8, iqr: 4, min: 2, max: 10 });
    expect(spreadOf([])).toBeNull();
  });
});

describe("ISO 8601 weeks (ISO 8601: week 1 holds the year's first Thursday)", () => {
  it.each([
    ['2025-01-01', '2025-W01'],
    ['2024-12-30', '2025-W01'],
    ['2021-01-03', '2020-W53'],
    ['2021-01-04', '2021-W01'],
    ['2026-01-01', '2026-W01'],
    ['2026-12-31', '2026-W53'],
  ])('%s is in %s', (ymd, week) => {
    expect(isoWeekOfYmd(ymd)).toBe(week);
  });
  it('the London week holding the spring-forward change (30 Mar 2025) is 167 hours long', () => {
    // Range: Mon 24 Mar 00:00 GMT to Mon 7 Apr 00:00 BST (= 6 Apr 23:00 UTC)
    const weeks = weeksIn({ start: utc('2025-03-24T00:00'), end: utc('2025-04-06T23:00') }, TZ);
    expect(weeks.map((w) => w.week)).toEqual(['2025-W13', '2025-W14']);
    const hours = (w: (typeof weeks)[number]) => (w.range.end.getTime() - w.range.start.getTime()) / 3_600_000;
    // Mon 24 Mar 00:00 GMT -> Mon 31 Mar 00:00 BST (= 30 Mar 23:00 UTC): 7 × 24 − 1 = 167 h
    expect(hours(weeks[0]!)).toBe(167);
    // The next week, Mon 31 Mar 00:00 BST -> Mon 7 Apr 00:00 BST, has no change: 168 h
    expect(hours(weeks[1]!)).toBe(168);
  });
});

describe('cycle time per wash type (hand-worked)', () => {
  const d = (iso: string) => utc(iso);
  const items = [
    // grain: 6, 7, 9, 10 days; sugar: 8 days; one grain not finished yet (ignored)
    { washType: 'Grain', pitchedAt: d('2025-01-01T08:00'), ruleMetAt: d('2025-01-07T08:00') },
    { washType: 'Grain', pitchedAt: d('2025-01-10T08:00'), ruleMetAt: d('2025-01-17T08:00') },
    { washType: 'Grain', pitchedAt: d('2025-01-25T08:00'), ruleMetAt: d('2025-02-03T08:00') },
    { washType: 'Grain', pitchedAt: d('2025-02-01T08:00'), ruleMetAt: d('2025-02-11T08:00') },
    { washType: 'Grain', pitchedAt: d('2025-02-05T08:00'), ruleMetAt: null },
    { washType: 'Sugar', pitchedAt: d('2025-01-01T00:00'), ruleMetAt: d('2025-01-09T00:00') },
  ];
  const rows = cycleTimes(items, TZ);
  it('overall grain: [6, 7, 9, 10] -> median 8, p25 6.75, p75 9.25, IQR 2.5 (type 7)', () => {
    const all = rows.find((r) => r.washType === 'Grain' && r.period === 'all')!;
    expect(all).toMatchObject({ n: 4, median: 8, p25: 6.75, p75: 9.25, iqr: 2.5, min: 6, max: 10 });
  });
  it('grain by month of finish: January [6, 7] median 6.5; February [9, 10] median 9.5', () => {
    expect(rows.find((r) => r.washType === 'Grain' && r.period === '2025-01')!.median).toBe(6.5);
    expect(rows.find((r) => r.washType === 'Grain' && r.period === '2025-02')!.median).toBe(9.5);
    expect(rows.find((r) => r.washType === 'Sugar' && r.period === 'all')!).toMatchObject({ n: 1, median: 8, iqr: 0 });
  });
});

describe('stall and souring rate (hand-worked)', () => {
  it('ever-flagged ferments over all ferments, per wash type and in total', () => {
    const rates = troubleRates([
      { washType: 'Grain', statuses: ['active', 'stalled', 'finished'] },
      { washType: 'Grain', statuses: ['active', 'finished'] },
      { washType: 'Grain', statuses: ['souring'] },
      { washType: 'Grain', statuses: ['finished'] },
      { washType: 'Sugar', statuses: ['stalled'] },
    ]);
    // Grain: 1 stalled of 4 = 0.25, 1 souring of 4 = 0.25; all: 2 stalled of 5 = 0.4, 1 souring of 5 = 0.2
    expect(rates.find((r) => r.washType === 'Grain')).toMatchObject({ ferments: 4, stalled: 1, souring: 1, stallRate: 0.25, souringRate: 0.25 });
    expect(rates.find((r) => r.washType === 'All washes')).toMatchObject({ ferments: 5, stallRate: 0.4, souringRate: 0.2 });
    expect(rates[rates.length - 1]!.washType).toBe('All washes');
  });
});

describe('forecast accuracy three days ahead (hand-worked)', () => {
  const actual = utc('2025-03-10T12:00');
  const points = accuracyPoints([
    {
      fermentId: 1,
      code: 'F1',
      ruleMetAt: actual,
      history: [
        // 5 days before: too early to stand for "3 days ahead"
        { asOf: utc('2025-03-05T12:00'), readyAt: utc('2025-03-13T12:00'), readyP10: null, readyP90: null },
        // 80 h before (8 h off the 72 h target): the closest -> predicted 11 Mar 00:00, 0.5 day late; window 9 Mar..12 Mar holds the actual
        { asOf: utc('2025-03-07T04:00'), readyAt: utc('2025-03-11T00:00'), readyP10: utc('2025-03-09T00:00'), readyP90: utc('2025-03-12T00:00') },
        // 60 h before (12 h off)
        { asOf: utc('2025-03-08T00:00'), readyAt: utc('2025-03-10T00:00'), readyP10: null, readyP90: null },
      ],
    },
    {
      fermentId: 2,
      code: 'F2',
      ruleMetAt: utc('2025-03-20T00:00'),
      // 72 h before exactly; predicted 2 days early; window 16..18 Mar misses the actual
      history: [{ asOf: utc('2025-03-17T00:00'), readyAt: utc('2025-03-18T00:00'), readyP10: utc('2025-03-16T00:00'), readyP90: utc('2025-03-18T00:00') }],
    },
    {
      fermentId: 3,
      code: 'F3',
      ruleMetAt: utc('2025-03-20T00:00'),
      history: [{ asOf: utc('2025-03-19T00:00'), readyAt: utc('2025-03-20T00:00'), readyP10: null, readyP90: null }],
    },
  ]);
  it('picks the forecast nearest 72 h before the finish, within ± 24 h', () => {
    expect(points.map((p) => p.code)).toEqual(['F1', 'F2']);
    expect(points[0]).toMatchObject({ absErrorDays: 0.5, signedErrorDays: 0.5, insideWindow: true });
    expect(points[1]).toMatchObject({ absErrorDays: 2, signedErrorDays: -2, insideWindow: false });
  });
  it('monthly: mean |error| (0.5 + 2)/2 = 1.25 d, median 1.25 d, 1 of 2 inside the window', () => {
    expect(accuracyByMonth(points, TZ)).toEqual([{ month: '2025-03', n: 2, meanAbsErrorDays: 1.25, medianAbsErrorDays: 1.25, insideShare: 0.5 }]);
  });
});

describe('throughput and yield per tonne (hand-worked)', () => {
  it('wash litres and LAA by ISO week of finish', () => {
    const rows = throughputByWeek(
      [
        {
          type: 'stripping',
          finishedAt: utc('2025-03-04T13:00'),
          startsAt: utc('2025-03-04T08:00'),
          endsAt: utc('2025-03-04T13:00'),
          startedAt: utc('2025-03-04T08:30'),
          washLitres: 2400,
          fractions: [{ fraction: 'low_wines', laa: 176 }],
        },
        {
          type: 'stripping',
          finishedAt: utc('2025-03-06T13:00'),
          startsAt: utc('2025-03-06T08:00'),
          endsAt: utc('2025-03-06T12:00'),
          startedAt: utc('2025-03-06T08:00'),
          washLitres: 1800,
          fractions: [{ fraction: 'low_wines', laa: 150 }],
        },
        {
          type: 'spirit',
          finishedAt: utc('2025-03-07T16:00'),
          startsAt: utc('2025-03-07T08:00'),
          endsAt: utc('2025-03-07T16:00'),
          startedAt: null,
          washLitres: 0,
          fractions: [
            { fraction: 'heads', laa: 14 },
            { fraction: 'hearts', laa: 200 },
          ],
        },
        {
          type: 'stripping',
          finishedAt: utc('2025-03-12T13:00'),
          startsAt: utc('2025-03-12T09:00'),
          endsAt: utc('2025-03-12T14:00'),
          startedAt: utc('2025-03-12T09:00'),
          washLitres: 2000,
          fractions: [],
        },
      ],
      ['2025-W10', '2025-W11'],
      TZ,
    );
    // W10 (3–9 Mar): 2400 + 1800 = 4200 L; low wines 176 + 150 = 326 LAA; hearts 200 LAA; 3 runs.
    //   Booked 5 + 4 + 8 = 17 h; actual 4.5 (08:30–13:00) + 5 (08:00–13:00) + 8 (no start stamped: booked start to finish) = 17.5 h.
    // W11: 2000 L, 1 run, booked 5 h, actual 4 h (09:00–13:00).
    expect(rows).toEqual([
      { week: '2025-W10', washLitres: 4200, lowWinesLaa: 326, heartsLaa: 200, runs: 3, bookedHours: 17, actualHours: 17.5 },
      { week: '2025-W11', washLitres: 2000, lowWinesLaa: 0, heartsLaa: 0, runs: 1, bookedHours: 5, actualHours: 4 },
    ]);
  });
  it('LAA per tonne of ingredients', () => {
    // Ferment A: 720 kg malt; all 2400 L of a run that made 180 LAA -> 180 / 0.72 = 250 LAA/t.
    // Ferment B: 560 kg sugar; 600 of the 2400 L of a run that made 200 LAA -> 50 / 0.56 = 89.2857 LAA/t.
    const rows = yieldPerTonne([
      { fermentId: 1, code: 'A', washType: 'Grain', ingredientsKg: 720, runs: [{ lowWinesLaa: 180, totalLitres: 2400, litres: 2400 }] },
      { fermentId: 2, code: 'B', washType: 'Sugar', ingredientsKg: 560, runs: [{ lowWinesLaa: 200, totalLitres: 2400, litres: 600 }] },
      { fermentId: 3, code: 'C', washType: 'Sugar', ingredientsKg: 0, runs: [{ lowWinesLaa: 200, totalLitres: 2400, litres: 600 }] },
    ]);
    expect(rows.map((r) => r.code)).toEqual(['A', 'B']);
    expect(rows[0]!.laaPerTonne).toBeCloseTo(250, 9);
    expect(rows[1]!.laaPerTonne).toBeCloseTo(89.2857142857, 6);
  });
});

describe('utilisation per still and week (hand-worked)', () => {
  // Mon–Fri 08:00–18:00 (10 h a day), London in January = UTC. Two weeks: 5–11 and 12–18 Jan 2026.
  const still: Still = {
    id: 1,
    name: 'Wash Still 1',
    capacityLitres: 2500,
    heatingKw: 60,
    operatingHours: ([1, 2, 3, 4, 5] as const).map((weekday) => ({ weekday, open: '08:00', close: '18:00' })),
    closures: [{ startsOn: '2026-01-14', endsOn: '2026-01-14', reason: 'Inspection' }],
    cleaningAfterRunMinutes: 0,
    typicalMinutes: { stripping: 360, spirit: 540, redistillation: 420, cleaning: 120, maintenance: 240 },
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
  const runs = [
    run(1, '2026-01-05T08:00', '2026-01-05T14:00', { ferments: [{ fermentId: 1, litres: 2400 }] }), // 6 h done
    run(2, '2026-01-07T12:00', '2026-01-07T18:00', { status: 'planned', ferments: [{ fermentId: 2, litres: 2400 }] }), // 6 h planned
    run(3, '2026-01-13T08:00', '2026-01-13T12:00', { status: 'cancelled' }),
  ];
  const ferment = (id: number, confirmed: string): FermentState => ({
    id,
    code: `F${id}`,
    volumeLitres: 2400,
    pitchedAt: null,
    emptiedAt: null,
    status: 'finished',
    readyAt: null,
    readyP10: null,
    readyP90: null,
    confirmedAt: utc(confirmed),
  });
  // F1 confirmed before the week: no wait. F2 confirmed Wed 10:00; the still was free since Mon 14:00 (end of run 1):
  // waiting [Mon 14:00, Wed 10:00) inside hours = Mon 14–18 (4) + Tue 8–18 (10) + Wed 8–10 (2) = 16 h.
  const rows = utilisationByStillWeek(
    [still],
    runs,
    new Map([
      [1, ferment(1, '2026-01-02T00:00')],
      [2, ferment(2, '2026-01-07T10:00')],
    ]),
    { start: utc('2026-01-05T00:00'), end: utc('2026-01-19T00:00') },
    TZ,
  );
  it('week 2026-W02: 50 h open, 12 h booked (24 %), 6 h done, 16 h idle waiting', () => {
    expect(rows[0]).toMatchObject({ week: '2026-W02', availableHours: 50, bookedHours: 12, doneHours: 6, idleWaitingHours: 16 });
    expect(rows[0]!.utilisation).toBeCloseTo(0.24, 12);
  });
  it('week 2026-W03: 40 h open (Wednesday closed), nothing booked (the cancelled run does not count)', () => {
    expect(rows[1]).toMatchObject({ week: '2026-W03', availableHours: 40, bookedHours: 0, doneHours: 0, idleWaitingHours: 0, utilisation: 0 });
  });
});
