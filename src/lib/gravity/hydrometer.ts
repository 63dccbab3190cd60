import { GravityInputError, requireFinite } from './errors';

/** Temperatures where the water-density formulas are used (°C). */
export const WATER_DENSITY_MIN_C = 0;
export const WATER_DENSITY_MAX_C = 60;
/** Tanaka et al. (2001) covers 0–40 °C; Kell (1975) takes over above. */
const TANAKA_MAX_C = 40;

/** Tanaka et al. (2001), Metrologia 38, 301–309: air-free SMOW, 0–40 °C, kg/m³. */
function tanakaDensity(t: number): number {
  const a1 = -3.983035;
  const a2 = 301.797;
  const a3 = 522528.9;
  const a4 = 69.34881;
  const a5 = 999.97495;
  return a5 * (1 - ((t + a1) ** 2 * (t + a2)) / (a3 * (t + a4)));
}

/** Kell (1975), J. Chem. Eng. Data 20, 97, kg/m³. */
function kellDensity(t: number): number {
  const numerator = 999.83952 + 16.945176 * t - 7.9870401e-3 * t ** 2 - 46.170461e-6 * t ** 3 + 105.56302e-9 * t ** 4 - 280.54253e-12 * t ** 5;
  return numerator / (1 + 16.87985e-3 * t);
}

/** Density of pure water at tC (0–60 °C), kg/m³. */
export function waterDensity(tC: number, field = 'temperature'): number {
  requireFinite(tC, field, 'Temperature');
  if (tC < WATER_DENSITY_MIN_C || tC > WATER_DENSITY_MAX_C) {
    throw new GravityInputError(
      field,
      `Temperature ${tC} °C is outside ${WATER_DENSITY_MIN_C}–${WATER_DENSITY_MAX_C} °C, where hydrometer corrections are defined.`,
    );
  }
  return tC <= TANAKA_MAX_C ? tanakaDensity(tC) : kellDensity(tC);
}

/** Names the water-density source used at a temperature, for explanations. */
export function waterDensitySource(tC: number): string {
  return tC <= TANAKA_MAX_C ? 'Tanaka et al. 2001 water density' : 'Kell 1975 water density';
}

/**
 * Reading of a hydrometer calibrated at calibrationC, taken at sampleC,
 * referred to calibrationC: SG = R × ρw(Tc) / ρw(T).
 * Assumes the sample expands like water.
 */
export function hydrometerCorrection(readingSg: number, sampleC: number, calibrationC: number): number {
  requireFinite(readingSg, 'value', 'Hydrometer reading');
  if (readingSg <= 0) throw new GravityInputError('value', 'Hydrometer reading must be positive.');
  const atSample = waterDensity(sampleC, 'sampleTempC');
  const atCalibration = waterDensity(calibrationC, 'calibrationTempC');
  if (sampleC === calibrationC) return readingSg;
  return (readingSg * atCalibration) / atSample;
}
