/**
 * Unit conversions and display helpers. Plateau stores SI values (°C, litres,
 * kilograms) and converts only at the edges, for a workspace that displays
 * metric or US customary units.
 */

import type { TemperatureUnit, UnitSystem } from '../vocabulary';

export type { TemperatureUnit, UnitSystem };
export type VolumeUnit = 'L' | 'gal';
export type MassUnit = 'kg' | 'lb';

/** Exact by definition (US survey gallon = 231 in³). */
export const LITRES_PER_US_GALLON = 3.785411784;
/** Exact by definition (international avoirdupois pound). */
export const KG_PER_POUND = 0.45359237;

function finite(value: number, what: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new RangeError(`${what} must be a finite number`);
  }
  return value;
}

export function celsiusToFahrenheit(c: number): number {
  return (finite(c, 'Temperature') * 9) / 5 + 32;
}

export function fahrenheitToCelsius(f: number): number {
  return ((finite(f, 'Temperature') - 32) * 5) / 9;
}

export function litresToUsGallons(litres: number): number {
  return finite(litres, 'Volume') / LITRES_PER_US_GALLON;
}

export function usGallonsToLitres(gallons: number): number {
  return finite(gallons, 'Volume') * LITRES_PER_US_GALLON;
}

export function kgToPounds(kg: number): number {
  return finite(kg, 'Mass') / KG_PER_POUND;
}

export function poundsToKg(lb: number): number {
  return finite(lb, 'Mass') * KG_PER_POUND;
}

export function parseTemperatureToC(value: number, unit: TemperatureUnit): number {
  return unit === 'F' ? fahrenheitToCelsius(value) : finite(value, 'Temperature');
}

export function parseVolumeToLitres(value: number, unit: VolumeUnit): number {
  return unit === 'gal' ? usGallonsToLitres(value) : finite(value, 'Volume');
}

export function parseMassToKg(value: number, unit: MassUnit): number {
  return unit === 'lb' ? poundsToKg(value) : finite(value, 'Mass');
}

export function temperatureUnitFor(system: UnitSystem): TemperatureUnit {
  return system === 'us' ? 'F' : 'C';
}

export function volumeUnitFor(system: UnitSystem): VolumeUnit {
  return system === 'us' ? 'gal' : 'L';
}

export function massUnitFor(system: UnitSystem): MassUnit {
  return system === 'us' ? 'lb' : 'kg';
}

/** Fixed decimals without a "-0" artefact (e.g. -0.04 °C shown as "0.0 °C"). */
export function formatNumber(value: number, decimals: number): string {
  const text = finite(value, 'Value').toFixed(decimals);
  return /^-0(\.0+)?$/.test(text) ? text.slice(1) : text;
}

/** "20.0 °C" or "68.0 °F" from a Celsius value. */
export function formatTemperature(c: number, system: UnitSystem, decimals = 1): string {
  return system === 'us' ? `${formatNumber(celsiusToFahrenheit(c), decimals)} °F` : `${formatNumber(c, decimals)} °C`;
}

/** "1000 L" or "264.2 gal" from litres. */
export function formatVolume(litres: number, system: UnitSystem, decimals = 0): string {
  return system === 'us' ? `${formatNumber(litresToUsGallons(litres), decimals)} gal` : `${formatNumber(litres, decimals)} L`;
}

/** "25.0 kg" or "55.1 lb" from kilograms. */
export function formatMass(kg: number, system: UnitSystem, decimals = 1): string {
  return system === 'us' ? `${formatNumber(kgToPounds(kg), decimals)} lb` : `${formatNumber(kg, decimals)} kg`;
}

/** Value in the display unit of the system, for inputs pre-filled from stored SI values. */
export function temperatureForDisplay(c: number, system: UnitSystem): number {
  return system === 'us' ? celsiusToFahrenheit(c) : finite(c, 'Temperature');
}

export function volumeForDisplay(litres: number, system: UnitSystem): number {
  return system === 'us' ? litresToUsGallons(litres) : finite(litres, 'Volume');
}
