export { GravityInputError } from './errors';
export { sgToPlato, platoToSg, sgToBrix, brixToSg } from './scales';
export { waterDensity, waterDensitySource, hydrometerCorrection, WATER_DENSITY_MIN_C, WATER_DENSITY_MAX_C } from './hydrometer';
export { refractometerFinalSg, refractometerFinalSgLinear, DEFAULT_WCF } from './refractometer';
export { abv, abvSimple, abvBalling, abvHighGravity, apparentAttenuation, ABV_FORMULA_NAME } from './abv';
export { correctReading, CORRECTED_SG_MIN, CORRECTED_SG_MAX, DEGREES_MIN, DEGREES_MAX, WCF_MIN, WCF_MAX } from './correct-reading';
export type { ReadingUnit, ReadingMethod, RawReading, CorrectedReading } from './correct-reading';
