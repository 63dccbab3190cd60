import { describe, expect, it } from 'vitest';
import {
  ABV_FORMULA_NAME,
  GravityInputError,
  abv,
  abvBalling,
  abvHighGravity,
  abvSimple,
  apparentAttenuation,
  brixToSg,
  correctReading,
  hydrometerCorrection,
  platoToSg,
  refractometerFinalSg,
  refractometerFinalSgLinear,
  sgToBrix,
  sgToPlato,
  waterDensity,
  type RawReading,
} from '../../src/lib/gravity';

/** Expect fn to throw a GravityInputError naming field. */
function expectGravityError(fn: () => unknown, field: string): void {
  let caught: unknown;
  try {
    fn();
  } catch (error) {
    caught = error;
  }
  expect(caught).toBeInstanceOf(GravityInputError);
  expect(caught).toBeInstanceOf(RangeError);
  expect((caught as GravityInputError).field).toBe(field);
  expect((caught as GravityInputError).message.length).toBeGreaterThan(10);
}

describe('SG -> °Plato', () => {
  it.each([
    // [SG, °P, tolerance, source]
    [1.04, 9.99359, 1e-4, 'ASBC published anchor, sucrose SG 1.040 (20/20)'],
    [1.01, 2.5608, 5e-5, 'ASBC polynomial [computed]'],
    [1.06, 14.7414, 5e-5, 'ASBC polynomial [computed]'],
    [1.08, 19.331, 5e-5, 'ASBC polynomial [computed]'],
    [1.0, -0.003, 5e-5, 'ASBC polynomial [computed]: slightly negative, not clamped'],
  ])('%s -> %s °P within %s (%s)', (sg, plato, tol, _source) => {
    expect(Math.abs(sgToPlato(sg) - plato)).toBeLessThanOrEqual(tol);
  });

  it('keeps a finished sugar wash negative (ASBC polynomial: 0.995 is below 0 °P)', () => {
    expect(sgToPlato(0.995)).toBeLessThan(-1);
  });
});

describe('°Plato -> SG', () => {
  it.each([
    [9.99359, 1.04, 'ASBC published anchor'],
    [2.5608, 1.01, 'ASBC polynomial [computed]'],
    [14.7414, 1.06, 'ASBC polynomial [computed]'],
    [19.331, 1.08, 'ASBC polynomial [computed]'],
    [-0.003, 1.0, 'ASBC polynomial [computed]'],
  ])('%s °P -> SG %s (%s)', (plato, sg, _source) => {
    expect(Math.abs(platoToSg(plato) - sg)).toBeLessThanOrEqual(1e-5);
  });

  // Rational inverse SG = 1 + P/(258.6 − (P/258.2)·227.1), from memory: within 2e-5 for 0–25 °P.
  it.each([0, 2.5, 5, 10, 15, 20, 25])('agrees with the rational inverse (from memory) at %s °P within 2e-5', (plato) => {
    const rational = 1 + plato / (258.6 - (plato / 258.2) * 227.1);
    expect(Math.abs(platoToSg(plato) - rational)).toBeLessThanOrEqual(2e-5);
  });
});

describe('SG <-> °Brix (NBS sucrose cubic)', () => {
  it('1.040 -> 9.99325 °Bx, the NBS published anchor, within the fit RMS of 0.0009 °Bx', () => {
    expect(Math.abs(sgToBrix(1.04) - 9.99325)).toBeLessThanOrEqual(9e-4);
  });

  it('9.99325 °Bx -> SG 1.040 (NBS published anchor)', () => {
    expect(Math.abs(brixToSg(9.99325) - 1.04)).toBeLessThanOrEqual(1e-5);
  });
});

describe('round trips are exact with the numerical inverses (REFERENCES §1)', () => {
  const gravities = Array.from({ length: 121 }, (_, i) => 1 + i / 1000);
  it('SG -> °P -> SG within 1e-9 for SG 1.000–1.120', () => {
    const worst = Math.max(...gravities.map((sg) => Math.abs(platoToSg(sgToPlato(sg)) - sg)));
    expect(worst).toBeLessThan(1e-9);
  });
  it('SG -> °Bx -> SG within 1e-9 for SG 1.000–1.120', () => {
    const worst = Math.max(...gravities.map((sg) => Math.abs(brixToSg(sgToBrix(sg)) - sg)));
    expect(worst).toBeLessThan(1e-9);
  });
  it.each([0.98, 0.99, 0.995])('also below 1.000: SG %s', (sg) => {
    expect(Math.abs(platoToSg(sgToPlato(sg)) - sg)).toBeLessThan(1e-9);
    expect(Math.abs(brixToSg(sgToBrix(sg)) - sg)).toBeLessThan(1e-9);
  });

  it('rejects non-numbers', () => {
    expectGravityError(() => sgToPlato(Number.NaN), 'sg');
    expectGravityError(() => platoToSg(Number.POSITIVE_INFINITY), 'plato');
    expectGravityError(() => brixToSg(Number.NaN), 'brix');
  });
});

describe('water density', () => {
  it.each([
    [20, 998.2067, 'Tanaka et al. 2001 [computed]'],
    [30, 995.6488, 'Tanaka et al. 2001 [computed]'],
    [15.5556, 999.017, 'Tanaka et al. 2001 [computed]'],
  ])('%s °C -> %s kg/m³ (%s)', (t, rho, _source) => {
    expect(Math.abs(waterDensity(t) - rho)).toBeLessThanOrEqual(5e-5);
  });

  it.each([
    [4, 999.97, 'maximum density of water near 4 °C, from memory'],
    [50, 988.04, 'Kell 1975, from memory'],
    [60, 983.2, 'Kell 1975, from memory'],
  ])('%s °C -> about %s kg/m³ (%s)', (t, rho, _source) => {
    expect(Math.abs(waterDensity(t) - rho)).toBeLessThanOrEqual(0.02);
  });

  it.each([-0.1, 60.1, Number.NaN])('rejects %s °C', (t) => {
    expectGravityError(() => waterDensity(t), 'temperature');
  });
});

describe('hydrometer temperature correction, SG = R × ρw(Tc)/ρw(T)', () => {
  it('1.050 read at 30 °C on a 20 °C hydrometer -> 1.0527 (REFERENCES §2 [computed], Tanaka et al. 2001)', () => {
    expect(Math.abs(hydrometerCorrection(1.05, 30, 20) - 1.0527)).toBeLessThanOrEqual(5e-5);
  });

  it('60 °F hydrometer read at 20 °C: ratio of the Tanaka et al. 2001 densities 999.0170 / 998.2067', () => {
    const expected = (1.05 * 999.017) / 998.2067;
    expect(Math.abs(hydrometerCorrection(1.05, 20, 15.5556) - expected)).toBeLessThanOrEqual(1e-6);
  });

  it.each([
    [1.05, 20],
    [1.0123, 15.5556],
    [0.995, 37.3],
    [1.1, 45],
  ])('reading %s at its calibration temperature %s °C is returned exactly', (reading, t) => {
    expect(hydrometerCorrection(reading, t, t)).toBe(reading);
  });

  it('a cold sample reads high and is corrected down (water is densest near 4 °C)', () => {
    expect(hydrometerCorrection(1.05, 10, 20)).toBeLessThan(1.05);
  });

  it.each([
    [-1, 20, 'sampleTempC'],
    [61, 20, 'sampleTempC'],
    [20, 70, 'calibrationTempC'],
  ])('rejects sample %s °C / calibration %s °C', (sample, calibration, field) => {
    expectGravityError(() => hydrometerCorrection(1.05, sample, calibration), field);
  });
});

describe('refractometer during fermentation (Terrill 2011)', () => {
  it('cubic: Bi 20.0, Bf 10.0, WCF 1.04 -> 1.0156 (REFERENCES §4 [computed])', () => {
    expect(Math.abs(refractometerFinalSg(20, 10, 1.04) - 1.0156)).toBeLessThanOrEqual(5e-5);
  });

  it('the WCF defaults to 1.04 (REFERENCES §4)', () => {
    expect(refractometerFinalSg(20, 10)).toBe(refractometerFinalSg(20, 10, 1.04));
  });

  it('linear fit from the same source: 1 − 0.00085683 i + 0.0034941 f', () => {
    const i = 20 / 1.04;
    const f = 10 / 1.04;
    expect(refractometerFinalSgLinear(20, 10, 1.04)).toBeCloseTo(1 - 0.00085683 * i + 0.0034941 * f, 12);
  });

  it('cubic and linear fits agree within 0.002 on this sample (loose cross-formula bound)', () => {
    expect(Math.abs(refractometerFinalSg(20, 10) - refractometerFinalSgLinear(20, 10))).toBeLessThan(0.002);
  });

  it('nothing fermented (Bf = Bi): plain Brix -> SG after the WCF, NBS anchor 9.99325 °Bx = 1.040', () => {
    const reading = 9.99325 * 1.04;
    expect(Math.abs(refractometerFinalSg(reading, reading, 1.04) - 1.04)).toBeLessThanOrEqual(1e-5);
  });

  it.each([
    [10, 10.5],
    [0, 0.1],
  ])('rejects a current reading above the original (Bi %s, Bf %s)', (bi, bf) => {
    expectGravityError(() => refractometerFinalSg(bi, bf), 'value');
    expectGravityError(() => refractometerFinalSgLinear(bi, bf), 'value');
  });

  it('rejects a non-positive WCF', () => {
    expectGravityError(() => refractometerFinalSg(20, 10, 0), 'wcf');
  });
});

describe('ABV from OG 1.080 and FG 0.995', () => {
  it.each([
    ['simple 131.25 rule (common practice)', abvSimple, 11.156],
    ['Balling real-extract method (Nielsen et al.; REFERENCES §3 [computed])', abvBalling, 11.386],
    ['high-gravity formula (from memory)', abvHighGravity, 11.66],
  ] as const)('%s', (_name, formula, expected) => {
    expect(Math.abs(formula(1.08, 0.995) - expected)).toBeLessThanOrEqual(5e-4);
  });

  it('the simple rule matches a published worked example, 11.2 ± 0.2 % (common practice)', () => {
    expect(Math.abs(abvSimple(1.08, 0.995) - 11.2)).toBeLessThanOrEqual(0.2);
  });

  it('the product figure is the Balling method, and says so', () => {
    expect(abv(1.08, 0.995)).toBe(abvBalling(1.08, 0.995));
    expect(ABV_FORMULA_NAME).toMatch(/Balling/);
  });

  it.each([
    [1.06, 1.005],
    [1.08, 0.995],
    [1.1, 0.996],
  ])('Balling stays within ±1 %% ABV of the high-gravity formula for a distilling wash %s -> %s (loose cross-formula bound)', (og, fg) => {
    expect(Math.abs(abvBalling(og, fg) - abvHighGravity(og, fg))).toBeLessThan(1);
  });

  it('no alcohol without a gravity drop', () => {
    expect(abvBalling(1.05, 1.05)).toBe(0);
    expect(abvSimple(1.05, 1.05)).toBe(0);
  });

  it.each([
    [1.05, 1.06, 'fg'],
    [1.25, 1.0, 'og'],
    [1.05, 0.97, 'fg'],
  ])('rejects OG %s / FG %s', (og, fg, field) => {
    expectGravityError(() => abv(og, fg), field);
    expectGravityError(() => abvSimple(og, fg), field);
    expectGravityError(() => abvHighGravity(og, fg), field);
  });
});

describe('apparent attenuation, (OG − FG)/(OG − 1) × 100 (common practice)', () => {
  it.each([
    [1.05, 1.01, 80],
    [1.08, 1.0, 100],
    [1.08, 0.995, 106.25],
  ])('%s -> %s gives %s %%', (og, fg, expected) => {
    expect(apparentAttenuation(og, fg)).toBeCloseTo(expected, 9);
  });

  it('needs an OG above 1.000', () => {
    expectGravityError(() => apparentAttenuation(1.0, 0.99), 'og');
  });
});

describe('correctReading', () => {
  const base: RawReading = {
    value: 1.05,
    unit: 'sg',
    method: 'hydrometer',
    sampleTempC: 20,
    calibrationTempC: 20,
    wcf: 1.04,
    originalGravity: null,
    fermentationStarted: false,
  };

  it.each([
    // [case, overrides, expected SG, tolerance, lowConfidence, source]
    ['hydrometer SG at 30 °C', { sampleTempC: 30 }, 1.0527, 5e-5, false, 'Tanaka et al. 2001 [computed]'],
    ['hydrometer at calibration temperature', {}, 1.05, 0, false, 'definition'],
    ['hydrometer °P at 20 °C', { unit: 'plato', value: 9.99359 }, 1.04, 1e-5, false, 'ASBC anchor'],
    ['hydrometer °Bx at 20 °C', { unit: 'brix', value: 9.99325 }, 1.04, 1e-5, false, 'NBS anchor'],
    ['digital SG, no temperature correction', { method: 'digital', sampleTempC: 30 }, 1.05, 0, false, 'definition'],
    ['digital SG without a temperature', { method: 'digital', sampleTempC: null }, 1.05, 0, false, 'definition'],
    ['digital °P', { method: 'digital', unit: 'plato', value: 14.7414 }, 1.06, 1e-5, false, 'ASBC polynomial [computed]'],
    [
      'refractometer before fermentation',
      { method: 'refractometer', unit: 'brix', value: 9.99325 * 1.04, sampleTempC: null },
      1.04,
      1e-5,
      true,
      'NBS anchor after WCF 1.04',
    ],
    [
      'refractometer °P read as °Brix',
      { method: 'refractometer', unit: 'plato', value: 9.99325 * 1.04, sampleTempC: null },
      1.04,
      1e-5,
      true,
      'NBS anchor after WCF 1.04',
    ],
  ] as const)('%s', (_case, overrides, expected, tol, lowConfidence, _source) => {
    const result = correctReading({ ...base, ...overrides });
    expect(Math.abs(result.sg - expected)).toBeLessThanOrEqual(tol);
    expect(result.lowConfidence).toBe(lowConfidence);
    expect(result.steps.length).toBeGreaterThan(0);
  });

  it('refractometer during fermentation: OG -> original °Bx by the NBS cubic, then the Terrill cubic', () => {
    // Expected value recomputed here from the two published formulas (REFERENCES §1 and §4).
    const og = 1.08;
    const i = ((182.4601 * og - 775.6821) * og + 1262.7794) * og - 669.5622;
    const f = 10 / 1.04;
    const terrill = 1 - 0.0044993 * i + 0.011774 * f + 0.00027581 * i ** 2 - 0.0012717 * f ** 2 - 0.00000728 * i ** 3 + 0.000063293 * f ** 3;
    const result = correctReading({
      ...base,
      method: 'refractometer',
      unit: 'brix',
      value: 10,
      sampleTempC: null,
      originalGravity: og,
      fermentationStarted: true,
    });
    expect(result.sg).toBeCloseTo(terrill, 9);
    expect(result.lowConfidence).toBe(true);
    expect(result.steps.join(' ')).toMatch(/Terrill/);
  });

  it('explains a hydrometer correction in words', () => {
    const result = correctReading({ ...base, sampleTempC: 30 });
    expect(result.steps).toEqual(['Hydrometer 1.050 at 30.0 °C -> 1.0527 at 20 °C (Tanaka et al. 2001 water density)']);
  });

  it('names Kell 1975 for a hot sample', () => {
    expect(correctReading({ ...base, value: 1.04, sampleTempC: 45 }).steps.join(' ')).toMatch(/Kell 1975/);
  });

  it.each([
    ['hydrometer without a temperature', { sampleTempC: null }, 'sampleTempC'],
    ['hydrometer sample above 60 °C', { sampleTempC: 65 }, 'sampleTempC'],
    ['SG above 1.200', { value: 1.25 }, 'value'],
    ['SG below 0.980', { method: 'digital', value: 0.97 }, 'value'],
    ['Brix above 40', { unit: 'brix', value: 45 }, 'value'],
    ['Plato below −5', { unit: 'plato', value: -6 }, 'value'],
    ['not a number', { value: Number.NaN }, 'value'],
    ['refractometer in SG', { method: 'refractometer', value: 1.05 }, 'unit'],
    ['refractometer WCF out of range', { method: 'refractometer', unit: 'brix', value: 10, wcf: 2 }, 'wcf'],
    ['refractometer during fermentation without OG', { method: 'refractometer', unit: 'brix', value: 10, fermentationStarted: true }, 'originalGravity'],
    ['refractometer reading above the OG', { method: 'refractometer', unit: 'brix', value: 25, fermentationStarted: true, originalGravity: 1.06 }, 'value'],
  ] as const)('rejects %s', (_case, overrides, field) => {
    expectGravityError(() => correctReading({ ...base, ...overrides } as RawReading), field);
  });
});
