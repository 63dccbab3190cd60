/**
 * Curve models of a ferment's fall and their least-squares fits.
 *
 * - Four-parameter logistic: P(t) = Pe + (Pi - Pe) / (1 + exp(B (t - M))).
 *   For fixed Pi and Pe, ln((Pi - P)/(P - Pe)) = B (t - M) is a straight line.
 * - First-order decay to a residual, with a lag: SG(t) = FG + (OG - FG) exp(-k (t - lag))
 *   for t > lag, OG before; ln(SG - FG) is a straight line in t.
 *
 * Each fit starts from the linear regression of the transform, per candidate final
 * level, choosing the candidate by least squares on the original scale; it is then
 * polished by Levenberg-Marquardt on all parameters, with optional Gaussian priors
 * (used when only a few readings are in) and one pass that drops gross misreads.
 */
import { weightedLinearRegression, median } from 'simple-statistics';

export type ModelKind = 'logistic' | 'first_order';

export interface Prior {
  index: number;
  mean: number;
  sd: number;
}

export interface FitData {
  t: number[];
  y: number[];
  /** Relative weights (1 = a normal reading). */
  w: number[];
}

export interface FitOptions {
  /** Known starting level (OG) for the first-order model. */
  start?: number;
  priors?: Prior[];
  /** Typical reading noise: scales the priors against the data. */
  noise?: number;
  /** Smallest residual scale used when flagging misreads. */
  outlierFloor?: number;
  maxIter?: number;
  /** Skip the grid start and begin at these parameters (used for resampling). */
  initial?: number[];
}

export interface ModelFit {
  kind: ModelKind;
  /** logistic: [Pi, Pe, ln B, M]; first_order: [FG, ln k, lag]. */
  theta: number[];
  /** Weighted sum of squared data residuals (priors excluded). */
  sse: number;
  rmse: number;
  n: number;
  /** Weights after misreads were dropped. */
  w: number[];
}

export function logisticAt(t: number, th: readonly number[]): number {
  const [pi, pe, lnB, m] = th;
  const z = Math.exp(lnB) * (t - m);
  if (z > 700) return pe;
  return pe + (pi - pe) / (1 + Math.exp(z));
}

export function firstOrderAt(t: number, th: readonly number[], start: number): number {
  const [fg, lnK, lag] = th;
  if (t <= lag) return start;
  return fg + (start - fg) * Math.exp(-Math.exp(lnK) * (t - lag));
}

export function modelAt(kind: ModelKind, t: number, th: readonly number[], start: number): number {
  return kind === 'logistic' ? logisticAt(t, th) : firstOrderAt(t, th, start);
}

/** Solves A x = b for a small dense system (Gaussian elimination, partial pivoting). */
function solve(a: number[][], b: number[]): number[] | null {
  const n = b.length;
  const m = a.map((row, i) => [...row, b[i]]);
  for (let c = 0; c < n; c++) {
    let piv = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(m[r][c]) > Math.abs(m[piv][c])) piv = r;
    if (Math.abs(m[piv][c]) < 1e-300) return null;
    [m[c], m[piv]] = [m[piv], m[c]];
    for (let r = c + 1; r < n; r++) {
      const f = m[r][c] / m[c][c];
      for (let k = c; k <= n; k++) m[r][k] -= f * m[c][k];
    }
  }
  const x = new Array<number>(n).fill(0);
  for (let r = n - 1; r >= 0; r--) {
    let s = m[r][n];
    for (let k = r + 1; k < n; k++) s -= m[r][k] * x[k];
    x[r] = s / m[r][r];
  }
  return x;
}

/** Model value at t and its gradient with respect to the parameters (written into `grad`). */
export function modelGrad(kind: ModelKind, t: number, th: readonly number[], start: number, grad: number[]): number {
  if (kind === 'logistic') {
    const [pi, pe, lnB, m] = th;
    const bRate = Math.exp(lnB);
    const z = Math.exp(Math.min(700, bRate * (t - m)));
    const g = 1 / (1 + z);
    const c = (pi - pe) * g * g * z;
    grad[0] = g;
    grad[1] = 1 - g;
    grad[2] = -c * (t - m) * bRate;
    grad[3] = c * bRate;
    return pe + (pi - pe) * g;
  }
  const [fg, lnK, lag] = th;
  if (t <= lag) {
    grad[0] = grad[1] = grad[2] = 0;
    return start;
  }
  const k = Math.exp(lnK);
  const e = Math.exp(-k * (t - lag));
  const a = (start - fg) * e;
  grad[0] = 1 - e;
  grad[1] = -a * (t - lag) * k;
  grad[2] = a * k;
  return fg + a;
}

function cost(kind: ModelKind, th: number[], d: FitData, w: number[], o: FitOptions): number {
  const start = o.start ?? 0;
  let c = 0;
  for (let i = 0; i < d.t.length; i++) {
    if (w[i] <= 0) continue;
    const e = d.y[i] - modelAt(kind, d.t[i], th, start);
    c += w[i] * e * e;
  }
  const noise = o.noise ?? 1;
  for (const p of o.priors ?? []) {
    const r = (noise * (th[p.index] - p.mean)) / p.sd;
    c += r * r;
  }
  return c;
}

/** Levenberg-Marquardt with analytic gradients (the models have 3-4 parameters). */
function levenbergMarquardt(kind: ModelKind, th0: number[], d: FitData, w: number[], o: FitOptions, maxIter: number): number[] {
  const np = th0.length;
  const start = o.start ?? 0;
  const noise = o.noise ?? 1;
  let th = [...th0];
  let c0 = cost(kind, th, d, w, o);
  let lambda = 1e-3;
  const grad = new Array<number>(np).fill(0);
  const jtj: number[][] = Array.from({ length: np }, () => new Array<number>(np).fill(0));
  const jtr = new Array<number>(np).fill(0);
  for (let it = 0; it < maxIter; it++) {
    for (let a = 0; a < np; a++) {
      jtr[a] = 0;
      for (let b = 0; b < np; b++) jtj[a][b] = 0;
    }
    for (let i = 0; i < d.t.length; i++) {
      if (w[i] <= 0) continue;
      const e = d.y[i] - modelGrad(kind, d.t[i], th, start, grad);
      for (let a = 0; a < np; a++) {
        jtr[a] += w[i] * grad[a] * e;
        for (let b = a; b < np; b++) jtj[a][b] += w[i] * grad[a] * grad[b];
      }
    }
    for (const p of o.priors ?? []) {
      const s2 = (noise / p.sd) ** 2;
      jtj[p.index][p.index] += s2;
      jtr[p.index] -= s2 * (th[p.index] - p.mean);
    }
    for (let a = 0; a < np; a++) for (let b = 0; b < a; b++) jtj[a][b] = jtj[b][a];
    let improved = false;
    for (let tries = 0; tries < 8; tries++) {
      const aug = jtj.map((row, a) => row.map((v, b) => (a === b ? v * (1 + lambda) + 1e-30 : v)));
      const step = solve(aug, jtr);
      if (!step || step.some((s) => !Number.isFinite(s))) {
        lambda *= 10;
        continue;
      }
      const cand = th.map((v, j) => v + step[j]);
      const c = cost(kind, cand, d, w, o);
      if (Number.isFinite(c) && c < c0) {
        const rel = (c0 - c) / Math.max(c0, 1e-300);
        th = cand;
        c0 = c;
        lambda = Math.max(lambda / 5, 1e-9);
        improved = true;
        if (rel < 1e-9) return th;
        break;
      }
      lambda *= 10;
    }
    if (!improved) break;
  }
  return th;
}

function dataSse(kind: ModelKind, th: number[], d: FitData, w: number[], start: number): number {
  let s = 0;
  for (let i = 0; i < d.t.length; i++) {
    const e = d.y[i] - modelAt(kind, d.t[i], th, start);
    s += w[i] * e * e;
  }
  return s;
}

function linspace(a: number, b: number, n: number): number[] {
  return Array.from({ length: n }, (_, i) => a + ((b - a) * i) / (n - 1));
}

/** Starting point by regression of the linearising transform, per candidate final level. */
function gridStart(kind: ModelKind, d: FitData, o: FitOptions, lowGuess: number): number[] | null {
  const yMin = Math.min(...d.y);
  const yMax = Math.max(...d.y);
  const drop = yMax - yMin;
  if (drop <= 0) return null;
  const start = o.start ?? yMax;
  const pi = kind === 'logistic' ? yMax + 0.02 * drop + 1e-12 : start;
  const lo = Math.min(lowGuess, yMin - 0.5 * drop);
  let best: number[] | null = null;
  let bestSse = Infinity;
  for (const fl of linspace(lo, yMin - 0.005 * drop, 14)) {
    const pts: number[][] = [];
    const ws: number[] = [];
    for (let i = 0; i < d.t.length; i++) {
      const y = d.y[i];
      if (d.w[i] <= 0) continue;
      if (kind === 'logistic') {
        if (y <= fl || y >= pi) continue;
        pts.push([d.t[i], Math.log((pi - y) / (y - fl))]);
        const g = 1 / (pi - y) + 1 / (y - fl);
        ws.push(d.w[i] / (g * g));
      } else {
        if (y <= fl || y >= start - 0.02 * (start - fl)) continue;
        pts.push([d.t[i], Math.log(y - fl)]);
        ws.push(d.w[i] * (y - fl) * (y - fl));
      }
    }
    if (pts.length < 2) continue;
    const { m, b } = weightedLinearRegression(pts, ws);
    let th: number[];
    if (kind === 'logistic') {
      if (!(m > 0)) continue;
      th = [pi, fl, Math.log(m), -b / m];
    } else {
      if (!(m < 0)) continue;
      const k = -m;
      th = [fl, Math.log(k), (b - Math.log(start - fl)) / k];
    }
    const sse = dataSse(kind, th, d, d.w, start);
    if (sse < bestSse) {
      bestSse = sse;
      best = th;
    }
  }
  return best;
}

export function fitModel(kind: ModelKind, d: FitData, o: FitOptions & { fallbackStart?: number[]; lowGuess?: number } = {}): ModelFit | null {
  const start = o.start ?? Math.max(...d.y);
  const maxIter = o.maxIter ?? 25;
  let th0 = o.initial ?? gridStart(kind, d, o, o.lowGuess ?? Infinity) ?? o.fallbackStart ?? null;
  if (!th0) return null;
  let w = d.w;
  let th = levenbergMarquardt(kind, th0, d, w, o, maxIter);
  if (o.outlierFloor !== undefined && d.t.length >= 5) {
    const res = d.t.map((t, i) => d.y[i] - modelAt(kind, t, th, start));
    const scale = Math.max(1.4826 * median(res.map((r) => Math.abs(r))), o.outlierFloor);
    const flagged = res.map((r) => Math.abs(r) > 4 * scale);
    if (flagged.some(Boolean) && flagged.filter(Boolean).length <= Math.max(1, d.t.length / 10)) {
      w = d.w.map((v, i) => (flagged[i] ? 0 : v));
      th0 = th;
      th = levenbergMarquardt(kind, th0, d, w, o, maxIter);
    }
  }
  const sse = dataSse(kind, th, d, w, start);
  const n = w.filter((v) => v > 0).length;
  const wsum = w.reduce((a, b) => a + b, 0);
  return { kind, theta: th, sse, rmse: Math.sqrt(sse / Math.max(wsum, 1e-12)), n, w };
}

/**
 * Linearised residual bootstrap: one Gauss-Newton step from the fitted parameters for
 * each set of perturbed readings (y* = fitted + e*). Near the optimum this matches a
 * full refit closely and costs a matrix-vector product per replicate.
 */
export function bootstrapThetas(fit: ModelFit, d: FitData, o: FitOptions, perturbations: number[][]): number[][] {
  const th = fit.theta;
  const np = th.length;
  const n = d.t.length;
  const start = o.start ?? Math.max(...d.y);
  const priors = o.priors ?? [];
  const noise = o.noise ?? 1;
  // Jacobian of the model (not of the residuals), weighted rows, plus prior rows.
  const rows: number[][] = [];
  const sw: number[] = [];
  for (let i = 0; i < n; i++) {
    const row = new Array<number>(np).fill(0);
    modelGrad(fit.kind, d.t[i], th, start, row);
    const s = Math.sqrt(fit.w[i]);
    rows.push(row.map((v) => v * s));
    sw.push(s);
  }
  const a: number[][] = Array.from({ length: np }, () => new Array<number>(np).fill(0));
  for (const row of rows) for (let p = 0; p < np; p++) for (let q = 0; q < np; q++) a[p][q] += row[p] * row[q];
  for (const pr of priors) a[pr.index][pr.index] += (noise / pr.sd) ** 2;
  for (let p = 0; p < np; p++) a[p][p] += 1e-18;
  const inv: number[][] = [];
  for (let p = 0; p < np; p++) {
    const e = new Array<number>(np).fill(0);
    e[p] = 1;
    const col = solve(a, e);
    if (!col) return [];
    inv.push(col);
  }
  return perturbations.map((eps) => {
    const g = new Array<number>(np).fill(0);
    for (let i = 0; i < n; i++) {
      if (fit.w[i] <= 0) continue;
      const r = sw[i] * eps[i];
      for (let p = 0; p < np; p++) g[p] += rows[i][p] * r;
    }
    // inv is symmetric: column p of A^-1 equals row p.
    return th.map((v, p) => {
      let s = 0;
      for (let q = 0; q < np; q++) s += inv[p][q] * g[q];
      return v + s;
    });
  });
}
