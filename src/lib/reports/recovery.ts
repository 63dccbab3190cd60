/**
 * What came off the still: strength at 20 °C, litres of absolute alcohol
 * (LAA), proof gallons, and recovery against the charge and against what
 * the ferments were expected to give.
 */
import { AlcoholInputError, alcoholmeterCorrection, laa, laaToProofGallons, OIML_T_MAX_C, OIML_T_MIN_C } from '../alcohol';
import { abv, ABV_FORMULA_NAME, GravityInputError } from '../gravity';

import { FRACTION_LABELS, type Fraction, type RunType } from '../vocabulary';

export { FRACTION_LABELS };
export type { Fraction };
export type RecordableRunType = RunType;

/** Fractions each run type can record: a stripping run gives low wines; a spirit (or redistillation) run gives cuts. */
export const FRACTIONS_BY_RUN_TYPE: Record<RecordableRunType, readonly Fraction[]> = {
  stripping: ['low_wines'],
  spirit: ['heads', 'hearts', 'tails', 'feints'],
  redistillation: ['heads', 'hearts', 'tails', 'feints'],
  cleaning: [],
  maintenance: [],
};

/** A recorded volume may be at most this many times the still's capacity (catches a unit slip, e.g. mL for L). */
export const MAX_VOLUME_CAPACITY_FACTOR = 10;
export const ALCOHOLMETER_MIN = 0;
export const ALCOHOLMETER_MAX = 100;
export const READING_TEMP_MIN_C = OIML_T_MIN_C;
export const READING_TEMP_MAX_C = OIML_T_MAX_C;
export const CUT_NOTE_MAX = 200;

export interface FractionInput {
  fraction: Fraction;
  volumeLitres: number;
  /** Alcoholmeter reading as seen on the stem, % vol. */
  alcoholmeterReading: number;
  /** Temperature of the sample when read, °C. */
  readingTempC: number;
  /** The distiller's own note on the cut (where, why); recorded, never advised. */
  cutNote?: string | null;
}

export interface FractionResult extends FractionInput {
  /** True strength, % vol at 20 °C (OIML R 22). */
  abv20: number;
  laa: number;
  proofGallons: number;
}

export interface ChargeInput {
  litres: number | null;
  /** % vol at 20 °C. */
  abv: number | null;
}

export type FieldErrors = Record<string, string>;

/** Strength at 20 °C, LAA and proof gallons of one fraction (inputs already validated). */
export function computeFraction(input: FractionInput): FractionResult {
  const abv20 = alcoholmeterCorrection(input.alcoholmeterReading, input.readingTempC);
  const l = laa(input.volumeLitres, abv20);
  return { ...input, abv20, laa: l, proofGallons: laaToProofGallons(l) };
}

const isNum = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);

/**
 * Field messages for a run record, keyed like the request body
 * ('chargeLitres', 'fractions.2.readingTempC' ...). Empty when everything is acceptable.
 */
export function validateRunRecord(input: {
  runType: RecordableRunType;
  stillCapacityLitres: number;
  charge: ChargeInput;
  fractions: readonly FractionInput[];
}): FieldErrors {
  const errors: FieldErrors = {};
  const maxLitres = MAX_VOLUME_CAPACITY_FACTOR * input.stillCapacityLitres;
  const volumeCheck = (key: string, v: unknown, label: string) => {
    if (!isNum(v)) errors[key] = `${label} must be a number.`;
    else if (v < 0) errors[key] = `${label} cannot be negative.`;
    else if (v > maxLitres) errors[key] = `${label} ${v} L is over ten times this still's capacity (${input.stillCapacityLitres} L); check the unit.`;
  };
  if (input.charge.litres !== null) volumeCheck('chargeLitres', input.charge.litres, 'Charge volume');
  if (input.charge.abv !== null) {
    const a = input.charge.abv;
    if (!isNum(a) || a < 0 || a > 100) errors.chargeAbv = 'Charge strength must be between 0 and 100 % vol.';
  }
  const allowed = FRACTIONS_BY_RUN_TYPE[input.runType];
  if (allowed.length === 0 && input.fractions.length > 0) {
    errors.fractions = `A ${input.runType} slot has nothing to record off the still.`;
  }
  const seen = new Set<Fraction>();
  input.fractions.forEach((f, i) => {
    const k = (field: string) => `fractions.${i}.${field}`;
    if (allowed.length > 0 && !allowed.includes(f.fraction)) {
      errors[k('fraction')] =
        `A ${input.runType} run records ${allowed.map((a) => FRACTION_LABELS[a].toLowerCase()).join(', ')}, not ${FRACTION_LABELS[f.fraction]?.toLowerCase() ?? f.fraction}.`;
    }
    if (seen.has(f.fraction)) errors[k('fraction')] = `${FRACTION_LABELS[f.fraction]} is listed twice.`;
    seen.add(f.fraction);
    volumeCheck(k('volumeLitres'), f.volumeLitres, 'Volume');
    const r = f.alcoholmeterReading;
    const readingOk = isNum(r) && r >= ALCOHOLMETER_MIN && r <= ALCOHOLMETER_MAX;
    if (!readingOk) errors[k('alcoholmeterReading')] = 'Alcoholmeter reading must be between 0 and 100 % vol.';
    const t = f.readingTempC;
    const tempOk = isNum(t) && t >= READING_TEMP_MIN_C && t <= READING_TEMP_MAX_C;
    if (!tempOk)
      errors[k('readingTempC')] =
        `Reading temperature must be between ${READING_TEMP_MIN_C} and ${READING_TEMP_MAX_C} °C (the range of the alcoholometric tables).`;
    if (readingOk && tempOk) {
      try {
        alcoholmeterCorrection(r, t);
      } catch (err) {
        if (err instanceof AlcoholInputError) errors[k('alcoholmeterReading')] = err.message;
        else throw err;
      }
    }
    if (f.cutNote != null && f.cutNote.length > CUT_NOTE_MAX) errors[k('cutNote')] = `Keep the cut note under ${CUT_NOTE_MAX} characters.`;
  });
  return errors;
}

/** Sum of LAA over fractions. */
export function sumLaa(fractions: ReadonlyArray<{ laa: number }>): number {
  return fractions.reduce((s, f) => s + f.laa, 0);
}

/** LAA put into the still: charge litres × charge ABV / 100; null when either is unknown. */
export function chargedLaa(charge: ChargeInput): number | null {
  if (charge.litres === null || charge.abv === null) return null;
  return laa(charge.litres, charge.abv);
}

/** Recovery = LAA collected / LAA charged (or expected); null when the denominator is unknown or zero. */
export function recoveryRatio(collectedLaa: number, againstLaa: number | null): number | null {
  if (againstLaa === null || !(againstLaa > 0)) return null;
  return collectedLaa / againstLaa;
}

/** One ferment line of a stripping run, with what the ferment's gravity says it holds. */
export interface FermentCharge {
  /** Litres of this ferment put in the still. */
  litres: number;
  og: number;
  /** Final gravity used: the last reading once the ferment is done, else the predicted FG. */
  fg: number | null;
}

export const EXPECTED_LAA_FORMULA =
  `Expected LAA = Σ over the charged ferments of (litres taken from the ferment × ABV / 100), ABV from OG and FG by the ${ABV_FORMULA_NAME}; ` +
  'FG is the last gravity reading once the ferment is finished (or emptied), else its predicted FG. ' +
  "For a spirit run: Σ over feeding stripping runs of (litres of low wines taken ÷ low wines that run made) × that run's expected LAA.";

/** LAA the ferments charged into a stripping run were expected to give; null when a ferment's FG is unknown or unusable. */
export function expectedLaaFromFerments(lines: readonly FermentCharge[]): number | null {
  if (lines.length === 0) return null;
  let total = 0;
  for (const l of lines) {
    if (l.fg === null) return null;
    try {
      total += (l.litres * abv(l.og, l.fg)) / 100;
    } catch (err) {
      if (err instanceof GravityInputError) return null;
      throw err;
    }
  }
  return total;
}

export interface FeedShare {
  /** Litres of low wines this spirit run took from the stripping run. */
  litres: number;
  /** Litres of low wines that stripping run recorded. */
  lowWinesLitres: number | null;
  /** That stripping run's expected LAA from its ferments. */
  expectedLaa: number | null;
}

/** Expected LAA of a spirit run, by the share of each feeding run's low wines it took. */
export function expectedLaaFromFeeds(feeds: readonly FeedShare[]): number | null {
  if (feeds.length === 0) return null;
  let total = 0;
  for (const f of feeds) {
    if (f.expectedLaa === null || f.lowWinesLitres === null || !(f.lowWinesLitres > 0)) return null;
    total += (Math.min(f.litres, f.lowWinesLitres) / f.lowWinesLitres) * f.expectedLaa;
  }
  return total;
}
