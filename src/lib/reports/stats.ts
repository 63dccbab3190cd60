/**
 * Small descriptive statistics for reports. Quantiles interpolate linearly
 * between order statistics (Hyndman & Fan type 7, the default of R and of
 * most spreadsheets): q(p) = x[h] + (h − ⌊h⌋)(x[⌊h⌋+1] − x[⌊h⌋]), h = (n − 1)p.
 */

export interface Spread {
  n: number;
  median: number;
  /** First quartile (25th percentile). */
  p25: number;
  /** Third quartile (75th percentile). */
  p75: number;
  /** Interquartile range p75 − p25. */
  iqr: number;
  min: number;
  max: number;
}

/** Quantile p (0..1) of already sorted values (type 7). */
export function quantileSorted(sorted: readonly number[], p: number): number {
  if (sorted.length === 0) throw new RangeError('No values');
  if (!(p >= 0 && p <= 1)) throw new RangeError('p must be within 0..1');
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, sorted.length - 1);
  return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!);
}

export function median(values: readonly number[]): number {
  return quantileSorted(
    [...values].sort((a, b) => a - b),
    0.5,
  );
}

/** Median and interquartile spread; null for no values. */
export function spreadOf(values: readonly number[]): Spread | null {
  const finite = values.filter((v) => Number.isFinite(v));
  if (finite.length === 0) return null;
  const s = [...finite].sort((a, b) => a - b);
  const p25 = quantileSorted(s, 0.25);
  const p75 = quantileSorted(s, 0.75);
  return { n: s.length, median: quantileSorted(s, 0.5), p25, p75, iqr: p75 - p25, min: s[0]!, max: s[s.length - 1]! };
}

export function mean(values: readonly number[]): number | null {
  if (values.length === 0) return null;
  return values.reduce((a, b) => a + b, 0) / values.length;
}
