import { describe, expect, it } from 'vitest';
import { probit } from 'simple-statistics';
import { earliestStartNotAtRisk, fermentRisk, isAtRisk, readyQuantile, runRisk, type FermentState } from '../../src/lib/schedule';
import { HOUR, utc } from '../helpers/time';

// Standard normal quantiles from a published normal table (z for the lower-tail probability q).
const NORMAL_TABLE: Array<[q: number, z: number]> = [
  [0.05, -1.6449],
  [0.1, -1.2816],
  [0.25, -0.6745],
  [0.5, 0],
  [0.6, 0.2533],
  [0.8, 0.8416],
  [0.9, 1.2816],
  [0.95, 1.6449],
];
const MINUTE = 60_000;

const median = utc('2026-12-10T12:00');
/** A wash whose ready time is normal with σ = 10 h: P10 and P90 lie 1.2816 σ either side of the median (normal table). */
const normalWash = (over: Partial<FermentState> = {}): FermentState => ({
  id: 1,
  code: 'N-1',
  volumeLitres: 2000,
  pitchedAt: utc('2026-12-03T08:00'),
  emptiedAt: null,
  status: 'slowing',
  readyAt: median,
  readyP10: new Date(median.getTime() - 12.816 * HOUR),
  readyP90: new Date(median.getTime() + 12.816 * HOUR),
  confirmedAt: null,
  ...over,
});
/** A right-skewed wash: P10 10 h before the median, P90 30 h after. */
const skewedWash = (over: Partial<FermentState> = {}): FermentState =>
  normalWash({ id: 2, code: 'S-2', readyP10: new Date(median.getTime() - 10 * HOUR), readyP90: new Date(median.getTime() + 30 * HOUR), ...over });

const hoursFromMedian = (d: Date | null) => (d!.getTime() - median.getTime()) / HOUR;
const runAt = (start: Date, fermentIds = [1]) => ({ startsAt: start, ferments: fermentIds.map((fermentId) => ({ fermentId, litres: 100 })) });

describe('the normal quantiles the interpolation uses (simple-statistics probit against a normal table)', () => {
  it.each(NORMAL_TABLE)('z(%s) = %s', (q, z) => {
    expect(probit(q)).toBeCloseTo(z, 2);
  });
});

describe('readyQuantile: interpolated on the normal scale between P10, the median and P90', () => {
  it.each(NORMAL_TABLE)('a normal ready time with σ = 10 h: the %s quantile lies z × 10 h from the median (z = %s)', (q, z) => {
    expect(hoursFromMedian(readyQuantile(normalWash(), q))).toBeCloseTo(z * 10, 1);
  });

  it.each([
    // Below the median the P10 side's spread (10 h over 1.2816), above it the P90 side's (30 h over 1.2816).
    [0.1, -10],
    [0.25, (-10 * 0.6745) / 1.2816],
    [0.5, 0],
    [0.8, (30 * 0.8416) / 1.2816],
    [0.9, 30],
    [0.95, (30 * 1.6449) / 1.2816],
  ])('a skewed ready time: the %s quantile lies %s h from the median', (q, hours) => {
    expect(hoursFromMedian(readyQuantile(skewedWash(), q))).toBeCloseTo(hours, 1);
  });

  it('gives P10, the median and P90 back exactly', () => {
    const f = skewedWash();
    expect(readyQuantile(f, 0.1)!.getTime()).toBe(f.readyP10!.getTime());
    expect(readyQuantile(f, 0.5)!.getTime()).toBe(median.getTime());
    expect(readyQuantile(f, 0.9)!.getTime()).toBe(f.readyP90!.getTime());
  });

  it('falls back when the forecast is thin: the middle of the window without a median, the median alone without a window, null without either', () => {
    const noMedian = skewedWash({ readyAt: null });
    expect(hoursFromMedian(readyQuantile(noMedian, 0.5))).toBeCloseTo(10, 6);
    const medianOnly = normalWash({ readyP10: null, readyP90: null });
    expect(readyQuantile(medianOnly, 0.8)!.getTime()).toBe(median.getTime());
    expect(readyQuantile(normalWash({ readyAt: null, readyP10: null, readyP90: null }), 0.8)).toBeNull();
  });

  it('refuses a probability outside (0, 1)', () => {
    expect(() => readyQuantile(normalWash(), 1)).toThrow(RangeError);
    expect(() => readyQuantile(normalWash(), 0)).toThrow(RangeError);
  });
});

describe('fermentRisk and runRisk: the one at-risk test', () => {
  const wash = skewedWash();
  const p10 = wash.readyP10!.getTime();
  // 80 % quantile: median + 30 h × 0.8416 / 1.2816 (normal table) = median + 19.70 h.
  const q80 = median.getTime() + ((30 * 0.8416) / 1.2816) * HOUR;

  it.each([
    ['a minute before P10', p10 - MINUTE, 'early'],
    ['at P10', p10, 'at_risk'],
    ['at the median', median.getTime(), 'at_risk'],
    ['two minutes before the 80 % quantile', q80 - 2 * MINUTE, 'at_risk'],
    ['two minutes after the 80 % quantile', q80 + 2 * MINUTE, 'ok'],
    ['after P90', wash.readyP90!.getTime() + HOUR, 'ok'],
  ] as const)('a run starting %s is %s', (_what, t, expected) => {
    expect(fermentRisk(new Date(t), wash)).toBe(expected);
    expect(runRisk(runAt(new Date(t), [2]), [wash])).toBe(expected);
  });

  it('follows the threshold setting: a start 20 h after the median is ok at 80 %, at risk at 95 % (95 % quantile 38.5 h on)', () => {
    const start = new Date(median.getTime() + 20 * HOUR);
    expect(fermentRisk(start, wash, 0.8)).toBe('ok');
    expect(fermentRisk(start, wash, 0.95)).toBe('at_risk');
    // At 50 % the median itself is the line.
    expect(fermentRisk(new Date(median.getTime() + MINUTE), wash, 0.5)).toBe('ok');
  });

  it('never counts a confirmed-finished wash as at risk, and always a stalled or souring one', () => {
    const early = new Date(p10 - 48 * HOUR);
    expect(fermentRisk(early, skewedWash({ status: 'finished', confirmedAt: utc('2026-12-09T06:00') }))).toBe('ok');
    expect(fermentRisk(utc('2027-03-01T00:00'), skewedWash({ status: 'stalled' }))).toBe('stalled');
    expect(fermentRisk(utc('2027-03-01T00:00'), skewedWash({ status: 'souring' }))).toBe('souring');
  });

  it('says no_forecast without a forecast, which is not "at risk"', () => {
    const none = skewedWash({ status: 'insufficient_data', readyAt: null, readyP10: null, readyP90: null });
    expect(fermentRisk(median, none)).toBe('no_forecast');
    expect(isAtRisk('no_forecast')).toBe(false);
    expect(['stalled', 'souring', 'early', 'at_risk'].every((r) => isAtRisk(r as 'early'))).toBe(true);
  });

  it('takes the worst wash of a run, and leaves emptied washes to their own warning', () => {
    const done = normalWash({ id: 3, status: 'finished', confirmedAt: utc('2026-12-01T00:00') });
    const start = new Date(median.getTime() + 5 * HOUR);
    expect(runRisk(runAt(start, [2, 3]), [wash, done])).toBe('at_risk');
    expect(runRisk(runAt(start, [3]), [wash, done])).toBe('ok');
    expect(runRisk(runAt(start, [2]), [skewedWash({ emptiedAt: utc('2026-12-08T00:00') })])).toBe('ok');
    expect(runRisk(runAt(start, []), [wash])).toBe('ok');
  });

  it('earliestStartNotAtRisk: the threshold quantile, or a fresh stable period for a stalled wash', () => {
    const now = utc('2026-12-05T00:00');
    expect((earliestStartNotAtRisk(runAt(now, [2]), [wash], now, 3).getTime() - q80) / MINUTE).toBeCloseTo(0, -1);
    expect(earliestStartNotAtRisk(runAt(now, [2]), [skewedWash({ status: 'stalled' })], now, 3).getTime()).toBe(now.getTime() + 72 * HOUR);
    const later = utc('2026-12-20T00:00');
    expect(earliestStartNotAtRisk(runAt(now, [2]), [wash], later, 3).getTime()).toBe(later.getTime());
  });
});
