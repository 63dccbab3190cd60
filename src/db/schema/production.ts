import {
  type AnyMySqlColumn,
  mysqlTable,
  varchar,
  mysqlEnum,
  int,
  double,
  json,
  uniqueIndex,
  index,
  text,
  boolean,
  date,
  primaryKey,
} from 'drizzle-orm/mysql-core';
import { fk, utc, timestamps, id } from './_shared';
import { workspaces, users } from './accounts';
import {
  EMPTIED_REASONS,
  FORECAST_STATUSES,
  OUTCOME_FRACTIONS,
  READING_METHODS,
  READING_SOURCES,
  READING_UNITS,
  RUN_STATUSES,
  RUN_TYPES,
  STILL_KINDS,
  TEMPERATURE_UNITS,
  WASH_CATEGORIES,
  type RunType,
} from '../../lib/vocabulary';

export interface OperatingHours {
  weekday: number;
  open: string;
  close: string;
}

export const stills = mysqlTable(
  'stills',
  {
    id: id(),
    workspaceId: fk('workspace_id')
      .notNull()
      .references(() => workspaces.id, { onDelete: 'cascade' }),
    name: varchar('name', { length: 80 }).notNull(),
    kind: mysqlEnum('kind', STILL_KINDS).notNull(),
    capacityLitres: double('capacity_litres').notNull(),
    heatingKw: double('heating_kw').notNull(),
    operatingHours: json('operating_hours').$type<OperatingHours[]>().notNull(),
    /** Minutes of cleaning the board adds after each run; 0 = none required. */
    cleaningAfterRunMinutes: int('cleaning_after_run_minutes').notNull().default(0),
    /** Typical distilling minutes per run type, on top of heat-up. */
    typicalMinutes: json('typical_minutes').$type<Partial<Record<RunType, number>>>().notNull(),
    position: int('position').notNull().default(0),
    active: boolean('active').notNull().default(true),
    ...timestamps,
  },
  (t) => [index('stills_ws_idx').on(t.workspaceId, t.position)],
);

/** Days a still (or, with no still, the whole distillery) is closed. Inclusive dates. */
export const stillClosures = mysqlTable(
  'still_closures',
  {
    id: id(),
    workspaceId: fk('workspace_id')
      .notNull()
      .references(() => workspaces.id, { onDelete: 'cascade' }),
    stillId: fk('still_id').references(() => stills.id, { onDelete: 'cascade' }),
    startsOn: date('starts_on', { mode: 'string' }).notNull(),
    endsOn: date('ends_on', { mode: 'string' }).notNull(),
    reason: varchar('reason', { length: 160 }).notNull(),
    ...timestamps,
  },
  (t) => [index('closures_ws_idx').on(t.workspaceId, t.startsOn)],
);

export const fermenters = mysqlTable(
  'fermenters',
  {
    id: id(),
    workspaceId: fk('workspace_id')
      .notNull()
      .references(() => workspaces.id, { onDelete: 'cascade' }),
    name: varchar('name', { length: 80 }).notNull(),
    capacityLitres: double('capacity_litres').notNull(),
    position: int('position').notNull().default(0),
    active: boolean('active').notNull().default(true),
    ...timestamps,
  },
  (t) => [index('fermenters_ws_idx').on(t.workspaceId)],
);

export const washTypes = mysqlTable(
  'wash_types',
  {
    id: id(),
    workspaceId: fk('workspace_id')
      .notNull()
      .references(() => workspaces.id, { onDelete: 'cascade' }),
    name: varchar('name', { length: 80 }).notNull(),
    category: mysqlEnum('category', WASH_CATEGORIES).notNull(),
    terminalMin: double('terminal_min').notNull(),
    terminalMax: double('terminal_max').notNull(),
    typicalOg: double('typical_og'),
    ...timestamps,
  },
  (t) => [index('wash_types_ws_idx').on(t.workspaceId)],
);

export const ferments = mysqlTable(
  'ferments',
  {
    id: id(),
    workspaceId: fk('workspace_id')
      .notNull()
      .references(() => workspaces.id, { onDelete: 'cascade' }),
    code: varchar('code', { length: 40 }).notNull(),
    washTypeId: fk('wash_type_id')
      .notNull()
      .references(() => washTypes.id),
    fermenterId: fk('fermenter_id').references(() => fermenters.id, { onDelete: 'set null' }),
    volumeLitres: double('volume_litres').notNull(),
    pitchedAt: utc('pitched_at').notNull(),
    og: double('og').notNull(),
    yeast: varchar('yeast', { length: 120 }),
    notes: text('notes'),
    emptiedAt: utc('emptied_at'),
    emptiedReason: mysqlEnum('emptied_reason', EMPTIED_REASONS),
    /** The stripping run that emptied the fermenter (null when emptied by hand). */
    emptiedByRunId: fk('emptied_by_run_id').references((): AnyMySqlColumn => runs.id, { onDelete: 'set null' }),
    /** Why a wash was dumped or emptied by hand, in the person's words. */
    emptiedNote: varchar('emptied_note', { length: 200 }),
    createdBy: fk('created_by').references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [
    uniqueIndex('ferments_ws_code_uq').on(t.workspaceId, t.code),
    index('ferments_ws_pitched_idx').on(t.workspaceId, t.pitchedAt),
    index('ferments_fermenter_idx').on(t.fermenterId, t.emptiedAt),
  ],
);

/** Optional recipe lines, so yield per tonne of ingredients can be reported. */
export const fermentIngredients = mysqlTable(
  'ferment_ingredients',
  {
    id: id(),
    workspaceId: fk('workspace_id')
      .notNull()
      .references(() => workspaces.id, { onDelete: 'cascade' }),
    fermentId: fk('ferment_id')
      .notNull()
      .references(() => ferments.id, { onDelete: 'cascade' }),
    name: varchar('name', { length: 120 }).notNull(),
    quantityKg: double('quantity_kg').notNull(),
  },
  (t) => [index('ingredients_ferment_idx').on(t.fermentId)],
);

/** Staged logger CSV uploads, kept an hour until committed. */
export const readingUploads = mysqlTable('reading_uploads', {
  id: varchar('id', { length: 64 }).primaryKey(),
  workspaceId: fk('workspace_id')
    .notNull()
    .references(() => workspaces.id, { onDelete: 'cascade' }),
  fermentId: fk('ferment_id')
    .notNull()
    .references(() => ferments.id, { onDelete: 'cascade' }),
  userId: fk('user_id').references(() => users.id, { onDelete: 'set null' }),
  accepted: json('accepted').notNull(),
  summary: json('summary').notNull(),
  expiresAt: utc('expires_at').notNull(),
  committedAt: utc('committed_at'),
  createdAt: utc('created_at').notNull(),
});

export const readings = mysqlTable(
  'readings',
  {
    id: id(),
    workspaceId: fk('workspace_id')
      .notNull()
      .references(() => workspaces.id, { onDelete: 'cascade' }),
    fermentId: fk('ferment_id')
      .notNull()
      .references(() => ferments.id, { onDelete: 'cascade' }),
    takenAt: utc('taken_at').notNull(),
    method: mysqlEnum('method', READING_METHODS).notNull(),
    /** The value exactly as entered, in its own unit. */
    rawValue: double('raw_value').notNull(),
    rawUnit: mysqlEnum('raw_unit', READING_UNITS).notNull(),
    /** Sample temperature in °C (converted from °F when entered so) and the unit it was entered in. */
    sampleTempC: double('sample_temp_c'),
    sampleTempUnit: mysqlEnum('sample_temp_unit', TEMPERATURE_UNITS),
    /** SG referred to the workspace's hydrometer calibration temperature. */
    correctedSg: double('corrected_sg').notNull(),
    lowConfidence: boolean('low_confidence').notNull().default(false),
    /**
     * Why a reading is held for review (implausible against the ferment, a likely duplicate of
     * another at the same minute...); null = nothing to review. Held readings are stored and
     * shown but not fed to the forecast until someone accepts them.
     */
    reviewReason: varchar('review_reason', { length: 200 }),
    source: mysqlEnum('source', READING_SOURCES).notNull().default('manual'),
    uploadId: varchar('upload_id', { length: 64 }),
    fermentTempC: double('ferment_temp_c'),
    ph: double('ph'),
    note: varchar('note', { length: 500 }),
    takenBy: fk('taken_by').references(() => users.id, { onDelete: 'set null' }),
    deletedAt: utc('deleted_at'),
    ...timestamps,
  },
  (t) => [index('readings_ferment_time_idx').on(t.fermentId, t.takenAt), index('readings_ws_idx').on(t.workspaceId)],
);

/** Cached forecast per ferment, recomputed when its readings change. */
export const fermentForecasts = mysqlTable(
  'ferment_forecasts',
  {
    fermentId: fk('ferment_id')
      .primaryKey()
      .references(() => ferments.id, { onDelete: 'cascade' }),
    workspaceId: fk('workspace_id')
      .notNull()
      .references(() => workspaces.id, { onDelete: 'cascade' }),
    /** Fingerprint of the inputs (readings, settings) the forecast was computed from. */
    inputKey: varchar('input_key', { length: 64 }).notNull(),
    status: mysqlEnum('status', FORECAST_STATUSES).notNull(),
    readyAt: utc('ready_at'),
    readyP10: utc('ready_p10'),
    readyP90: utc('ready_p90'),
    ruleMetAt: utc('rule_met_at'),
    predictedFg: double('predicted_fg'),
    payload: json('payload').notNull(),
    computedAt: utc('computed_at').notNull(),
  },
  (t) => [index('forecasts_ws_idx').on(t.workspaceId)],
);

/** What the forecast said at a point in time, for forecast-accuracy reports. */
export const forecastHistory = mysqlTable(
  'forecast_history',
  {
    id: id(),
    workspaceId: fk('workspace_id')
      .notNull()
      .references(() => workspaces.id, { onDelete: 'cascade' }),
    fermentId: fk('ferment_id')
      .notNull()
      .references(() => ferments.id, { onDelete: 'cascade' }),
    asOf: utc('as_of').notNull(),
    status: mysqlEnum('status', FORECAST_STATUSES).notNull(),
    readyAt: utc('ready_at'),
    readyP10: utc('ready_p10'),
    readyP90: utc('ready_p90'),
  },
  (t) => [index('forecast_history_ferment_idx').on(t.fermentId, t.asOf)],
);

export const runs = mysqlTable(
  'runs',
  {
    id: id(),
    workspaceId: fk('workspace_id')
      .notNull()
      .references(() => workspaces.id, { onDelete: 'cascade' }),
    stillId: fk('still_id')
      .notNull()
      .references(() => stills.id),
    type: mysqlEnum('type', RUN_TYPES).notNull(),
    status: mysqlEnum('status', RUN_STATUSES).notNull().default('planned'),
    startsAt: utc('starts_at').notNull(),
    endsAt: utc('ends_at').notNull(),
    operatorId: fk('operator_id').references(() => users.id, { onDelete: 'set null' }),
    chargeLitres: double('charge_litres'),
    chargeAbv: double('charge_abv'),
    /** Optimistic-locking version: every change must name it. */
    version: int('version').notNull().default(1),
    /** iCalendar SEQUENCE: bumped on every change of time, still or status. */
    sequence: int('sequence').notNull().default(0),
    notes: text('notes'),
    /** Actual moments (the booking stays in startsAt/endsAt for comparison). */
    startedAt: utc('started_at'),
    finishedAt: utc('finished_at'),
    /** Whether the run was at risk when it was last booked or moved (so "wash late" can be told from "booked early"). */
    bookedAtRisk: boolean('booked_at_risk').notNull().default(false),
    createdBy: fk('created_by').references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [index('runs_still_time_idx').on(t.stillId, t.startsAt, t.endsAt), index('runs_ws_time_idx').on(t.workspaceId, t.startsAt)],
);

/** Ferments charging a run, with the litres each contributes. */
export const runFerments = mysqlTable(
  'run_ferments',
  {
    runId: fk('run_id')
      .notNull()
      .references(() => runs.id, { onDelete: 'cascade' }),
    fermentId: fk('ferment_id')
      .notNull()
      .references(() => ferments.id, { onDelete: 'cascade' }),
    workspaceId: fk('workspace_id')
      .notNull()
      .references(() => workspaces.id, { onDelete: 'cascade' }),
    litres: double('litres').notNull(),
  },
  (t) => [primaryKey({ columns: [t.runId, t.fermentId] }), index('run_ferments_ferment_idx').on(t.fermentId)],
);

/** Runs (stripping) whose low wines feed a spirit run. */
export const runFeeds = mysqlTable(
  'run_feeds',
  {
    runId: fk('run_id')
      .notNull()
      .references(() => runs.id, { onDelete: 'cascade' }),
    feedRunId: fk('feed_run_id')
      .notNull()
      .references(() => runs.id, { onDelete: 'cascade' }),
    workspaceId: fk('workspace_id')
      .notNull()
      .references(() => workspaces.id, { onDelete: 'cascade' }),
    litres: double('litres').notNull(),
  },
  (t) => [primaryKey({ columns: [t.runId, t.feedRunId] }), index('run_feeds_feed_idx').on(t.feedRunId)],
);

/** What came off the still: one row per fraction. */
export const runOutcomes = mysqlTable(
  'run_outcomes',
  {
    id: id(),
    workspaceId: fk('workspace_id')
      .notNull()
      .references(() => workspaces.id, { onDelete: 'cascade' }),
    runId: fk('run_id')
      .notNull()
      .references(() => runs.id, { onDelete: 'cascade' }),
    fraction: mysqlEnum('fraction', OUTCOME_FRACTIONS).notNull(),
    volumeLitres: double('volume_litres').notNull(),
    alcoholmeterReading: double('alcoholmeter_reading').notNull(),
    readingTempC: double('reading_temp_c').notNull(),
    abv20: double('abv_20').notNull(),
    laa: double('laa').notNull(),
    cutNote: varchar('cut_note', { length: 200 }),
    recordedBy: fk('recorded_by').references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [index('run_outcomes_run_idx').on(t.runId)],
);
