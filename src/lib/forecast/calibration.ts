/**
 * Constants of the forecast. The priors describe a typical distillery wash
 * (common practice: most washes finish in about 4 to 14 days after a lag of
 * up to a day or two). The interval and rule-timing constants were calibrated
 * with the backtest on synthetic ferments generated with seed 2, a different
 * set from the committed fixture (seed 1), so the fixture's figures are out of sample.
 * The prior strength (priorNoise) and the history blend were calibrated on seeds
 * 2-5 and 100-111 (60 and 30 ferments), never on seed 1 or on the unit test's seed 15.
 */
export const CALIBRATION = {
  /** Candidate curve models; the fit with the better information criterion is used. */
  models: ['first_order', 'logistic'] as Array<'first_order' | 'logistic'>,
  /** Models weighing less than this in the average are dropped. */
  minModelWeight: 0.02,
  /** Softens the information-criterion weights: with few readings both models stay in play. */
  modelTemperature: 3 as number,
  /** Typical single-reading noise in SG: scales the priors against the data. */
  readingNoise: 0.0007,
  /**
   * Noise level the priors are weighed against (a prior counts like one reading of this
   * noise per prior sd): above the reading noise, so that with a handful of readings the
   * typical curve holds the rate and final gravity where the data cannot yet tell them apart.
   */
  priorNoise: 0.0035 as number,
  /** Weight of a lower-confidence reading (e.g. refractometer) relative to a hydrometer reading. */
  lowConfidenceWeight: 0.25,
  /** A ferment has started once it has fallen this far below OG. */
  startedDrop: 0.003,
  /** Fraction of the fitted drop after which a ferment is 'slowing'. */
  slowingFraction: 0.8,
  priors: {
    /** Final gravity: centre of the wash type's range, sd = max(this, range width). */
    fgMinSd: 0.004,
    /** First-order rate k per day: log-normal. */
    lnK: { mean: Math.log(0.5), sd: 0.7 },
    lagDays: { mean: 0.5, sd: 1.0 },
    /** Logistic slope B per day: log-normal; midpoint M in days. */
    lnB: { mean: Math.log(1.2), sd: 0.7 },
    midDays: { mean: 2.5, sd: 2.0 },
  },
  /** Curve moves at most alpha x tolerance over the stable days at the plateau (readings are noisy and rounded). */
  plateauAlpha: 1.0,
  /** Average wait for the reading that confirms the rule, days. */
  confirmDelayDays: 0,
  /** Use the median of the resampled ready times as the point forecast (else the fitted curve's). */
  pointFromReplicates: 0 as number,
  /**
   * Blend with the wash type's past durations (ForecastInput.history): weight of the history
   * = own^2 / (own^2 + lambda x spread^2), own = the fit's resampled P10-P90 / 2.563, spread =
   * robust sd of the past durations still possible now; at most maxWeight; skipped under minCount.
   */
  history: { enabled: 1 as number, minCount: 3 as number, minSpreadDays: 0.3 as number, lambda: 4 as number, maxWeight: 0.8 as number },
  /** Resampling replicates for the interval. */
  replicates: 60 as number,
  /** Interval: P10/P90 = point -/+ (widen x resampled half-width + perRemaining x days to go + floor). */
  interval: { widen: 1.5 as number, perRemaining: 0.11 as number, floorDays: 0.4 as number, heldSlackDays: 0.25 as number },
} as const;
