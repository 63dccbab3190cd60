import { GravityInputError, requireFinite } from './errors';

/**
 * SG (20/20) <-> °Plato and °Brix.
 * °Plato: ASBC cubic. °Brix: cubic fit to the NBS sucrose table (valid up to
 * SG 1.17874, about 40 °Bx). Both cubics rise monotonically for every SG
 * (their derivatives have no real root), so each inverse has exactly one
 * solution, found by a safeguarded Newton iteration: the round trip is exact
 * to rounding, unlike the usual rational approximations.
 */

type Cubic = readonly [c3: number, c2: number, c1: number, c0: number];

const ASBC_PLATO: Cubic = [135.997, -630.272, 1111.14, -616.868];
const NBS_BRIX: Cubic = [182.4601, -775.6821, 1262.7794, -669.5622];

/** SG bracket searched by the inverses: far wider than any wash or wort. */
const SG_SEARCH_MIN = 0.8;
const SG_SEARCH_MAX = 1.6;

function evalCubic([c3, c2, c1, c0]: Cubic, x: number): number {
  return ((c3 * x + c2) * x + c1) * x + c0;
}

function evalCubicSlope([c3, c2, c1]: Cubic, x: number): number {
  return (3 * c3 * x + 2 * c2) * x + c1;
}

/** Solve cubic(x) = target for x in the SG bracket; the cubic is increasing. */
function invertIncreasingCubic(cubic: Cubic, target: number, field: string, label: string): number {
  let lo = SG_SEARCH_MIN;
  let hi = SG_SEARCH_MAX;
  if (target < evalCubic(cubic, lo) || target > evalCubic(cubic, hi)) {
    throw new GravityInputError(field, `${label} ${target} is outside the range this conversion covers.`);
  }
  // Start near SG 1 + degrees/260 (the usual rule of thumb) and refine.
  let x = Math.min(hi, Math.max(lo, 1 + target / 260));
  for (let i = 0; i < 100; i++) {
    const f = evalCubic(cubic, x) - target;
    if (f === 0) return x;
    if (f > 0) hi = x;
    else lo = x;
    let next = x - f / evalCubicSlope(cubic, x);
    // Fall back to bisection whenever Newton leaves the bracket.
    if (!(next > lo && next < hi)) next = (lo + hi) / 2;
    if (Math.abs(next - x) <= 1e-15) return next;
    x = next;
  }
  return x;
}

/** SG (20/20) -> °Plato, ASBC cubic. Slightly negative below SG 1.000; not clamped. */
export function sgToPlato(sg: number): number {
  return evalCubic(ASBC_PLATO, requireFinite(sg, 'sg', 'Specific gravity'));
}

/** °Plato -> SG, exact numerical inverse of the ASBC cubic. */
export function platoToSg(plato: number): number {
  return invertIncreasingCubic(ASBC_PLATO, requireFinite(plato, 'plato', 'Plato'), 'plato', 'Plato');
}

/** SG (20/20) -> °Brix, NBS sucrose-table cubic. */
export function sgToBrix(sg: number): number {
  return evalCubic(NBS_BRIX, requireFinite(sg, 'sg', 'Specific gravity'));
}

/** °Brix -> SG, exact numerical inverse of the NBS cubic. */
export function brixToSg(brix: number): number {
  return invertIncreasingCubic(NBS_BRIX, requireFinite(brix, 'brix', 'Brix'), 'brix', 'Brix');
}
