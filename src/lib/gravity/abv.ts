import { GravityInputError, requireRange } from './errors';
import { sgToPlato } from './scales';

/** SG range accepted for OG and FG. */
const SG_MIN = 0.98;
const SG_MAX = 1.2;
/** Density of ethanol relative to water, as used by the ABW -> ABV step. */
const ETHANOL_SG = 0.794;

function checkPair(og: number, fg: number): void {
  requireRange(og, SG_MIN, SG_MAX, 'og', 'Original gravity');
  requireRange(fg, SG_MIN, SG_MAX, 'fg', 'Final gravity');
  if (fg > og) throw new GravityInputError('fg', `Final gravity ${fg} is above original gravity ${og}.`);
}

/** Common practice: ABV = 131.25 × (OG − FG). Under-reads at high gravity. */
export function abvSimple(og: number, fg: number): number {
  checkPair(og, fg);
  return 131.25 * (og - fg);
}

/**
 * Balling real-extract method (Balling's 2.0665 g extract -> 1 g ethanol),
 * with °Plato from the ASBC cubic:
 * RE = 0.1808·OE + 0.8192·AE; ABW = (OE − RE)/(2.0665 − 0.010665·OE); ABV = ABW × FG / 0.794.
 */
export function abvBalling(og: number, fg: number): number {
  checkPair(og, fg);
  const originalExtract = sgToPlato(og);
  const apparentExtract = sgToPlato(fg);
  const realExtract = 0.1808 * originalExtract + 0.8192 * apparentExtract;
  const abw = (originalExtract - realExtract) / (2.0665 - 0.010665 * originalExtract);
  return (abw * fg) / ETHANOL_SG;
}

/** High-gravity approximation: ABV = 76.08 (OG − FG)/(1.775 − OG) × FG/0.794. */
export function abvHighGravity(og: number, fg: number): number {
  checkPair(og, fg);
  return ((76.08 * (og - fg)) / (1.775 - og)) * (fg / ETHANOL_SG);
}

/** The product's ABV figure. */
export const ABV_FORMULA_NAME =
  'Balling real-extract method (°Plato by the ASBC polynomial; RE = 0.1808·OE + 0.8192·AE, ABW = (OE − RE)/(2.0665 − 0.010665·OE), ABV = ABW × FG / 0.794)';

export function abv(og: number, fg: number): number {
  return abvBalling(og, fg);
}

/** Apparent attenuation in %: (OG − FG)/(OG − 1) × 100. */
export function apparentAttenuation(og: number, fg: number): number {
  checkPair(og, fg);
  if (og <= 1) throw new GravityInputError('og', 'Original gravity must be above 1.000 to compute attenuation.');
  return ((og - fg) / (og - 1)) * 100;
}
