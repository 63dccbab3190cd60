/**
 * The product's stability rule, usable on its own:
 * readings spanning at least the required stable days, at least 3 of them,
 * whose spread (max - min) is within the tolerance (+ a float epsilon),
 * one misread ignored when there are 5 or more.
 */

export const FLOAT_EPSILON = 1e-9;
const DAY_MS = 86_400_000;
/** Slack on the span so that clock jitter of a few seconds does not cost a day. */
const SPAN_SLACK_MS = 60_000;

export interface TimedValue {
  takenAt: Date;
  sg: number;
}

export interface StabilityOptions {
  stableDays: number;
  tolerance: number;
}

export interface StabilityResult {
  /** The rule is met by the trailing readings. */
  stable: boolean;
  /** Start of the longest trailing run within the tolerance (2+ readings), else null. */
  stableSince: Date | null;
  /** Days covered by that run (0 without a run). */
  heldDays: number;
  /** Readings in that run. */
  count: number;
  /** Median of that run (or of the last reading without a run). */
  level: number | null;
  /** Spread of that run after ignoring a misread. */
  spread: number | null;
  /** The reading ignored as a misread, if any. */
  ignored: TimedValue | null;
}

function sortedByTime<T extends TimedValue>(readings: readonly T[]): T[] {
  return [...readings].sort((a, b) => a.takenAt.getTime() - b.takenAt.getTime());
}

function medianOf(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/** Spread of a set of values, ignoring the one farthest from the median when there are 5 or more. */
export function robustSpread(values: number[], ignoreFrom = 5): { spread: number; ignoredIndex: number } {
  if (values.length === 0) return { spread: 0, ignoredIndex: -1 };
  let ignoredIndex = -1;
  if (values.length >= ignoreFrom) {
    const med = medianOf(values);
    let far = -1;
    for (let i = 0; i < values.length; i++) {
      const d = Math.abs(values[i] - med);
      if (d > far) {
        far = d;
        ignoredIndex = i;
      }
    }
  }
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < values.length; i++) {
    if (i === ignoredIndex) continue;
    if (values[i] < lo) lo = values[i];
    if (values[i] > hi) hi = values[i];
  }
  return { spread: hi - lo, ignoredIndex };
}

/** Upper bound on how far back the trailing run is searched (keeps the check O(n) in practice). */
const MAX_RUN = 60;

/**
 * Checks the rule on the trailing readings of a series (any order; sorted here).
 * The longest trailing run within the tolerance is found; the rule holds when it
 * spans the required days with at least 3 readings.
 */
export function stabilityCheck(readings: readonly TimedValue[], options: StabilityOptions): StabilityResult {
  const sorted = sortedByTime(readings);
  const n = sorted.length;
  const none: StabilityResult = {
    stable: false,
    stableSince: null,
    heldDays: 0,
    count: n ? 1 : 0,
    level: n ? sorted[n - 1].sg : null,
    spread: null,
    ignored: null,
  };
  if (n < 2) return none;
  const limit = options.tolerance + FLOAT_EPSILON;
  const last = sorted[n - 1].takenAt.getTime();
  let best = -1;
  let bestIgnored = -1;
  let bestSpread = 0;
  const values: number[] = [sorted[n - 1].sg];
  for (let i = n - 2; i >= Math.max(0, n - MAX_RUN); i--) {
    values.push(sorted[i].sg);
    const { spread, ignoredIndex } = robustSpread(values);
    if (spread <= limit) {
      best = i;
      bestIgnored = ignoredIndex;
      bestSpread = spread;
    } else if (values.length >= 6) {
      // With a misread already allowed for, older readings can only widen the spread.
      break;
    }
  }
  if (best === -1) return none;
  const run = sorted.slice(best);
  const ignoredReading = bestIgnored >= 0 ? sorted[n - 1 - bestIgnored] : null;
  const kept = run.filter((r) => r !== ignoredReading).map((r) => r.sg);
  const spanMs = last - sorted[best].takenAt.getTime();
  const stable = run.length >= 3 && spanMs + SPAN_SLACK_MS >= options.stableDays * DAY_MS;
  return {
    stable,
    stableSince: sorted[best].takenAt,
    heldDays: spanMs / DAY_MS,
    count: run.length,
    level: medianOf(kept),
    spread: bestSpread,
    ignored: ignoredReading,
  };
}

/**
 * The first time the rule was met, replaying the readings one by one as they came in:
 * at each reading the rule is checked on what was known then (a logger series reduced
 * to daily levels of the readings so far, so today's level is the median of today's
 * readings up to that moment). Null when it never was.
 */
export function firstRuleMet(readings: readonly TimedValue[], options: StabilityOptions, from?: Date): { at: Date; level: number } | null {
  const sorted = sortedByTime(readings);
  const start = from ? from.getTime() : -Infinity;
  const dayOf = sorted.map((r) => Math.floor(r.takenAt.getTime() / DAY_MS));
  // Completed days: level fixed once the day is over.
  const done: DailyLevel[] = [];
  const doneCounts: number[] = [];
  let bucket: number[] = [];
  let from24 = 0;
  for (let end = 1; end <= sorted.length; end++) {
    const i = end - 1;
    while (sorted[from24].takenAt.getTime() <= sorted[i].takenAt.getTime() - DAY_MS) from24++;
    if (i > 0 && dayOf[i] !== dayOf[i - 1]) {
      done.push({ day: '', takenAt: sorted[i - 1].takenAt, sg: medianOf(bucket), count: bucket.length });
      doneCounts.push(bucket.length);
      bucket = [];
    }
    bucket.push(sorted[i].sg);
    if (end < 3 || sorted[i].takenAt.getTime() < start) continue;
    if (end < sorted.length && sorted[end].takenAt.getTime() === sorted[i].takenAt.getTime()) continue;
    const counts = [...doneCounts, bucket.length].sort((a, b) => a - b);
    const dense = end >= 8 && counts[counts.length >> 1] >= 4;
    const series: TimedValue[] = dense
      ? [...done.slice(-MAX_RUN), { takenAt: sorted[i].takenAt, sg: medianOf(sorted.slice(from24, end).map((r) => r.sg)) }]
      : sorted.slice(Math.max(0, end - MAX_RUN), end);
    const r = stabilityCheck(series, options);
    if (r.stable) return { at: sorted[i].takenAt, level: r.level as number };
  }
  return null;
}

export interface DailyLevel {
  /** UTC calendar day, YYYY-MM-DD. */
  day: string;
  /** Time of the day's last reading: the level is known from then on. */
  takenAt: Date;
  /** Median of the day's readings (robust to logger noise and spikes). */
  sg: number;
  count: number;
}

/** Robust per-day reduction of a (dense) series: one median level per UTC day. */
export function dailyLevels(readings: readonly TimedValue[]): DailyLevel[] {
  const sorted = sortedByTime(readings);
  const out: DailyLevel[] = [];
  let day = '';
  let bucket: number[] = [];
  let lastAt: Date | null = null;
  const flush = () => {
    if (bucket.length && lastAt) out.push({ day, takenAt: lastAt, sg: medianOf(bucket), count: bucket.length });
  };
  for (const r of sorted) {
    const d = r.takenAt.toISOString().slice(0, 10);
    if (d !== day) {
      flush();
      day = d;
      bucket = [];
    }
    bucket.push(r.sg);
    lastAt = r.takenAt;
  }
  flush();
  return out;
}

/** True when the series is a logger's: typically 4 or more readings per day. */
export function isDense(readings: readonly TimedValue[]): boolean {
  if (readings.length < 8) return false;
  const levels = dailyLevels(readings);
  const counts = levels.map((l) => l.count).sort((a, b) => a - b);
  return counts[counts.length >> 1] >= 4;
}

/**
 * Earliest start a future confirmation could have: the longest trailing run within the
 * tolerance when one reading may be ignored however few there are (more readings may
 * still arrive and let the rule ignore a misread). A lower bound for planning, not the rule.
 */
export function earliestPossibleStart(readings: readonly TimedValue[], options: StabilityOptions): Date | null {
  const sorted = sortedByTime(readings);
  const n = sorted.length;
  if (!n) return null;
  const limit = options.tolerance + FLOAT_EPSILON;
  let best = n - 1;
  const values: number[] = [sorted[n - 1].sg];
  for (let i = n - 2; i >= Math.max(0, n - MAX_RUN); i--) {
    values.push(sorted[i].sg);
    if (robustSpread(values, 3).spread <= limit) best = i;
    else if (values.length >= 6) break;
  }
  return sorted[best].takenAt;
}

/**
 * The series the rule is checked on: the readings themselves, or for a logger series
 * the completed days' median levels plus a current level, the median of the last 24 hours
 * (a median of the first few readings of a new day would be as noisy as one reading).
 */
export function ruleSeriesOf(readings: readonly TimedValue[]): TimedValue[] {
  const sorted = sortedByTime(readings);
  if (!isDense(sorted)) return sorted;
  const levels: TimedValue[] = dailyLevels(sorted);
  const last = sorted[sorted.length - 1].takenAt.getTime();
  const recent = sorted.filter((r) => r.takenAt.getTime() > last - DAY_MS).map((r) => r.sg);
  levels[levels.length - 1] = { takenAt: sorted[sorted.length - 1].takenAt, sg: medianOf(recent) };
  return levels;
}
