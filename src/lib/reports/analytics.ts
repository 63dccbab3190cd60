/**
 * Pure aggregations behind the manager's reports. Inputs are plain rows the
 * server loads; nothing here reads a database or a clock.
 */
import {
  actualHours,
  actualSpan,
  availableHours,
  bookedHours,
  idleWaitingHours,
  type FermentState,
  type Run,
  type Still,
  type TimedRun,
  type TimeRange,
} from '../schedule';
import { isoWeekOf, monthOf, weeksIn } from './periods';
import { mean, spreadOf, type Spread } from './stats';

const HOUR_MS = 3_600_000;
const DAY_MS = 86_400_000;

// ---------------------------------------------------------------- utilisation

export interface UtilisationRow {
  stillId: number;
  stillName: string;
  week: string;
  /** Operating hours within the week and range, closures removed. */
  availableHours: number;
  /** Hours of live (not cancelled) runs at their bookings inside operating hours: the plan. */
  bookedHours: number;
  /** Hours of live runs inside operating hours, started and done runs at their actual times, the rest as booked. */
  actualHours: number;
  /** Hours of runs marked done, at their actual times, inside operating hours. */
  doneHours: number;
  /** The same done runs at their bookings: doneHours − doneBookedHours is how much longer (or shorter) they really took. */
  doneBookedHours: number;
  /** Hours the still stood free waiting for a wash to be confirmed finished. */
  idleWaitingHours: number;
  /** actualHours / availableHours, null when the still was not open. */
  utilisation: number | null;
}

/**
 * Per still and ISO week: available, booked (planned), actual, done (actual and as booked) and
 * idle-waiting hours (definitions in lib/schedule/utilisation.ts and actual-times.ts). A run that
 * was started counts at its actual times in the utilisation. Idle waiting is measured over the
 * whole week slice, so a wait that began in an earlier week counts in each week it covers.
 */
export function utilisationByStillWeek(
  stills: readonly Still[],
  runs: ReadonlyArray<Run & Partial<Pick<TimedRun, 'startedAt' | 'finishedAt'>>>,
  ferments: ReadonlyMap<number, FermentState>,
  range: TimeRange,
  timeZone: string,
): UtilisationRow[] {
  const out: UtilisationRow[] = [];
  const weeks = weeksIn(range, timeZone);
  for (const still of stills) {
    const mine = runs.filter((r) => r.stillId === still.id);
    const done = mine.filter((r) => r.status === 'done');
    for (const w of weeks) {
      const available = availableHours(still, w.range, timeZone);
      const booked = bookedHours(mine, still, w.range, timeZone);
      const actual = actualHours(mine, still, w.range, timeZone);
      out.push({
        stillId: still.id,
        stillName: still.name,
        week: w.week,
        availableHours: available,
        bookedHours: booked,
        actualHours: actual,
        doneHours: actualHours(done, still, w.range, timeZone),
        doneBookedHours: bookedHours(done, still, w.range, timeZone),
        idleWaitingHours: idleWaitingHours(mine, still, ferments, w.range, timeZone),
        utilisation: available > 0 ? actual / available : null,
      });
    }
  }
  return out;
}

// ---------------------------------------------------------------- cycle time

export interface CycleInput {
  washType: string;
  pitchedAt: Date;
  /** When the stability rule was first met (confirmed finished); null = not yet. */
  ruleMetAt: Date | null;
}

export interface CycleRow extends Spread {
  washType: string;
  /** 'all' or a month 'YYYY-MM' (month of the confirmed finish). */
  period: string;
}

/** Cycle time (pitch -> confirmed finished, in days): median and IQR per wash type, overall and per month of finish. */
export function cycleTimes(items: readonly CycleInput[], timeZone: string): CycleRow[] {
  const groups = new Map<string, { washType: string; period: string; days: number[] }>();
  const add = (washType: string, period: string, days: number) => {
    const key = `${washType}\u0000${period}`;
    const g = groups.get(key) ?? { washType, period, days: [] };
    g.days.push(days);
    groups.set(key, g);
  };
  for (const it of items) {
    if (!it.ruleMetAt || it.ruleMetAt.getTime() < it.pitchedAt.getTime()) continue;
    const days = (it.ruleMetAt.getTime() - it.pitchedAt.getTime()) / DAY_MS;
    add(it.washType, 'all', days);
    add(it.washType, monthOf(it.ruleMetAt, timeZone), days);
  }
  const rows: CycleRow[] = [];
  for (const g of groups.values()) rows.push({ washType: g.washType, period: g.period, ...spreadOf(g.days)! });
  return rows.sort((a, b) => a.washType.localeCompare(b.washType) || (a.period === 'all' ? -1 : b.period === 'all' ? 1 : a.period.localeCompare(b.period)));
}

// ---------------------------------------------------------------- stall / souring

export interface OutcomeStatusInput {
  washType: string;
  /** Every status the ferment's forecast has shown (history and current). */
  statuses: readonly string[];
}

export interface TroubleRate {
  washType: string;
  ferments: number;
  stalled: number;
  souring: number;
  stallRate: number | null;
  souringRate: number | null;
}

/** Share of ferments that were ever flagged stalled / souring, per wash type and in total ('All washes'). */
export function troubleRates(items: readonly OutcomeStatusInput[]): TroubleRate[] {
  const groups = new Map<string, { n: number; stalled: number; souring: number }>();
  const bump = (key: string, st: boolean, so: boolean) => {
    const g = groups.get(key) ?? { n: 0, stalled: 0, souring: 0 };
    g.n += 1;
    if (st) g.stalled += 1;
    if (so) g.souring += 1;
    groups.set(key, g);
  };
  for (const it of items) {
    const st = it.statuses.includes('stalled');
    const so = it.statuses.includes('souring');
    bump(it.washType, st, so);
    bump('All washes', st, so);
  }
  return [...groups.entries()]
    .map(([washType, g]) => ({
      washType,
      ferments: g.n,
      stalled: g.stalled,
      souring: g.souring,
      stallRate: g.n ? g.stalled / g.n : null,
      souringRate: g.n ? g.souring / g.n : null,
    }))
    .sort((a, b) => (a.washType === 'All washes' ? 1 : b.washType === 'All washes' ? -1 : a.washType.localeCompare(b.washType)));
}

// ---------------------------------------------------------------- forecast accuracy

export interface HistoryPoint {
  asOf: Date;
  readyAt: Date | null;
  readyP10: Date | null;
  readyP90: Date | null;
}

export interface AccuracyInput {
  fermentId: number;
  code: string;
  /** Actual confirmed finish (rule met). */
  ruleMetAt: Date;
  history: readonly HistoryPoint[];
}

export interface AccuracyPoint {
  fermentId: number;
  code: string;
  actual: Date;
  asOf: Date;
  predicted: Date;
  /** |predicted − actual| in days. */
  absErrorDays: number;
  /** predicted − actual in days (positive = forecast said later than it was). */
  signedErrorDays: number;
  /** Actual inside [P10, P90] of that forecast; null when the forecast had no window. */
  insideWindow: boolean | null;
}

/** How far ahead the judged forecast was made. */
export const ACCURACY_LEAD_HOURS = 72;
/** A forecast made between 48 and 96 hours before the finish may stand for "three days ahead". */
export const ACCURACY_LEAD_TOLERANCE_HOURS = 24;

/**
 * For each finished ferment: the forecast made closest to 3 days before the actual
 * finish (asOf within 72 ± 24 h before it, with a predicted ready time), against the actual.
 */
export function accuracyPoints(items: readonly AccuracyInput[]): AccuracyPoint[] {
  const out: AccuracyPoint[] = [];
  for (const it of items) {
    const target = it.ruleMetAt.getTime() - ACCURACY_LEAD_HOURS * HOUR_MS;
    let best: HistoryPoint | null = null;
    for (const h of it.history) {
      if (!h.readyAt) continue;
      const d = Math.abs(h.asOf.getTime() - target);
      if (d > ACCURACY_LEAD_TOLERANCE_HOURS * HOUR_MS) continue;
      if (!best || d < Math.abs(best.asOf.getTime() - target)) best = h;
    }
    if (!best || !best.readyAt) continue;
    const signed = (best.readyAt.getTime() - it.ruleMetAt.getTime()) / DAY_MS;
    const a = it.ruleMetAt.getTime();
    out.push({
      fermentId: it.fermentId,
      code: it.code,
      actual: it.ruleMetAt,
      asOf: best.asOf,
      predicted: best.readyAt,
      absErrorDays: Math.abs(signed),
      signedErrorDays: signed,
      insideWindow: best.readyP10 && best.readyP90 ? best.readyP10.getTime() <= a && a <= best.readyP90.getTime() : null,
    });
  }
  return out.sort((x, y) => x.actual.getTime() - y.actual.getTime());
}

export interface AccuracyMonth {
  month: string;
  n: number;
  meanAbsErrorDays: number;
  medianAbsErrorDays: number;
  /** Share of finishes inside the P10–P90 window (of those with a window). */
  insideShare: number | null;
}

export function accuracyByMonth(points: readonly AccuracyPoint[], timeZone: string): AccuracyMonth[] {
  const groups = new Map<string, AccuracyPoint[]>();
  for (const p of points) {
    const m = monthOf(p.actual, timeZone);
    groups.set(m, [...(groups.get(m) ?? []), p]);
  }
  return [...groups.entries()]
    .sort(([a], [b]) => a.localeCompare(b))
    .map(([month, ps]) => {
      const windowed = ps.filter((p) => p.insideWindow !== null);
      return {
        month,
        n: ps.length,
        meanAbsErrorDays: mean(ps.map((p) => p.absErrorDays))!,
        medianAbsErrorDays: spreadOf(ps.map((p) => p.absErrorDays))!.median,
        insideShare: windowed.length ? windowed.filter((p) => p.insideWindow).length / windowed.length : null,
      };
    });
}

// ---------------------------------------------------------------- throughput

export interface ThroughputRunInput {
  type: string;
  /** When the run finished (or its booked end when no finish time was stamped). */
  finishedAt: Date;
  /** Its booking, and when it really started (null: not stamped, the booked start stands). */
  startsAt: Date;
  endsAt: Date;
  startedAt: Date | null;
  /** Wash litres charged from ferments (stripping runs). */
  washLitres: number;
  /** LAA recorded per fraction. */
  fractions: ReadonlyArray<{ fraction: string; laa: number }>;
}

export interface ThroughputWeek {
  week: string;
  washLitres: number;
  /** LAA in low wines off stripping runs. */
  lowWinesLaa: number;
  /** LAA in hearts off spirit / redistillation runs. */
  heartsLaa: number;
  runs: number;
  /** Still hours of those runs as booked, and as they really ran (start to finish). */
  bookedHours: number;
  actualHours: number;
}

/** Done runs per ISO week of their finish: wash distilled, LAA collected, still hours booked and actually run. */
export function throughputByWeek(runs: readonly ThroughputRunInput[], weeks: readonly string[], timeZone: string): ThroughputWeek[] {
  const rows = new Map<string, ThroughputWeek>(
    weeks.map((w) => [w, { week: w, washLitres: 0, lowWinesLaa: 0, heartsLaa: 0, runs: 0, bookedHours: 0, actualHours: 0 }]),
  );
  for (const r of runs) {
    const w = isoWeekOf(r.finishedAt, timeZone);
    const row = rows.get(w);
    if (!row) continue;
    row.runs += 1;
    row.bookedHours += (r.endsAt.getTime() - r.startsAt.getTime()) / HOUR_MS;
    const span = actualSpan({ status: 'done', startsAt: r.startsAt, endsAt: r.endsAt, startedAt: r.startedAt, finishedAt: r.finishedAt });
    row.actualHours += (span.end.getTime() - span.start.getTime()) / HOUR_MS;
    if (r.type === 'stripping') row.washLitres += r.washLitres;
    for (const f of r.fractions) {
      if (f.fraction === 'low_wines') row.lowWinesLaa += f.laa;
      if (f.fraction === 'hearts') row.heartsLaa += f.laa;
    }
  }
  return [...rows.values()];
}

// ---------------------------------------------------------------- yield per tonne

export interface StrippingShare {
  /** LAA in the stripping run's low wines. */
  lowWinesLaa: number;
  /** All ferment litres in that run's charge. */
  totalLitres: number;
  /** Litres of this ferment in it. */
  litres: number;
}

export interface YieldInput {
  fermentId: number;
  code: string;
  washType: string;
  /** Sum of the recipe's ingredient masses, kg. */
  ingredientsKg: number;
  runs: readonly StrippingShare[];
}

export interface YieldRow {
  fermentId: number;
  code: string;
  washType: string;
  tonnes: number;
  laa: number;
  laaPerTonne: number;
}

export const YIELD_FORMULA =
  "LAA per tonne = (Σ over the stripping runs the ferment charged of low-wines LAA × the ferment's share of that charge) ÷ (recipe ingredients in kg ÷ 1000).";

/** Yield of low wines (LAA) per tonne of recipe ingredients, for ferments with a recipe and a recorded stripping run. */
export function yieldPerTonne(items: readonly YieldInput[]): YieldRow[] {
  const out: YieldRow[] = [];
  for (const it of items) {
    if (!(it.ingredientsKg > 0)) continue;
    const shares = it.runs.filter((r) => r.totalLitres > 0);
    if (shares.length === 0) continue;
    const laa = shares.reduce((s, r) => s + (r.lowWinesLaa * r.litres) / r.totalLitres, 0);
    const tonnes = it.ingredientsKg / 1000;
    out.push({ fermentId: it.fermentId, code: it.code, washType: it.washType, tonnes, laa, laaPerTonne: laa / tonnes });
  }
  return out;
}
