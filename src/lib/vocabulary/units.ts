/** How a distillery sees volumes and temperatures; values are stored SI either way. */

export const UNIT_SYSTEMS = ['metric', 'us'] as const;
export type UnitSystem = (typeof UNIT_SYSTEMS)[number];

export const TEMPERATURE_UNITS = ['C', 'F'] as const;
export type TemperatureUnit = (typeof TEMPERATURE_UNITS)[number];

/**
 * How a distillery types numbers: `point` reads "1,200.5" as one thousand two hundred and a
 * half; `comma` reads "1.200,5" the same way. Every typed number is parsed by this setting.
 */
export const NUMBER_FORMATS = ['point', 'comma'] as const;
export type NumberFormat = (typeof NUMBER_FORMATS)[number];

export const NUMBER_FORMAT_LABELS: Record<NumberFormat, string> = {
  point: 'Decimal point (1,200.5)',
  comma: 'Decimal comma (1.200,5)',
};

export const UNIT_SYSTEM_LABELS: Record<UnitSystem, string> = {
  metric: 'Metric (litres, °C)',
  us: 'US (US gallons, °F)',
};
