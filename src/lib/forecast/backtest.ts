/**
 * Backtest: replay each ferment's readings one by one, forecast as of each reading,
 * and score the forecasts against what the readings later showed.
 */
import { median } from 'simple-statistics';
import { CALIBRATION as C } from './calibration';
import { forecastFerment } from './forecast';
import { dailyLevels, firstRuleMet, isDense, type TimedValue } from './stability';
import { trueSg, type TrueCurve, type WashType } from './synthetic';
import type { Forecast } from './types';

const DAY_MS = 86_400_000;

export interface BacktestFerment {
  id: string;
  washType: WashType;
  readings: Array<{ takenAt: Date; sg: number; lowConfidence?: boolean }>;
}

export interface BacktestOptions {
  ranges: Record<WashType, { min: number; max: number }>;
  stableDays?: number;
  tolerance?: number;
  /** True curves by ferment id, for the curve oracle (synthetic data only). */
  truth?: Map<string, TrueCurve>;
  /** Logger series: forecast at most this often (hours) during the replay. */
  denseEveryHours?: number;
  onForecast?: (ferment: BacktestFerment, asOf: Date, f: Forecast) => void;
  /** Called for each scored checkpoint with the errors in days (predicted minus actual). */
  onCheckpoint?: (ferment: BacktestFerment, checkpoint: string, errors: { ours: number; oracle: number | null }, f: Forecast) => void;
  now?: () => number;
  /**
   * Give each forecast the wash type's past pitch-to-ready durations (ForecastInput.history),
   * taken leave-one-out from the OTHER finished ferments of the set, never the one forecast
   * (default true; the same pool baseline (a) uses).
   */
  useHistory?: boolean;
}

export interface ErrorStats {
  n: number;
  maeDays: number | null;
  /** Median of predicted minus actual: positive = predicted too late. */
  medianBiasDays: number | null;
}

export interface BacktestReport {
  ferments: number;
  forecasts: number;
  outcome: { finished: number; stalled: number; souring: number; unfinished: number };
  readyMaeDays: Record<'25' | '50' | '75', { ours: ErrorStats; oracle: ErrorStats; baselineWashMedian: ErrorStats; baselineLastTwo: ErrorStats }>;
  coverage: { p10p90: number | null; n: number; atCheckpoints: number | null; nCheckpoints: number };
  stall: {
    precision: number | null;
    recall: number | null;
    medianDelayDays: number | null;
    maxDelayDays: number | null;
    truePositives: number;
    falsePositives: number;
    finishedReportedStalled: number;
    actual: number;
  };
  souring: { recall: number | null; actual: number; falsePositives: number };
  timing: { totalMs: number; meanMsPerForecast: number };
}

type Outcome = 'finished' | 'stalled' | 'souring' | 'unfinished';

function mae(errs: number[]): ErrorStats {
  return {
    n: errs.length,
    maeDays: errs.length ? errs.reduce((a, b) => a + Math.abs(b), 0) / errs.length : null,
    medianBiasDays: errs.length ? median(errs) : null,
  };
}

/** Ready time of a known curve: the first time it moves less than the tolerance over the stable days, plus those days (confirmation). */
export function oracleReady(curve: TrueCurve, pitchedAt: number, stableDays: number, tolerance: number): number | null {
  const tol = tolerance;
  const f = (t: number) => trueSg(curve, t);
  let t = 0;
  const step = 1 / 96;
  // The curve's steepest point comes first; the plateau is after it.
  const peak = curve.model === 'logistic' ? curve.midDays : curve.lagDays;
  t = Math.max(0, peak);
  while (t < 120 && f(t) - f(t + stableDays) > tol) t += step;
  if (t >= 120) return null;
  return pitchedAt + (t + stableDays) * DAY_MS;
}

export function runBacktest(ferments: BacktestFerment[], o: BacktestOptions): BacktestReport {
  const stableDays = o.stableDays ?? 3;
  const tolerance = o.tolerance ?? 0.001;
  const clock = o.now ?? (() => performance.now());
  const rule = { stableDays, tolerance };
  const everyMs = (o.denseEveryHours ?? 0) * 3_600_000;

  interface Prepared {
    f: BacktestFerment;
    sorted: BacktestFerment['readings'];
    pitchedAt: number;
    og: number;
    range: { min: number; max: number };
    outcome: Outcome;
    ruleAt: number | null;
    finalSg: number;
    dense: boolean;
    series: TimedValue[];
  }
  const prepared: Prepared[] = ferments.map((f) => {
    const sorted = [...f.readings].sort((a, b) => a.takenAt.getTime() - b.takenAt.getTime());
    const range = o.ranges[f.washType];
    const dense = isDense(sorted);
    const series: TimedValue[] = dense ? dailyLevels(sorted) : sorted; // for checkpoints and the final level
    // A gravity held at OG is a lag, not a verdict: look for the first time the rule holds after the fall began.
    let met = firstRuleMet(sorted, rule);
    while (met && sorted[0].sg - met.level < C.startedDrop) met = firstRuleMet(sorted, rule, new Date(met.at.getTime() + 1));
    let outcome: Outcome = 'unfinished';
    if (met) outcome = met.level > range.max + tolerance + 1e-9 ? 'stalled' : met.level < range.min - tolerance - 1e-9 ? 'souring' : 'finished';
    const tail = series.slice(-3).map((r) => r.sg);
    const finalSg = met ? met.level : median(tail);
    // A ferment that passes below the range before holding there is souring.
    if (outcome === 'finished' || outcome === 'unfinished') {
      for (let i = 2; i < series.length; i++) {
        if (median(series.slice(i - 2, i + 1).map((r) => r.sg)) < range.min - tolerance - 1e-9) {
          outcome = 'souring';
          break;
        }
      }
    }
    return {
      f,
      sorted,
      pitchedAt: sorted[0].takenAt.getTime(),
      og: sorted[0].sg,
      range,
      outcome,
      ruleAt: met ? met.at.getTime() : null,
      finalSg,
      dense,
      series,
    };
  });

  const checkpoints = ['25', '50', '75'] as const;
  const errs = Object.fromEntries(
    checkpoints.map((c) => [c, { ours: [] as number[], oracle: [] as number[], a: [] as number[], b: [] as number[] }]),
  ) as Record<(typeof checkpoints)[number], { ours: number[]; oracle: number[]; a: number[]; b: number[] }>;
  let forecasts = 0;
  let covered = 0;
  let coverN = 0;
  let coveredCp = 0;
  let coverCpN = 0;
  let totalMs = 0;
  const stallFlags = new Map<string, number>();
  const souringFlags = new Map<string, number>();

  for (const p of prepared) {
    const { f, sorted, pitchedAt, og, range } = p;
    const history =
      o.useHistory === false
        ? undefined
        : prepared
            .filter((q) => q !== p && q.outcome === 'finished' && q.ruleAt !== null && q.f.washType === f.washType)
            .map((q) => ((q.ruleAt as number) - q.pitchedAt) / DAY_MS);
    const base = {
      og,
      pitchedAt: new Date(pitchedAt),
      terminalRange: range,
      stableDays,
      tolerance,
      history,
    };
    // Checkpoint times: first reading at which the drop reaches 25/50/75 % of OG -> final.
    const cpTimes = new Map<string, number>();
    const drop = og - p.finalSg;
    for (const c of checkpoints) {
      const q = Number(c) / 100;
      const hit = p.series.find((r) => drop > 0 && (og - r.sg) / drop >= q);
      if (hit) cpTimes.set(c, hit.takenAt.getTime());
    }
    let lastDenseAt = -Infinity;
    for (let i = 1; i < sorted.length; i++) {
      const asOf = sorted[i].takenAt.getTime();
      if (i + 1 < sorted.length && sorted[i + 1].takenAt.getTime() === asOf) continue;
      const isCp = [...cpTimes.values()].includes(asOf);
      if (p.dense && !isCp && asOf - lastDenseAt < everyMs && i !== sorted.length - 1) continue;
      lastDenseAt = asOf;
      const readings = sorted.slice(0, i + 1);
      const t0 = clock();
      const fc = forecastFerment({ ...base, readings, now: new Date(asOf), seed: 1 });
      totalMs += clock() - t0;
      forecasts++;
      o.onForecast?.(f, new Date(asOf), fc);
      if (fc.status === 'stalled' && !stallFlags.has(f.id)) stallFlags.set(f.id, asOf);
      if (fc.status === 'souring' && !souringFlags.has(f.id)) souringFlags.set(f.id, asOf);
      if (p.outcome !== 'finished' || p.ruleAt === null || asOf >= p.ruleAt) continue;
      const actual = p.ruleAt;
      if (fc.readyP10 && fc.readyP90) {
        coverN++;
        if (fc.readyP10.getTime() <= actual && actual <= fc.readyP90.getTime()) covered++;
      }
      for (const c of checkpoints) {
        if (cpTimes.get(c) !== asOf) continue;
        const ours = fc.readyAt ? fc.readyAt.getTime() : asOf + stableDays * DAY_MS;
        errs[c].ours.push((ours - actual) / DAY_MS);
        if (fc.readyP10 && fc.readyP90) {
          coverCpN++;
          if (fc.readyP10.getTime() <= actual && actual <= fc.readyP90.getTime()) coveredCp++;
        }
        const curve = o.truth?.get(f.id);
        const or = curve ? oracleReady(curve, pitchedAt, stableDays, tolerance) : null;
        if (or !== null) errs[c].oracle.push((or - actual) / DAY_MS);
        o.onCheckpoint?.(f, c, { ours: (ours - actual) / DAY_MS, oracle: or === null ? null : (or - actual) / DAY_MS }, fc);
        // Baseline (a): median pitch-to-ready time of this wash type in the other ferments.
        const others = prepared.filter((q) => q !== p && q.outcome === 'finished' && q.ruleAt !== null);
        const same = others.filter((q) => q.f.washType === f.washType);
        const pool = (same.length ? same : others).map((q) => (q.ruleAt as number) - q.pitchedAt);
        if (pool.length) errs[c].a.push((pitchedAt + median(pool) - actual) / DAY_MS);
        // Baseline (b): line through the last two readings to the middle of the range, plus the stable days.
        const s = (p.dense ? dailyLevels(readings) : readings).filter((r) => r.takenAt.getTime() <= asOf);
        const mid = (range.min + range.max) / 2;
        let hitAt = asOf;
        if (s.length >= 2) {
          const a = s[s.length - 2];
          const b = s[s.length - 1];
          const slope = (a.sg - b.sg) / ((b.takenAt.getTime() - a.takenAt.getTime()) / DAY_MS);
          if (b.sg > mid && slope > 0) hitAt = b.takenAt.getTime() + ((b.sg - mid) / slope) * DAY_MS;
          else if (b.sg > mid) hitAt = asOf + 14 * DAY_MS; // not falling: no line to extend
        }
        errs[c].b.push((Math.max(hitAt, asOf) + stableDays * DAY_MS - actual) / DAY_MS);
      }
    }
  }

  const stalled = prepared.filter((p) => p.outcome === 'stalled');
  const tp = stalled.filter((p) => stallFlags.has(p.f.id));
  const fp = prepared.filter((p) => p.outcome !== 'stalled' && stallFlags.has(p.f.id));
  const delays = tp.map((p) => ((stallFlags.get(p.f.id) as number) - (p.ruleAt as number)) / DAY_MS);
  const souring = prepared.filter((p) => p.outcome === 'souring');
  const readyMaeDays = Object.fromEntries(
    checkpoints.map((c) => [c, { ours: mae(errs[c].ours), oracle: mae(errs[c].oracle), baselineWashMedian: mae(errs[c].a), baselineLastTwo: mae(errs[c].b) }]),
  ) as BacktestReport['readyMaeDays'];
  return {
    ferments: prepared.length,
    forecasts,
    outcome: {
      finished: prepared.filter((p) => p.outcome === 'finished').length,
      stalled: stalled.length,
      souring: souring.length,
      unfinished: prepared.filter((p) => p.outcome === 'unfinished').length,
    },
    readyMaeDays,
    coverage: { p10p90: coverN ? covered / coverN : null, n: coverN, atCheckpoints: coverCpN ? coveredCp / coverCpN : null, nCheckpoints: coverCpN },
    stall: {
      precision: tp.length + fp.length ? tp.length / (tp.length + fp.length) : null,
      recall: stalled.length ? tp.length / stalled.length : null,
      medianDelayDays: delays.length ? median(delays) : null,
      maxDelayDays: delays.length ? Math.max(...delays) : null,
      truePositives: tp.length,
      falsePositives: fp.length,
      finishedReportedStalled: prepared.filter((p) => p.outcome === 'finished' && stallFlags.has(p.f.id)).length,
      actual: stalled.length,
    },
    souring: {
      recall: souring.length ? souring.filter((p) => souringFlags.has(p.f.id)).length / souring.length : null,
      actual: souring.length,
      falsePositives: prepared.filter((p) => p.outcome !== 'souring' && souringFlags.has(p.f.id)).length,
    },
    timing: { totalMs, meanMsPerForecast: forecasts ? totalMs / forecasts : 0 },
  };
}
