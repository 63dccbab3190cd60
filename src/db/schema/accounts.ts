import { mysqlTable, varchar, mysqlEnum, int, double, json, uniqueIndex, index, boolean } from 'drizzle-orm/mysql-core';
import { fk, utc, timestamps, id } from './_shared';
import { FERMENTER_RELEASE_MOMENTS, NUMBER_FORMATS, ROLES, UNIT_SYSTEMS } from '../../lib/vocabulary';

/** One distillery. Settings that change how readings are interpreted live here. */
export const workspaces = mysqlTable('workspaces', {
  id: id(),
  name: varchar('name', { length: 120 }).notNull(),
  timeZone: varchar('time_zone', { length: 64 }).notNull().default('Europe/London'),
  units: mysqlEnum('units', UNIT_SYSTEMS).notNull().default('metric'),
  /** Hydrometer calibration temperature, °C (20 or 15.56). */
  calibrationTempC: double('calibration_temp_c').notNull().default(20),
  stableDays: int('stable_days').notNull().default(3),
  stableTolerance: double('stable_tolerance').notNull().default(0.001),
  /** Refractometer wort correction factor. */
  wortCorrectionFactor: double('wort_correction_factor').notNull().default(1.04),
  isDemo: boolean('is_demo').notNull().default(false),
  /** How typed numbers are read (decimal point or comma). */
  numberFormat: mysqlEnum('number_format', NUMBER_FORMATS).notNull().default('point'),
  /** A run is at risk when its wash is less likely than this to be confirmable by the run's start. */
  atRiskThreshold: double('at_risk_threshold').notNull().default(0.8),
  /** Starting a run more than this many minutes before its booking asks for confirmation. */
  startEarlyMarginMinutes: int('start_early_margin_minutes').notNull().default(60),
  /** When a stripping run marks the washes it charged as emptied. */
  releaseFermentersOn: mysqlEnum('release_fermenters_on', FERMENTER_RELEASE_MOMENTS).notNull().default('finish'),
  /** Runs and closures may be booked at most this many days ahead. */
  bookingHorizonDays: int('booking_horizon_days').notNull().default(365),
  /** When a manager put the getting-started checklist away (null = still shown until complete). */
  setupDismissedAt: utc('setup_dismissed_at'),
  ...timestamps,
});

export const users = mysqlTable(
  'users',
  {
    id: id(),
    /** Always stored lower-cased. */
    email: varchar('email', { length: 254 }).notNull(),
    name: varchar('name', { length: 120 }).notNull(),
    passwordHash: varchar('password_hash', { length: 255 }).notNull(),
    emailVerifiedAt: utc('email_verified_at'),
    disabledAt: utc('disabled_at'),
    ...timestamps,
  },
  (t) => [uniqueIndex('users_email_uq').on(t.email)],
);

export const memberships = mysqlTable(
  'memberships',
  {
    id: id(),
    workspaceId: fk('workspace_id')
      .notNull()
      .references(() => workspaces.id, { onDelete: 'cascade' }),
    userId: fk('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    role: mysqlEnum('role', ROLES).notNull(),
    /** Which notifications this person receives in this workspace. */
    notifyPrefs: json('notify_prefs').$type<Record<string, boolean>>(),
    ...timestamps,
  },
  (t) => [uniqueIndex('memberships_ws_user_uq').on(t.workspaceId, t.userId), index('memberships_user_idx').on(t.userId)],
);

/** Lucia sessions. `expiresAt` slides (idle expiry); `createdAt` bounds the absolute lifetime. */
export const sessions = mysqlTable(
  'sessions',
  {
    id: varchar('id', { length: 255 }).primaryKey(),
    userId: fk('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    expiresAt: utc('expires_at').notNull(),
    workspaceId: fk('workspace_id').references(() => workspaces.id, { onDelete: 'set null' }),
    createdAt: utc('created_at').notNull(),
    userAgent: varchar('user_agent', { length: 255 }),
  },
  (t) => [index('sessions_user_idx').on(t.userId)],
);

export const invitations = mysqlTable(
  'invitations',
  {
    id: id(),
    workspaceId: fk('workspace_id')
      .notNull()
      .references(() => workspaces.id, { onDelete: 'cascade' }),
    email: varchar('email', { length: 254 }).notNull(),
    role: mysqlEnum('role', ROLES).notNull(),
    tokenHash: varchar('token_hash', { length: 64 }).notNull(),
    invitedBy: fk('invited_by').references(() => users.id, { onDelete: 'set null' }),
    expiresAt: utc('expires_at').notNull(),
    acceptedAt: utc('accepted_at'),
    revokedAt: utc('revoked_at'),
    ...timestamps,
  },
  (t) => [uniqueIndex('invitations_token_uq').on(t.tokenHash), index('invitations_ws_idx').on(t.workspaceId)],
);

/** Single-use e-mailed tokens: password resets and sign-up confirmations. */
export const emailTokens = mysqlTable(
  'email_tokens',
  {
    id: id(),
    purpose: mysqlEnum('purpose', ['password_reset', 'signup_confirm']).notNull(),
    tokenHash: varchar('token_hash', { length: 64 }).notNull(),
    email: varchar('email', { length: 254 }).notNull(),
    userId: fk('user_id').references(() => users.id, { onDelete: 'cascade' }),
    /** For sign-up: the pending workspace name, person's name and password hash. */
    payload: json('payload').$type<Record<string, string>>(),
    expiresAt: utc('expires_at').notNull(),
    usedAt: utc('used_at'),
    ...timestamps,
  },
  (t) => [uniqueIndex('email_tokens_token_uq').on(t.tokenHash)],
);

/** Failed sign-in counters per e-mail and per IP. */
export const signInThrottle = mysqlTable('sign_in_throttle', {
  key: varchar('throttle_key', { length: 300 }).primaryKey(),
  failures: int('failures').notNull().default(0),
  windowStartedAt: utc('window_started_at').notNull(),
  blockedUntil: utc('blocked_until'),
});
