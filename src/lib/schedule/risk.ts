/**
 * The one test of "at risk" (product words: a run whose wash's probability of being
 * confirmable by the run's start is below the distillery's threshold, i.e. the run starts
 * before the threshold quantile of the ready time; "early" = it starts before P10).
 * Warnings, runs at risk, plan proposals, booking and e-mail all ask this module.
 *
 * The forecast gives three points of the ready-time distribution: P10, the median (readyAt)
 * and P90. Any other quantile is read by interpolating linearly on the normal scale: the
 * q-quantile lies at z = Φ⁻¹(q) between (z₁₀, P10), (0, P50) and (z₉₀, P90), using the segment
 * on its side of the median (and its slope beyond P10 or P90). For a normal ready time this
 * is exact; for a skewed one it follows each side's own spread.
 */
import { probit } from 'simple-statistics';
import type { FermentState, Run } from './types';

/** What the test says about one run (or one of its washes), worst first in RISK_ORDER. */
export type RunRisk = 'stalled' | 'souring' | 'early' | 'at_risk' | 'no_forecast' | 'ok';

/** Product default: a run is at risk below an 80 % chance that its wash is confirmable by its start. */
export const DEFAULT_AT_RISK_THRESHOLD = 0.8;

/** Worst first. */
export const RISK_ORDER: readonly RunRisk[] = ['stalled', 'souring', 'early', 'at_risk', 'no_forecast', 'ok'];

const Z10 = probit(0.1);
const Z90 = probit(0.9);

type ReadyPoints = Pick<FermentState, 'readyAt' | 'readyP10' | 'readyP90'>;
type RiskFerment = Pick<FermentState, 'id' | 'status' | 'emptiedAt' | 'confirmedAt'> & ReadyPoints;

/**
 * The q-quantile of a wash's ready time (0 < q < 1), interpolated on the normal scale
 * between P10, the median and P90 (z from simple-statistics' `probit`). Without a median
 * the middle of P10–P90 stands in; without one edge the median stands in for that side.
 * Null when the forecast gives no time at all.
 */
export function readyQuantile(f: ReadyPoints, q: number): Date | null {
  if (!(q > 0 && q < 1)) throw new RangeError('q must be between 0 and 1');
  const p10 = f.readyP10?.getTime() ?? null;
  const p90 = f.readyP90?.getTime() ?? null;
  const p50 = f.readyAt?.getTime() ?? (p10 !== null && p90 !== null ? (p10 + p90) / 2 : (p10 ?? p90));
  if (p50 === null) return null;
  const z = probit(q);
  if (z < 0) return new Date(p10 === null ? p50 : Math.round(p50 + ((p10 - p50) * z) / Z10));
  if (z > 0) return new Date(p90 === null ? p50 : Math.round(p50 + ((p90 - p50) * z) / Z90));
  return new Date(p50);
}

/** True for the answers that make a run "at risk" (early is the worst case of at risk). */
export function isAtRisk(risk: RunRisk): boolean {
  return risk === 'stalled' || risk === 'souring' || risk === 'early' || risk === 'at_risk';
}

/** The worse of two answers. */
export function worseRisk(a: RunRisk, b: RunRisk): RunRisk {
  return RISK_ORDER.indexOf(a) <= RISK_ORDER.indexOf(b) ? a : b;
}

/**
 * One wash against a start time. A stalled or souring wash is at risk whatever the time;
 * a confirmed-finished wash never is; a forecast-less wash is 'no_forecast'; otherwise
 * 'early' before P10, 'at_risk' before the `threshold` quantile, else 'ok'.
 */
export function fermentRisk(startsAt: Date, f: RiskFerment, threshold: number = DEFAULT_AT_RISK_THRESHOLD): RunRisk {
  if (f.status === 'stalled') return 'stalled';
  if (f.status === 'souring') return 'souring';
  if (f.status === 'finished' && f.confirmedAt) return 'ok';
  const early = readyQuantile(f, 0.1);
  const safe = readyQuantile(f, threshold);
  if (!early || !safe) return 'no_forecast';
  const t = startsAt.getTime();
  if (t < early.getTime()) return 'early';
  if (t < safe.getTime()) return 'at_risk';
  return 'ok';
}

export type RiskFerments = ReadonlyMap<number, RiskFerment> | readonly RiskFerment[];

function byId(ferments: RiskFerments): ReadonlyMap<number, RiskFerment> {
  return ferments instanceof Map ? ferments : new Map((ferments as readonly RiskFerment[]).map((f) => [f.id, f]));
}

/** Each wash the run takes (emptied ones aside: they have their own warning) with its answer. */
export function fermentRisks(
  run: Pick<Run, 'startsAt' | 'ferments'>,
  ferments: RiskFerments,
  threshold: number = DEFAULT_AT_RISK_THRESHOLD,
): Array<{ fermentId: number; risk: RunRisk }> {
  const map = byId(ferments);
  const out: Array<{ fermentId: number; risk: RunRisk }> = [];
  for (const id of new Set(run.ferments.map((c) => c.fermentId))) {
    const f = map.get(id);
    if (!f || f.emptiedAt) continue;
    out.push({ fermentId: id, risk: fermentRisk(run.startsAt, f, threshold) });
  }
  return out;
}

/** The run's answer: the worst over the washes it takes; 'ok' for a run that takes none. */
export function runRisk(run: Pick<Run, 'startsAt' | 'ferments'>, ferments: RiskFerments, threshold: number = DEFAULT_AT_RISK_THRESHOLD): RunRisk {
  return fermentRisks(run, ferments, threshold).reduce<RunRisk>((worst, x) => worseRisk(worst, x.risk), 'ok');
}

/**
 * The earliest start at which the run is no longer at risk: the `threshold` quantile of
 * every linked wash's ready time (not before `now`). A stalled or souring wash has no
 * honest window, so it gets a fresh stability period (`stableDays`) from now.
 */
export function earliestStartNotAtRisk(
  run: Pick<Run, 'ferments'>,
  ferments: RiskFerments,
  now: Date,
  stableDays: number,
  threshold: number = DEFAULT_AT_RISK_THRESHOLD,
): Date {
  const map = byId(ferments);
  let t = now.getTime();
  for (const c of run.ferments) {
    const f = map.get(c.fermentId);
    if (!f || f.emptiedAt || (f.status === 'finished' && f.confirmedAt)) continue;
    if (f.status === 'stalled' || f.status === 'souring') {
      t = Math.max(t, now.getTime() + stableDays * 86_400_000);
      continue;
    }
    const safe = readyQuantile(f, threshold);
    if (safe) t = Math.max(t, safe.getTime());
  }
  return new Date(t);
}
