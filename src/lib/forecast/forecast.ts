import { median, quantileSorted } from 'simple-statistics';
import { CALIBRATION as C } from './calibration';
import { bootstrapThetas, fitModel, modelAt, type FitData, type ModelFit, type ModelKind, type Prior } from './fit';
import { mulberry32, normal } from './prng';
import { earliestPossibleStart, firstRuleMet, isDense, ruleSeriesOf, stabilityCheck, FLOAT_EPSILON, type TimedValue } from './stability';
import type { Forecast, ForecastHistoryUse, ForecastInput, ForecastStatus, Reading } from './types';

const DAY_MS = 86_400_000;

const fmt = (sg: number) => sg.toFixed(3);
const days = (d: number) => (Math.abs(d - Math.round(d)) < 0.05 ? String(Math.round(d)) : d.toFixed(1));

interface Prepared {
  readings: Reading[];
  ruleSeries: TimedValue[];
  fitData: FitData;
  dense: boolean;
}

function prepare(input: ForecastInput): Prepared {
  const now = input.now.getTime();
  const seen = new Set<string>();
  const readings = input.readings
    .filter((r) => Number.isFinite(r.sg) && r.takenAt.getTime() <= now && r.takenAt.getTime() >= input.pitchedAt.getTime() - DAY_MS)
    .sort((a, b) => a.takenAt.getTime() - b.takenAt.getTime())
    .filter((r) => {
      const key = `${r.takenAt.getTime()}|${r.sg}`;
      if (seen.has(key)) return false;
      seen.add(key);
      return true;
    });
  const dense = isDense(readings);
  const ruleSeries: TimedValue[] = dense ? ruleSeriesOf(readings) : readings;
  const p0 = input.pitchedAt.getTime();
  const t: number[] = [];
  const y: number[] = [];
  const w: number[] = [];
  if (!readings.some((r) => Math.abs(r.takenAt.getTime() - p0) < DAY_MS / 12)) {
    t.push(0);
    y.push(input.og);
    w.push(1);
  }
  if (dense) {
    // Six-hour medians: keeps the fit fast and shrugs off logger spikes.
    const bins = new Map<number, { t: number[]; y: number[] }>();
    for (const r of readings) {
      const k = Math.floor((r.takenAt.getTime() - p0) / (DAY_MS / 4));
      const b = bins.get(k) ?? { t: [], y: [] };
      b.t.push((r.takenAt.getTime() - p0) / DAY_MS);
      b.y.push(r.sg);
      bins.set(k, b);
    }
    for (const b of [...bins.values()]) {
      t.push(median(b.t));
      y.push(median(b.y));
      w.push(Math.min(2, Math.sqrt(b.y.length) / 2));
    }
  } else {
    for (const r of readings) {
      t.push((r.takenAt.getTime() - p0) / DAY_MS);
      y.push(r.sg);
      w.push(r.lowConfidence ? C.lowConfidenceWeight : 1);
    }
  }
  return { readings, ruleSeries, fitData: { t, y, w }, dense };
}

function priorsFor(kind: ModelKind, input: ForecastInput): Prior[] {
  const { min, max } = input.terminalRange;
  const mid = (min + max) / 2;
  const fgSd = Math.max(C.priors.fgMinSd, max - min);
  const p = C.priors;
  return kind === 'first_order'
    ? [
        { index: 0, mean: mid, sd: fgSd },
        { index: 1, mean: p.lnK.mean, sd: p.lnK.sd },
        { index: 2, mean: p.lagDays.mean, sd: p.lagDays.sd },
      ]
    : [
        { index: 0, mean: input.og, sd: 0.004 },
        { index: 1, mean: mid, sd: fgSd },
        { index: 2, mean: p.lnB.mean, sd: p.lnB.sd },
        { index: 3, mean: p.midDays.mean, sd: p.midDays.sd },
      ];
}

function fallbackStart(kind: ModelKind, input: ForecastInput, tLast: number): number[] {
  const mid = (input.terminalRange.min + input.terminalRange.max) / 2;
  return kind === 'first_order'
    ? [mid, C.priors.lnK.mean, Math.max(C.priors.lagDays.mean, tLast * 0.5)]
    : [input.og + 0.001, mid, C.priors.lnB.mean, Math.max(C.priors.midDays.mean, tLast)];
}

const fgOf = (f: { kind: ModelKind; theta: number[] }) => (f.kind === 'logistic' ? f.theta[1] : f.theta[0]);

function fitFerment(data: FitData, input: ForecastInput): Array<{ fit: ModelFit; weight: number }> {
  const tLast = Math.max(...data.t);
  const low = input.terminalRange.min - 0.02;
  const fits: ModelFit[] = [];
  for (const kind of C.models) {
    const f = fitModel(kind, data, {
      start: input.og,
      priors: priorsFor(kind, input),
      noise: C.priorNoise,
      outlierFloor: 0.0006,
      fallbackStart: fallbackStart(kind, input, tLast),
      lowGuess: low,
    });
    if (f && f.theta.every(Number.isFinite)) fits.push(f);
  }
  // Weigh the models by measurement: Bayesian information criterion weights (3 vs 4 parameters on equal footing).
  const score = (f: ModelFit) => f.n * Math.log(Math.max(f.sse, 1e-14) / Math.max(f.n, 1)) + f.theta.length * Math.log(Math.max(f.n, 2));
  fits.sort((a, b) => score(a) - score(b));
  const raw = fits.map((f) => Math.exp((-0.5 * (score(f) - score(fits[0]))) / C.modelTemperature));
  const total = raw.reduce((a, b) => a + b, 0);
  return fits.map((fit, i) => ({ fit, weight: raw[i] / total })).filter((m) => m.weight >= C.minModelWeight);
}

/** First time (days) after the steepest point at which the curve moves at most `tol` over `span` days. */
function plateauTime(kind: ModelKind, th: number[], og: number, span: number, tol: number): number | null {
  if (kind === 'first_order') {
    // Closed form: (SG(t) - FG)(1 - exp(-k span)) = tol.
    const [fg, lnK, lag] = th;
    const k = Math.exp(lnK);
    const x = ((og - fg) * (1 - Math.exp(-k * span))) / tol;
    if (!(k > 0) || !Number.isFinite(x)) return null;
    const t = Math.max(0, lag + (x > 1 ? Math.log(x) / k : 0));
    return t - lag > 400 ? null : t;
  }
  const f = (t: number) => modelAt(kind, t, th, og);
  const peak = kind === 'logistic' ? th[3] : th[2];
  let lo = Math.max(0, peak);
  const moved = (t: number) => f(t) - f(t + span) - tol;
  if (moved(lo) <= 0) return lo;
  let hi = lo + 1;
  while (moved(hi) > 0) {
    hi = lo + (hi - lo) * 2;
    if (hi - lo > 400) return null;
  }
  for (let i = 0; i < 22; i++) {
    const m = (lo + hi) / 2;
    if (moved(m) > 0) lo = m;
    else hi = m;
  }
  return hi;
}

function dropPerDayFromSeries(series: TimedValue[]): number | null {
  if (series.length < 2) return null;
  const last = series[series.length - 1];
  const from = series.filter((r) => r.takenAt.getTime() >= last.takenAt.getTime() - 2.5 * DAY_MS);
  const a = from.length >= 2 ? from[0] : series[series.length - 2];
  const dt = (last.takenAt.getTime() - a.takenAt.getTime()) / DAY_MS;
  return dt > 0 ? (a.sg - last.sg) / dt : null;
}

function phFalling(readings: Reading[]): boolean | null {
  const ph = readings.filter((r) => r.ph !== null && r.ph !== undefined && Number.isFinite(r.ph));
  if (ph.length < 2) return null;
  return (ph[ph.length - 1].ph as number) < (ph[0].ph as number) - 0.05;
}

const empty: Omit<Forecast, 'status' | 'reason'> = {
  fit: null,
  predictedFg: null,
  plateauAt: null,
  readyAt: null,
  readyP10: null,
  readyP90: null,
  ruleMetAt: null,
  stableSince: null,
  lastSg: null,
  dropPerDay: null,
  history: null,
};

/**
 * Shift of the fitted ready time toward this wash type's past pitch-to-ready durations:
 * a precision-weighted blend of the fit (spread from its resampling) and the history
 * (median and robust spread of the past durations still possible as of now). Early on the
 * fit is loose and the history counts; once the curve's bend is seen the fit dominates.
 */
function historyShift(
  history: readonly number[] | undefined,
  fitted: number,
  q10: number,
  q90: number,
  nowDays: number,
): { shift: number; used: ForecastHistoryUse | null } {
  const h = C.history;
  if (!h.enabled || !history) return { shift: 0, used: null };
  const still = history.filter((d) => Number.isFinite(d) && d > nowDays).sort((a, b) => a - b);
  if (still.length < h.minCount) return { shift: 0, used: null };
  const mid = median(still);
  const spread = Math.max(h.minSpreadDays, 1.4826 * median(still.map((d) => Math.abs(d - mid))));
  const own = Math.max(h.minSpreadDays, (q90 - q10) / 2.563);
  const w = Math.min(h.maxWeight, (own * own) / (own * own + h.lambda * spread * spread));
  return { shift: w * (mid - fitted), used: { count: still.length, medianDays: mid, weight: w } };
}

/** Forecast for one ferment as of `input.now`. Pure and deterministic for a given seed. */
export function forecastFerment(input: ForecastInput): Forecast {
  const prep = prepare(input);
  const { readings, ruleSeries, fitData } = prep;
  const p0 = input.pitchedAt.getTime();
  const now = input.now.getTime();
  const after = readings.filter((r) => r.takenAt.getTime() - p0 >= DAY_MS / 12);
  if (!after.length) {
    return {
      ...empty,
      status: 'insufficient_data',
      reason: readings.length ? 'only the pitch reading so far' : 'no readings yet',
      lastSg: readings.length ? readings[readings.length - 1].sg : null,
    };
  }
  const { min, max } = input.terminalRange;
  const tol = input.tolerance;
  const rule = { stableDays: input.stableDays, tolerance: tol };
  const stab = stabilityCheck(ruleSeries, rule);
  const lastVals = ruleSeries.slice(-3).map((r) => r.sg);
  const level = stab.stable ? (stab.level as number) : median(lastVals);
  const lastSg = readings[readings.length - 1].sg;
  const started = input.og - Math.min(level, median(ruleSeries.slice(-2).map((r) => r.sg))) >= C.startedDrop;
  const below = level < min - tol - FLOAT_EPSILON;
  const above = level > max + tol + FLOAT_EPSILON;
  const ph = phFalling(readings);
  const rangeText = `${fmt(min)}–${fmt(max)}`;

  const models = fitFerment(fitData, input);
  const fit = models.length ? models[0].fit : null;
  const tLastDays = (ruleSeries[ruleSeries.length - 1].takenAt.getTime() - p0) / DAY_MS;
  let dropPerDay = dropPerDayFromSeries(ruleSeries);
  if (fit) {
    const h = 0.05;
    const s = (t: number) => modelAt(fit.kind, t, fit.theta, input.og);
    dropPerDay = (s(tLastDays - h) - s(tLastDays + h)) / (2 * h);
  }

  let status: ForecastStatus;
  let reason: string;
  let ruleMetAt: Date | null = null;
  const held = stab.stableSince && stab.count >= 2 ? stab : null;
  if (!started || (stab.stable && input.og - level < C.startedDrop)) {
    // Held at OG is a lag before the start, never a stall.
    status = 'lag';
    reason = `not yet falling: ${fmt(level)} after ${days((now - p0) / DAY_MS)} days (OG ${fmt(input.og)})`;
  } else if (stab.stable && above) {
    status = 'stalled';
    reason = `held at ${fmt(level)} for ${days(stab.heldDays)} days, above the expected ${rangeText}`;
  } else if (below && ph !== false) {
    status = 'souring';
    reason = `${fmt(level)} is below the expected ${rangeText}${ph ? ', and pH is falling' : ''}`;
  } else if (stab.stable) {
    status = 'finished';
    reason = `held at ${fmt(level)} for ${days(stab.heldDays)} days, inside ${rangeText}`;
  } else {
    const fg = fit ? fgOf(fit) : null;
    const done = fg !== null && input.og - fg > 0 ? (input.og - level) / (input.og - fg) : 0;
    status = done >= C.slowingFraction || (held && stab.heldDays >= 0.5) ? 'slowing' : 'active';
    if (held && stab.heldDays >= 0.5) reason = `held at ${fmt(stab.level as number)} for ${days(stab.heldDays)} of ${days(input.stableDays)} days`;
    else reason = `falling ${Math.max(dropPerDay ?? 0, 0).toFixed(3)} per day`;
    if (fg !== null && fg > max + tol) reason += `; heading for ${fmt(fg)}, above the expected ${rangeText}`;
  }

  if (status === 'finished' || status === 'stalled' || (status === 'souring' && stab.stable)) {
    ruleMetAt = firstRuleMet(readings, rule, stab.stableSince ?? undefined)?.at ?? input.now;
  } else if (status === 'souring') {
    for (let i = 0; i < ruleSeries.length; i++) {
      const m = median(ruleSeries.slice(Math.max(0, i - 2), i + 1).map((r) => r.sg));
      if (m < min - tol - FLOAT_EPSILON) {
        ruleMetAt = ruleSeries[i].takenAt;
        break;
      }
    }
  }

  const out: Forecast = {
    ...empty,
    status,
    reason,
    ruleMetAt,
    stableSince: held ? held.stableSince : null,
    lastSg,
    dropPerDay: dropPerDay === null ? null : Math.round(dropPerDay * 1e5) / 1e5,
  };
  if (!fit) return out;

  const span = input.stableDays;
  const tolEff = C.plateauAlpha * tol;
  // The rule cannot be confirmed before the stable days have passed from the earliest possible start of the stable run.
  const earliest = earliestPossibleStart(ruleSeries, rule) as Date;
  const floorDays = (earliest.getTime() - p0) / DAY_MS + span;
  const nowDays = (now - p0) / DAY_MS;
  const readyFrom = (th: number[], kind: ModelKind = fit.kind): { plateau: number | null; ready: number | null } => {
    const pl = plateauTime(kind, th, input.og, span, tolEff);
    if (pl === null) return { plateau: null, ready: null };
    return { plateau: pl, ready: Math.max(pl + span + C.confirmDelayDays, floorDays, nowDays) };
  };

  // Residual bootstrap per model (replicates shared out by model weight), pooled.
  const rand = mulberry32(input.seed ?? 0x5eed);
  const readyReps: number[] = [];
  const fgReps: number[] = [];
  let pointReady = 0;
  let pointWeight = 0;
  for (const { fit: m, weight } of models) {
    const r = readyFrom(m.theta, m.kind);
    if (r.ready !== null) {
      pointReady += weight * r.ready;
      pointWeight += weight;
    }
    const used = fitData.t.map((_, i) => i).filter((i) => m.w[i] > 0);
    const res = used.map((i) => fitData.y[i] - modelAt(m.kind, fitData.t[i], m.theta, input.og));
    const dof = used.length - m.theta.length;
    const inflate = dof > 0 ? Math.sqrt(used.length / dof) : 1;
    const gaussianSd = Math.max(m.rmse, C.readingNoise);
    const reps = Math.max(1, Math.round(C.replicates * weight));
    const perturbations: number[][] = [];
    for (let b = 0; b < reps; b++) {
      const eps = new Array<number>(fitData.t.length).fill(0);
      for (const i of used) eps[i] = dof >= 3 ? res[Math.floor(rand() * res.length)] * inflate : normal(rand) * gaussianSd;
      perturbations.push(eps);
    }
    for (const th of bootstrapThetas(m, fitData, { start: input.og, priors: priorsFor(m.kind, input), noise: C.priorNoise }, perturbations)) {
      if (!th.every(Number.isFinite)) continue;
      if (m === fit) fgReps.push(fgOf({ kind: m.kind, theta: th }));
      readyReps.push(readyFrom(th, m.kind).ready ?? 400);
    }
  }
  const point = { plateau: readyFrom(fit.theta).plateau, ready: pointWeight > 0 ? pointReady / pointWeight : null };
  readyReps.sort((a, b) => a - b);
  fgReps.sort((a, b) => a - b);
  const fgHat = fgOf(fit);
  if (fgReps.length >= 5) {
    const lo = quantileSorted(fgReps, 0.1);
    const hi = quantileSorted(fgReps, 0.9);
    out.predictedFg = {
      value: Math.round(fgHat * 1e5) / 1e5,
      p10: Math.round(Math.min(fgHat, fgHat - C.interval.widen * (fgHat - lo)) * 1e5) / 1e5,
      p90: Math.round(Math.max(fgHat, fgHat + C.interval.widen * (hi - fgHat)) * 1e5) / 1e5,
    };
  } else {
    out.predictedFg = { value: fgHat, p10: fgHat, p90: fgHat };
  }

  const tEnd = Math.max(nowDays, point.ready ?? nowDays) + 2;
  const samples = 60;
  out.fit = {
    model: fit.kind,
    params:
      fit.kind === 'logistic'
        ? { pi: fit.theta[0], pe: fit.theta[1], bPerDay: Math.exp(fit.theta[2]), midpointDays: fit.theta[3] }
        : { og: input.og, fg: fit.theta[0], kPerDay: Math.exp(fit.theta[1]), lagDays: fit.theta[2] },
    rmse: fit.rmse,
    curve: Array.from({ length: samples + 1 }, (_, i) => {
      const t = (tEnd * i) / samples;
      return { t: new Date(p0 + t * DAY_MS), sg: Math.round(modelAt(fit.kind, t, fit.theta, input.og) * 1e5) / 1e5 };
    }),
  };
  if (point.plateau !== null) out.plateauAt = new Date(p0 + point.plateau * DAY_MS);

  if (status === 'finished') {
    out.readyAt = out.readyP10 = out.readyP90 = ruleMetAt;
    return out;
  }
  if (status === 'stalled' || status === 'souring' || point.ready === null) return out;

  const fitted = C.pointFromReplicates && readyReps.length >= 5 ? Math.max(quantileSorted(readyReps, 0.5), floorDays, nowDays) : point.ready;
  let q10 = readyReps.length >= 5 ? quantileSorted(readyReps, 0.1) : fitted;
  let q90 = readyReps.length >= 5 ? quantileSorted(readyReps, 0.9) : fitted;
  const { shift, used } = historyShift(input.history, fitted, q10, q90, nowDays);
  out.history = used;
  const ready = Math.max(fitted + shift, floorDays, nowDays);
  q10 += ready - fitted;
  q90 += ready - fitted;
  const remaining = Math.max(0, ready - nowDays);
  const extra = C.interval.perRemaining * remaining + C.interval.floorDays;
  let p10 = ready - C.interval.widen * Math.max(0, ready - q10) - extra;
  // Readings already holding: the rule may be confirmed as soon as the stable days have passed,
  // whatever the curve says (rounding and a misread allowance can end the creep early).
  if (earliest.getTime() < ruleSeries[ruleSeries.length - 1].takenAt.getTime()) p10 = Math.min(p10, floorDays + C.interval.heldSlackDays);
  p10 = Math.max(floorDays, nowDays, p10);
  const p90 = ready + C.interval.widen * Math.max(0, q90 - ready) + extra;
  out.readyAt = new Date(p0 + ready * DAY_MS);
  out.readyP10 = new Date(p0 + Math.min(p10, ready) * DAY_MS);
  out.readyP90 = new Date(p0 + p90 * DAY_MS);
  return out;
}
