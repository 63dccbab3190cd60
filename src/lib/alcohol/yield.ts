import { LITRES_PER_US_GALLON } from '../units';
import { requireRange } from './errors';

/**
 * Litres of absolute alcohol: volume × ABV / 100 (both at 20 °C).
 */
export function laa(litres: number, abvPercent: number): number {
  requireRange(litres, 0, Number.MAX_VALUE, 'litres', 'Volume (L)');
  requireRange(abvPercent, 0, 100, 'abv', 'ABV (%)');
  return (litres * abvPercent) / 100;
}

/** US proof = 2 × ABV (27 CFR §19.1, strength at 60 °F). */
export function proofFromAbv(abvPercent: number): number {
  requireRange(abvPercent, 0, 100, 'abv', 'ABV (%)');
  return 2 * abvPercent;
}

/**
 * Proof gallons (27 CFR §19.1): wine gallons × proof / 100. The strength
 * given is used as is; the small difference between 20 °C and 60 °F
 * strengths is not applied here.
 */
export function proofGallons(litres: number, abvPercent: number): number {
  requireRange(litres, 0, Number.MAX_VALUE, 'litres', 'Volume (L)');
  return ((litres / LITRES_PER_US_GALLON) * proofFromAbv(abvPercent)) / 100;
}

/**
 * A proof gallon holds half a US gallon of absolute alcohol, so
 * 1 LAA = 2 / 3.785411784 PG (about 0.528344).
 */
export function laaToProofGallons(litresAbsoluteAlcohol: number): number {
  requireRange(litresAbsoluteAlcohol, 0, Number.MAX_VALUE, 'laa', 'Litres of absolute alcohol');
  return litresAbsoluteAlcohol / (LITRES_PER_US_GALLON / 2);
}
