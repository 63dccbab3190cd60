import { describe, expect, it } from 'vitest';
import {
  AlcoholInputError,
  alcoholmeterCorrection,
  density,
  laa,
  laaToProofGallons,
  massFractionToVolPercent20,
  proofFromAbv,
  proofGallons,
  volPercentToMassFraction,
} from '../../src/lib/alcohol';

function expectAlcoholError(fn: () => unknown, field: string): void {
  let caught: unknown;
  try {
    fn();
  } catch (error) {
    caught = error;
  }
  expect(caught).toBeInstanceOf(AlcoholInputError);
  expect((caught as AlcoholInputError).field).toBe(field);
}

describe('ethanol–water density, OIML R 22 (Wagenbreth & Blanke formula)', () => {
  it.each([
    // [mass fraction, °C, kg/m³] published validation values
    [0, 20, 998.20123],
    [1, 20, 789.2391233],
    [0, 0, 999.8369332],
    [1, 0, 806.2151206],
    [0.5, 20, 913.770595],
  ])('ρ(%s, %s °C) = %s kg/m³ (OIML R 22 validation value)', (p, t, rho) => {
    expect(Math.abs(density(p, t) - rho)).toBeLessThanOrEqual(1e-6);
  });

  it('warmer spirit is lighter (OIML R 22 tables: density falls with temperature at 40 % vol)', () => {
    const p = volPercentToMassFraction(40);
    expect(density(p, 10)).toBeGreaterThan(density(p, 20));
    expect(density(p, 30)).toBeLessThan(density(p, 20));
  });

  it.each([
    [-0.01, 20, 'massFraction'],
    [1.01, 20, 'massFraction'],
    [0.4, -20.1, 'temperature'],
    [0.4, 40.1, 'temperature'],
    [Number.NaN, 20, 'massFraction'],
  ])('rejects p = %s at %s °C', (p, t, field) => {
    expectAlcoholError(() => density(p, t), field);
  });

  it('accepts the ends of the table range, −20 and 40 °C', () => {
    expect(Number.isFinite(density(0.4, -20))).toBe(true);
    expect(Number.isFinite(density(0.4, 40))).toBe(true);
  });
});

describe('% vol at 20 °C <-> mass fraction (OIML R 22)', () => {
  it('40 % vol -> 33.300 % mas -> 948.045 kg/m³ (OIML R 22 table point [computed])', () => {
    const p = volPercentToMassFraction(40);
    expect(Math.abs(p * 100 - 33.3)).toBeLessThanOrEqual(5e-4);
    expect(Math.abs(density(p, 20) - 948.045)).toBeLessThanOrEqual(5e-4);
  });

  it('ends of the scale: 0 and 100 % vol (definition)', () => {
    expect(massFractionToVolPercent20(0)).toBe(0);
    expect(massFractionToVolPercent20(1)).toBe(100);
    expect(volPercentToMassFraction(0)).toBe(0);
    expect(volPercentToMassFraction(100)).toBe(1);
  });

  it.each([5, 8, 12, 40, 63.5, 80, 96])('round trip %s %% vol', (v) => {
    expect(massFractionToVolPercent20(volPercentToMassFraction(v))).toBeCloseTo(v, 9);
  });

  it('mass fraction is below volume fraction for aqueous ethanol (ethanol is lighter than water)', () => {
    expect(volPercentToMassFraction(40)).toBeLessThan(0.4);
  });

  it.each([-1, 100.5])('rejects %s %% vol', (v) => {
    expectAlcoholError(() => volPercentToMassFraction(v), 'volPercent');
  });
});

describe('alcoholmeter temperature correction (glass 25e-6/K, from memory)', () => {
  it('40.0 % vol read at 25 °C -> 37.99 % vol at 20 °C within 0.02 (REFERENCES §5 [computed])', () => {
    expect(Math.abs(alcoholmeterCorrection(40, 25) - 37.99)).toBeLessThanOrEqual(0.02);
  });

  it('a reading at 20 °C is already true strength', () => {
    expect(alcoholmeterCorrection(40, 20)).toBe(40);
  });

  it('a cold sample reads low and is corrected up (common practice)', () => {
    expect(alcoholmeterCorrection(40, 10)).toBeGreaterThan(40);
  });

  it.each([
    [40, 45, 'temperature'],
    [40, -25, 'temperature'],
    [101, 20, 'reading'],
  ])('rejects a reading of %s at %s °C', (reading, t, field) => {
    expectAlcoholError(() => alcoholmeterCorrection(reading, t), field);
  });
});

describe('LAA and US proof (27 CFR §19.1; 1 US gal = 3.785411784 L)', () => {
  it.each([
    [1000, 8, 80],
    [250, 63.5, 158.75],
    [0, 40, 0],
  ])('LAA = litres × ABV / 100: %s L at %s %% = %s LAA', (litres, abvPercent, expected) => {
    expect(laa(litres, abvPercent)).toBeCloseTo(expected, 10);
  });

  it.each([
    [40, 80],
    [50, 100],
    [62.5, 125],
  ])('proof = 2 × ABV: %s %% is %s proof', (abvPercent, proof) => {
    expect(proofFromAbv(abvPercent)).toBe(proof);
  });

  it('one US gallon at 50 % ABV (100 proof) is one proof gallon (27 CFR §19.1 definition)', () => {
    expect(proofGallons(3.785411784, 50)).toBeCloseTo(1, 12);
  });

  it('100 wine gallons at 40 % ABV are 80 proof gallons (PG = wine gallons × proof / 100)', () => {
    expect(proofGallons(378.5411784, 40)).toBeCloseTo(80, 10);
  });

  it('1 LAA = 0.528344 proof gallons (REFERENCES §5)', () => {
    expect(Math.abs(laaToProofGallons(1) - 0.528344)).toBeLessThanOrEqual(1e-6);
  });

  it('proof gallons agree with LAA for the same spirit', () => {
    expect(laaToProofGallons(laa(1000, 40))).toBeCloseTo(proofGallons(1000, 40), 10);
  });

  it.each([
    [() => laa(-1, 40), 'litres'],
    [() => laa(100, 101), 'abv'],
    [() => proofFromAbv(-0.5), 'abv'],
    [() => proofGallons(Number.NaN, 40), 'litres'],
    [() => laaToProofGallons(-2), 'laa'],
  ])('rejects out-of-range input (%#)', (fn, field) => {
    expectAlcoholError(fn, field);
  });
});
