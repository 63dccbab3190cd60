import { describe, expect, it } from 'vitest';
import {
  celsiusToFahrenheit,
  fahrenheitToCelsius,
  formatMass,
  formatTemperature,
  formatVolume,
  kgToPounds,
  litresToUsGallons,
  parseMassToKg,
  parseTemperatureToC,
  parseVolumeToLitres,
  poundsToKg,
  temperatureForDisplay,
  temperatureUnitFor,
  usGallonsToLitres,
  volumeForDisplay,
  volumeUnitFor,
} from '../../src/lib/units';

describe('temperature (definition of the Fahrenheit scale: 0 °C = 32 °F, 100 °C = 212 °F)', () => {
  it.each([
    [0, 32],
    [100, 212],
    [-40, -40],
    [20, 68],
    [15.555555555555555, 60],
    [37, 98.6],
  ])('%s °C = %s °F', (c, f) => {
    expect(celsiusToFahrenheit(c)).toBeCloseTo(f, 10);
    expect(fahrenheitToCelsius(f)).toBeCloseTo(c, 10);
  });

  it.each([
    [68, 'F', 20],
    [20, 'C', 20],
    [32, 'F', 0],
  ] as const)('parseTemperatureToC(%s, %s) = %s °C', (value, unit, c) => {
    expect(parseTemperatureToC(value, unit)).toBeCloseTo(c, 10);
  });

  it('rejects a non-finite temperature', () => {
    expect(() => parseTemperatureToC(Number.NaN, 'C')).toThrow(RangeError);
    expect(() => parseTemperatureToC(Number.POSITIVE_INFINITY, 'F')).toThrow(RangeError);
  });
});

describe('volume and mass (exact definitions: 1 US gal = 3.785411784 L, 1 lb = 0.45359237 kg)', () => {
  it.each([
    [3.785411784, 1],
    [1000, 264.17205235814845],
    [378.5411784, 100],
  ])('%s L = %s US gal', (litres, gallons) => {
    expect(litresToUsGallons(litres)).toBeCloseTo(gallons, 9);
    expect(usGallonsToLitres(gallons)).toBeCloseTo(litres, 9);
  });

  it.each([
    [0.45359237, 1],
    [1, 2.2046226218487757],
    [25, 55.11556554621939],
  ])('%s kg = %s lb', (kg, lb) => {
    expect(kgToPounds(kg)).toBeCloseTo(lb, 9);
    expect(poundsToKg(lb)).toBeCloseTo(kg, 9);
  });

  it('parses entered volumes and masses to SI', () => {
    expect(parseVolumeToLitres(10, 'gal')).toBeCloseTo(37.85411784, 9);
    expect(parseVolumeToLitres(250, 'L')).toBe(250);
    expect(parseMassToKg(2, 'lb')).toBeCloseTo(0.90718474, 9);
    expect(parseMassToKg(3, 'kg')).toBe(3);
  });
});

describe('display', () => {
  it.each([
    [20, 'metric', '20.0 °C'],
    [20, 'us', '68.0 °F'],
    [-0.04, 'metric', '0.0 °C'],
    [15.5555556, 'us', '60.0 °F'],
  ] as const)('formatTemperature(%s, %s) = %s', (c, system, text) => {
    expect(formatTemperature(c, system)).toBe(text);
  });

  it.each([
    [1000, 'metric', '1000 L'],
    [1000, 'us', '264 gal'],
    [3785.411784, 'us', '1000 gal'],
  ] as const)('formatVolume(%s, %s) = %s', (litres, system, text) => {
    expect(formatVolume(litres, system)).toBe(text);
  });

  it('formats with chosen decimals and mass units', () => {
    expect(formatVolume(1000, 'us', 1)).toBe('264.2 gal');
    expect(formatMass(25, 'metric')).toBe('25.0 kg');
    expect(formatMass(25, 'us')).toBe('55.1 lb');
  });

  it('names the unit of each system and converts stored values for inputs', () => {
    expect(temperatureUnitFor('us')).toBe('F');
    expect(temperatureUnitFor('metric')).toBe('C');
    expect(volumeUnitFor('us')).toBe('gal');
    expect(volumeUnitFor('metric')).toBe('L');
    expect(temperatureForDisplay(100, 'us')).toBeCloseTo(212, 10);
    expect(volumeForDisplay(3.785411784, 'us')).toBeCloseTo(1, 12);
    expect(volumeForDisplay(500, 'metric')).toBe(500);
  });
});
