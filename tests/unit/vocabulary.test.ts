/**
 * The product's vocabulary is declared once (src/lib/vocabulary): every value has exactly one
 * label, and every Drizzle enum column is built from the same list.
 */
import { describe, expect, it } from 'vitest';
import * as schema from '../../src/db/schema';
import {
  EMPTIED_REASONS,
  FORECAST_STATUSES,
  FORECAST_STATUS_LABELS,
  FRACTION_LABELS,
  OUTCOME_FRACTIONS,
  READING_METHODS,
  READING_METHOD_LABELS,
  READING_SOURCES,
  READING_UNITS,
  READING_UNIT_LABELS,
  READING_UNIT_SYMBOLS,
  ROLES,
  ROLE_LABELS,
  RUN_STATUSES,
  RUN_STATUS_LABELS,
  RUN_TYPES,
  RUN_TYPE_ABBREVIATIONS,
  RUN_TYPE_LABELS,
  STILL_KINDS,
  STILL_KIND_LABELS,
  TEMPERATURE_UNITS,
  UNIT_SYSTEMS,
  WASH_CATEGORIES,
  FEED_SCOPES,
  FEED_SCOPE_LABELS,
} from '../../src/lib/vocabulary';

const labelled: Array<[string, readonly string[], Record<string, string>]> = [
  ['run type', RUN_TYPES, RUN_TYPE_LABELS],
  ['run type (abbreviated)', RUN_TYPES, RUN_TYPE_ABBREVIATIONS],
  ['run status', RUN_STATUSES, RUN_STATUS_LABELS],
  ['outcome fraction', OUTCOME_FRACTIONS, FRACTION_LABELS],
  ['reading unit', READING_UNITS, READING_UNIT_LABELS],
  ['reading unit symbol', READING_UNITS, READING_UNIT_SYMBOLS],
  ['reading method', READING_METHODS, READING_METHOD_LABELS],
  ['still kind', STILL_KINDS, STILL_KIND_LABELS],
  ['forecast status', FORECAST_STATUSES, FORECAST_STATUS_LABELS],
  ['role', ROLES, ROLE_LABELS],
  ['feed scope', FEED_SCOPES, FEED_SCOPE_LABELS],
];

describe.each(labelled)('%s labels', (_name, values, labels) => {
  it('has exactly one label for every value and none for anything else', () => {
    expect(Object.keys(labels).sort()).toEqual([...values].sort());
  });
  it.each(values.map((v) => [v]))('labels %s with a non-empty word starting with a capital or a symbol', (value) => {
    expect(labels[value]).toMatch(/^[A-Z°]\S/);
  });
  it('gives no two values the same label', () => {
    expect(new Set(Object.values(labels)).size).toBe(values.length);
  });
});

describe('value lists', () => {
  it.each([...labelled.map(([n, v]) => [n, v] as const), ['wash category', WASH_CATEGORIES] as const])('%s has no repeated value', (_n, values) => {
    expect(new Set(values).size).toBe(values.length);
  });
});

const columns: Array<[string, { enumValues: readonly string[] }, readonly string[]]> = [
  ['memberships.role', schema.memberships.role, ROLES],
  ['invitations.role', schema.invitations.role, ROLES],
  ['workspaces.units', schema.workspaces.units, UNIT_SYSTEMS],
  ['stills.kind', schema.stills.kind, STILL_KINDS],
  ['wash_types.category', schema.washTypes.category, WASH_CATEGORIES],
  ['ferments.emptied_reason', schema.ferments.emptiedReason, EMPTIED_REASONS],
  ['readings.method', schema.readings.method, READING_METHODS],
  ['readings.raw_unit', schema.readings.rawUnit, READING_UNITS],
  ['readings.sample_temp_unit', schema.readings.sampleTempUnit, TEMPERATURE_UNITS],
  ['readings.source', schema.readings.source, READING_SOURCES],
  ['ferment_forecasts.status', schema.fermentForecasts.status, FORECAST_STATUSES],
  ['forecast_history.status', schema.forecastHistory.status, FORECAST_STATUSES],
  ['runs.type', schema.runs.type, RUN_TYPES],
  ['runs.status', schema.runs.status, RUN_STATUSES],
  ['run_outcomes.fraction', schema.runOutcomes.fraction, OUTCOME_FRACTIONS],
  ['calendar_feeds.scope', schema.calendarFeeds.scope, FEED_SCOPES],
];

describe('Drizzle enum columns', () => {
  it.each(columns)('%s holds exactly the vocabulary list', (_name, column, values) => {
    expect([...column.enumValues]).toEqual([...values]);
  });
});
