import { AlcoholInputError, requireRange } from './errors';

/**
 * Density of ethanol–water mixtures, OIML R 22 (1975) International
 * Alcoholometric Tables (Wagenbreth & Blanke formula):
 * ρ = A1 + Σk=2..12 Ak p^(k−1) + Σk=1..6 Bk (t−20)^k + Σi=1..5 Σk=1..mi Ci,k p^k (t−20)^i
 * with p the mass fraction of ethanol and t in °C (−20 … +40), in kg/m³.
 */

const A = [
  998.20123, -192.9769495, 389.1238958, -1668.103923, 13522.15441, -88292.78388, 306287.4042, -613838.1234, 747017.2998, -547846.1354, 223446.0334,
  -39032.85426,
] as const;

const B = [-0.20618513, -5.2682542e-3, 3.6130013e-5, -3.8957702e-7, 7.169354e-9, -9.9739231e-11] as const;

const C: readonly (readonly number[])[] = [
  [
    0.1693443461530087, -10.46914743455169, 71.96353469546523, -704.7478054272792, 3924.090430035045, -12101.64659068747, 22486.46550400788, -26055.62982188164,
    18523.73922069467, -7420.201433430137, 1285.617841998974,
  ],
  [
    -0.0119301300505701, 0.2517399633803461, -2.170575700536993, 13.53034988843029, -50.29988758547014, 109.635566657757, -142.2753946421155, 108.043594285623,
    -44.14153236817392, 7.442971530188783,
  ],
  [
    -6.802995733503803e-4, 1.876837790289664e-2, -0.2002561813734156, 1.02299296671922, -2.895696483903638, 4.810060584300675, -4.672147440794683,
    2.458043105903461, -0.5411227621436812,
  ],
  [4.075376675622027e-6, -8.76305857347111e-6, 6.515031360099368e-6, -1.51578483698721e-6],
  [-2.788074354782409e-8, 1.345612883493354e-8],
];

export const OIML_T_MIN_C = -20;
export const OIML_T_MAX_C = 40;

/** Evaluate without range checks (callers check). */
function rawDensity(p: number, t: number): number {
  const dt = t - 20;
  let rho = A[0];
  let pk = 1;
  for (let k = 1; k < A.length; k++) {
    pk *= p;
    rho += A[k] * pk;
  }
  let dti = 1;
  for (let k = 0; k < B.length; k++) {
    dti *= dt;
    rho += B[k] * dti;
  }
  dti = 1;
  for (let i = 0; i < C.length; i++) {
    dti *= dt;
    const row = C[i];
    let term = 0;
    pk = 1;
    for (let k = 0; k < row.length; k++) {
      pk *= p;
      term += row[k] * pk;
    }
    rho += term * dti;
  }
  return rho;
}

/** Density (kg/m³) of an ethanol–water mixture of mass fraction p at tC. */
export function density(p: number, tC: number): number {
  requireRange(p, 0, 1, 'massFraction', 'Ethanol mass fraction');
  requireRange(tC, OIML_T_MIN_C, OIML_T_MAX_C, 'temperature', 'Temperature (°C)');
  return rawDensity(p, tC);
}

/** Alcoholic strength by volume at 20 °C (% vol) of mass fraction p: 100 p ρ(p,20)/ρ(1,20). */
export function massFractionToVolPercent20(p: number): number {
  requireRange(p, 0, 1, 'massFraction', 'Ethanol mass fraction');
  return (100 * p * rawDensity(p, 20)) / rawDensity(1, 20);
}

/** Bisection for an increasing or decreasing f on [0, 1]; returns p with f(p) ≈ target. */
function solveOnUnitInterval(f: (p: number) => number, target: number): number {
  let lo = 0;
  let hi = 1;
  const increasing = f(hi) > f(lo);
  for (let i = 0; i < 200 && hi - lo > 1e-15; i++) {
    const mid = (lo + hi) / 2;
    const below = increasing ? f(mid) < target : f(mid) > target;
    if (below) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/** Mass fraction for a strength in % vol at 20 °C (numerical inverse). */
export function volPercentToMassFraction(volPercent: number): number {
  requireRange(volPercent, 0, 100, 'volPercent', 'Alcoholic strength (% vol)');
  if (volPercent === 0) return 0;
  if (volPercent === 100) return 1;
  return solveOnUnitInterval((p) => (100 * p * rawDensity(p, 20)) / rawDensity(1, 20), volPercent);
}

/** Cubic expansion coefficient of alcoholmeter glass, per K. */
export const ALCOHOLMETER_GLASS_EXPANSION_PER_K = 25e-6;

/**
 * True strength (% vol at 20 °C) from a glass alcoholmeter calibrated at
 * 20 °C and read at tC. The meter floats where the liquid density at t equals
 * the 20 °C density of its indicated strength, corrected for the glass's own
 * expansion: ρ(p, t) = ρ20(reading) / (1 + γ (t − 20)).
 */
export function alcoholmeterCorrection(readingPercentVol: number, tC: number): number {
  requireRange(readingPercentVol, 0, 100, 'reading', 'Alcoholmeter reading (% vol)');
  requireRange(tC, OIML_T_MIN_C, OIML_T_MAX_C, 'temperature', 'Temperature (°C)');
  if (tC === 20) return readingPercentVol;
  const indicatedDensity = rawDensity(volPercentToMassFraction(readingPercentVol), 20);
  const target = indicatedDensity / (1 + ALCOHOLMETER_GLASS_EXPANSION_PER_K * (tC - 20));
  const densityAtT = (p: number): number => rawDensity(p, tC);
  if (target > densityAtT(0) || target < densityAtT(1)) {
    throw new AlcoholInputError('reading', `A reading of ${readingPercentVol} % vol at ${tC} °C lies outside the alcoholometric tables.`);
  }
  return massFractionToVolPercent20(solveOnUnitInterval(densityAtT, target));
}
