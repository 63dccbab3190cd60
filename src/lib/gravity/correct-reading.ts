import { GravityInputError, requireFinite, requireRange } from './errors';
import { hydrometerCorrection, waterDensitySource } from './hydrometer';
import { refractometerFinalSg } from './refractometer';
import { brixToSg, platoToSg, sgToBrix } from './scales';

import type { ReadingMethod, ReadingUnit } from '../vocabulary';

export type { ReadingMethod, ReadingUnit };

export interface RawReading {
  value: number;
  unit: ReadingUnit;
  method: ReadingMethod;
  /** Sample temperature; required for a hydrometer. */
  sampleTempC: number | null;
  /** The workspace's hydrometer calibration temperature (20 °C by default). */
  calibrationTempC: number;
  /** Refractometer wort correction factor. */
  wcf: number;
  /** Corrected OG of the ferment; required for a refractometer once fermentation started. */
  originalGravity: number | null;
  fermentationStarted: boolean;
}

export interface CorrectedReading {
  sg: number;
  lowConfidence: boolean;
  steps: string[];
}

/** Stored SG must lie here (a finished sugar wash to a very heavy wort). */
export const CORRECTED_SG_MIN = 0.98;
export const CORRECTED_SG_MAX = 1.2;
/** Plausible raw °Brix / °Plato readings. */
export const DEGREES_MIN = -5;
export const DEGREES_MAX = 40;
/** Accepted wort correction factors. */
export const WCF_MIN = 0.9;
export const WCF_MAX = 1.2;

const fmtSg = (sg: number): string => sg.toFixed(4);
const fmtRawSg = (sg: number): string => (Number.isInteger(Math.round(sg * 1e6) / 1e3) ? sg.toFixed(3) : sg.toFixed(4));
const fmtDegrees = (d: number): string => d.toFixed(1);
const fmtSampleTemp = (t: number): string => `${t.toFixed(1)} °C`;
const fmtCalibrationTemp = (t: number): string => `${Number.isInteger(t) ? t.toFixed(0) : t.toFixed(2)} °C`;

function describeRaw(value: number, unit: ReadingUnit): string {
  if (unit === 'sg') return fmtRawSg(value);
  return unit === 'brix' ? `${fmtDegrees(value)} °Bx` : `${fmtDegrees(value)} °P`;
}

/** Reading in SG at the instrument's own reference, plus an explanation of the conversion. */
function toSg(value: number, unit: ReadingUnit): { sg: number; step: string | null } {
  if (unit === 'sg') return { sg: value, step: null };
  if (unit === 'brix') {
    const sg = brixToSg(value);
    return { sg, step: `${fmtDegrees(value)} °Bx -> SG ${fmtSg(sg)} (NBS sucrose cubic, solved exactly)` };
  }
  const sg = platoToSg(value);
  return { sg, step: `${fmtDegrees(value)} °P -> SG ${fmtSg(sg)} (ASBC polynomial, solved exactly)` };
}

/**
 * Turns one reading as entered into SG referred to the calibration
 * temperature, with the steps taken in words.
 */
export function correctReading(input: RawReading): CorrectedReading {
  const { value, unit, method } = input;
  requireFinite(value, 'value', 'Reading');
  if (unit !== 'sg' && unit !== 'brix' && unit !== 'plato') {
    throw new GravityInputError('unit', `Unknown unit "${String(unit)}".`);
  }
  if (unit === 'sg' && value <= 0) throw new GravityInputError('value', 'A specific gravity must be positive.');
  if (unit !== 'sg') requireRange(value, DEGREES_MIN, DEGREES_MAX, 'value', unit === 'brix' ? 'Brix reading' : 'Plato reading');

  const steps: string[] = [];
  let sg: number;
  let lowConfidence = false;

  switch (method) {
    case 'digital': {
      const converted = toSg(value, unit);
      sg = converted.sg;
      steps.push(`Digital reading ${describeRaw(value, unit)}, temperature-compensated by the instrument: no temperature correction`);
      if (converted.step) steps.push(converted.step);
      break;
    }
    case 'hydrometer': {
      requireRange(input.calibrationTempC, 0, 60, 'calibrationTempC', 'Calibration temperature');
      if (input.sampleTempC === null || input.sampleTempC === undefined) {
        throw new GravityInputError('sampleTempC', 'A hydrometer reading needs the sample temperature.');
      }
      const sampleC = requireFinite(input.sampleTempC, 'sampleTempC', 'Sample temperature');
      const converted = toSg(value, unit);
      if (converted.step) steps.push(converted.step);
      sg = hydrometerCorrection(converted.sg, sampleC, input.calibrationTempC);
      const shown = unit === 'sg' ? fmtRawSg(value) : fmtSg(converted.sg);
      steps.push(
        sampleC === input.calibrationTempC
          ? `Hydrometer ${shown} at ${fmtSampleTemp(sampleC)}: read at its calibration temperature, no correction`
          : `Hydrometer ${shown} at ${fmtSampleTemp(sampleC)} -> ${fmtSg(sg)} at ${fmtCalibrationTemp(input.calibrationTempC)} (${waterDensitySource(sampleC)})`,
      );
      break;
    }
    case 'refractometer': {
      lowConfidence = true;
      if (unit === 'sg') {
        throw new GravityInputError('unit', 'Enter refractometer readings in °Brix (or °Plato), not SG.');
      }
      const wcf = requireRange(input.wcf, WCF_MIN, WCF_MAX, 'wcf', 'Wort correction factor');
      const brix = value;
      if (unit === 'plato') steps.push(`Refractometer ${fmtDegrees(value)} °P read as °Brix`);
      if (!input.fermentationStarted) {
        sg = brixToSg(brix / wcf);
        steps.push(
          `Refractometer ${fmtDegrees(brix)} °Bx ÷ WCF ${wcf} = ${fmtDegrees(brix / wcf)} °Bx -> SG ${fmtSg(sg)} (NBS sucrose cubic; before fermentation, no alcohol correction)`,
        );
      } else {
        if (input.originalGravity === null || input.originalGravity === undefined) {
          throw new GravityInputError('originalGravity', 'A refractometer reading during fermentation needs the ferment’s original gravity.');
        }
        const og = requireRange(input.originalGravity, CORRECTED_SG_MIN, CORRECTED_SG_MAX, 'originalGravity', 'Original gravity');
        const originalBrix = sgToBrix(og);
        // Terrill's formula divides raw refractometer readings by the WCF; the
        // OG is already true gravity, so express it as the reading it would give.
        const originalReading = originalBrix * wcf;
        if (brix > originalReading) {
          throw new GravityInputError(
            'value',
            `Refractometer reading ${fmtDegrees(brix)} °Bx is above what the original gravity ${fmtRawSg(og)} would read (${fmtDegrees(originalReading)} °Bx).`,
          );
        }
        sg = refractometerFinalSg(originalReading, brix, wcf);
        steps.push(`Original gravity ${fmtRawSg(og)} = ${fmtDegrees(originalBrix)} °Bx (NBS sucrose cubic)`);
        steps.push(
          `Refractometer ${fmtDegrees(brix)} °Bx ÷ WCF ${wcf} = ${fmtDegrees(brix / wcf)} °Bx -> SG ${fmtSg(sg)} (Terrill 2011 cubic alcohol correction)`,
        );
      }
      steps.push('Refractometer readings during fermentation are less certain than a hydrometer’s');
      break;
    }
    default:
      throw new GravityInputError('method', `Unknown method "${String(method)}".`);
  }

  if (!Number.isFinite(sg) || sg < CORRECTED_SG_MIN || sg > CORRECTED_SG_MAX) {
    throw new GravityInputError(
      'value',
      `The reading gives SG ${Number.isFinite(sg) ? fmtSg(sg) : String(sg)}, outside the plausible ${CORRECTED_SG_MIN.toFixed(3)}–${CORRECTED_SG_MAX.toFixed(3)}: check the value, unit and method.`,
    );
  }
  return { sg, lowConfidence, steps };
}
