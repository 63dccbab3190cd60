import { GravityInputError, requireFinite } from './errors';
import { brixToSg } from './scales';

/** Default wort correction factor (a workspace setting). */
export const DEFAULT_WCF = 1.04;

function corrected(originalBrix: number, currentBrix: number, wcf: number): { i: number; f: number } {
  requireFinite(originalBrix, 'originalBrix', 'Original Brix');
  requireFinite(currentBrix, 'value', 'Current Brix');
  requireFinite(wcf, 'wcf', 'Wort correction factor');
  if (wcf <= 0) throw new GravityInputError('wcf', 'Wort correction factor must be positive.');
  if (currentBrix > originalBrix) {
    throw new GravityInputError(
      'value',
      `Current refractometer reading ${currentBrix} °Bx is above the original ${originalBrix} °Bx; fermentation cannot raise it.`,
    );
  }
  return { i: originalBrix / wcf, f: currentBrix / wcf };
}

/**
 * SG of a fermenting or fermented sample from refractometer readings, Terrill
 * cubic (S. Terrill, "Refractometer FG Results", 2011). Both readings are raw
 * refractometer °Brix and are divided by the WCF. With nothing fermented
 * (current = original) the cubic does not apply: plain Brix -> SG is used.
 */
export function refractometerFinalSg(originalBrix: number, currentBrix: number, wcf: number = DEFAULT_WCF): number {
  const { i, f } = corrected(originalBrix, currentBrix, wcf);
  if (currentBrix === originalBrix) return brixToSg(f);
  return 1.0 - 0.0044993 * i + 0.011774 * f + 0.00027581 * i ** 2 - 0.0012717 * f ** 2 - 0.00000728 * i ** 3 + 0.000063293 * f ** 3;
}

/** Terrill linear fit (same source), for comparison. */
export function refractometerFinalSgLinear(originalBrix: number, currentBrix: number, wcf: number = DEFAULT_WCF): number {
  const { i, f } = corrected(originalBrix, currentBrix, wcf);
  if (currentBrix === originalBrix) return brixToSg(f);
  return 1.0 - 0.00085683 * i + 0.0034941 * f;
}
