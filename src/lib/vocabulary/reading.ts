/** Gravity readings: the unit a value was entered in, the instrument, where it came from. */

export const READING_UNITS = ['sg', 'brix', 'plato'] as const;
export type ReadingUnit = (typeof READING_UNITS)[number];

export const READING_UNIT_LABELS: Record<ReadingUnit, string> = { sg: 'SG', brix: '°Brix', plato: '°Plato' };

/** The same units as symbols, printed after a value ("12.5 °Bx"). */
export const READING_UNIT_SYMBOLS: Record<ReadingUnit, string> = { sg: 'SG', brix: '°Bx', plato: '°P' };

export const READING_METHODS = ['hydrometer', 'refractometer', 'digital'] as const;
export type ReadingMethod = (typeof READING_METHODS)[number];

export const READING_METHOD_LABELS: Record<ReadingMethod, string> = {
  hydrometer: 'Hydrometer',
  refractometer: 'Refractometer',
  digital: 'Digital sensor',
};

/** A reading typed in, or one of a logger's uploaded CSV. */
export const READING_SOURCES = ['manual', 'upload'] as const;
export type ReadingSource = (typeof READING_SOURCES)[number];
