/**
 * The one charge rule: how many litres a run puts in its still. The server (warnings, slot
 * suggestions, reports, exports, run records, calendar feeds, a new booking's default) and
 * the board island all derive the charge here, so they cannot disagree.
 */

/** A line of litres: wash from a ferment, or low wines from a feeding stripping run. */
export interface LitresLine {
  litres: number;
}

export interface ChargeSource {
  /** The charge stored on the run (booked or recorded); null when not set. */
  chargeLitres: number | null | undefined;
  /** Wash from ferments (stripping and redistillation runs). */
  ferments: readonly LitresLine[];
  /** Low wines from stripping runs (spirit and redistillation runs). */
  feeds: readonly LitresLine[];
}

/** Litres of a set of lines. */
export function lineLitres(lines: readonly LitresLine[]): number {
  return lines.reduce((sum, l) => sum + l.litres, 0);
}

/**
 * Litres the run puts in the still: the charge stored on it when set; else a stripping
 * run's wash from its ferments; else a spirit run's low wines fed from its stripping runs;
 * else unknown (null).
 */
export function runChargeLitres(run: ChargeSource): number | null {
  if (run.chargeLitres !== null && run.chargeLitres !== undefined) return run.chargeLitres;
  if (run.ferments.length > 0) return lineLitres(run.ferments);
  if (run.feeds.length > 0) return lineLitres(run.feeds);
  return null;
}
