import type { ForecastStatus } from '../vocabulary';

export type { ForecastStatus };

export interface Reading {
  takenAt: Date;
  /** Specific gravity, already corrected (temperature, refractometer). */
  sg: number;
  /** True for an instrument we trust less (e.g. a refractometer reading). */
  lowConfidence?: boolean;
  ph?: number | null;
}

export interface TerminalRange {
  min: number;
  max: number;
}

export interface ForecastInput {
  readings: Reading[];
  og: number;
  pitchedAt: Date;
  terminalRange: TerminalRange;
  /** Days the gravity must hold (product default 3). */
  stableDays: number;
  /** Allowed spread of the stable readings (product default 0.001). */
  tolerance: number;
  now: Date;
  /**
   * Optional: past pitch-to-ready durations, in days, of this wash type's finished ferments
   * in the same workspace (this ferment excluded). Blended in while the fit is still loose.
   */
  history?: number[];
  /** Seed of the resampling that gives the interval; the same input and seed give the same forecast. */
  seed?: number;
}

export interface FittedCurve {
  model: string;
  params: Record<string, number>;
  rmse: number;
  curve: Array<{ t: Date; sg: number }>;
}

export interface Forecast {
  status: ForecastStatus;
  reason: string;
  fit: FittedCurve | null;
  predictedFg: null | { value: number; p10: number; p90: number };
  /** When the fitted curve stops moving by more than the tolerance over the stable days. */
  plateauAt: Date | null;
  /** When the stability rule is predicted to be confirmed by readings. */
  readyAt: Date | null;
  readyP10: Date | null;
  readyP90: Date | null;
  /** For finished, stalled and souring ferments: when the rule was first met. */
  ruleMetAt: Date | null;
  /** Start of the current run of readings within the tolerance, if it has 2 or more readings. */
  stableSince: Date | null;
  lastSg: number | null;
  /** Current fall in SG per day (positive while falling). */
  dropPerDay: number | null;
  /** How the wash type's past ferments entered the ready time, when they did. */
  history: ForecastHistoryUse | null;
}

/** The wash type's past pitch-to-stable durations blended into a ready time. */
export interface ForecastHistoryUse {
  /** Past durations still possible as of now (longer than the time already elapsed). */
  count: number;
  /** Their median, days from pitching. */
  medianDays: number;
  /** Weight the history got against the fit (0 to the calibrated maximum). */
  weight: number;
}
