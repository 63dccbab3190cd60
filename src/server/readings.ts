import { and, asc, eq, gt, isNull, lt, ne } from 'drizzle-orm';
import { z } from 'zod';
import { getDb } from '../db/client';
import { readings, users } from '../db/schema';
import { READING_METHODS, READING_UNIT_SYMBOLS, READING_UNITS, type NumberFormat, type TemperatureUnit } from '../lib/vocabulary';
import { correctReading, GravityInputError, sgToBrix, WATER_DENSITY_MAX_C, WATER_DENSITY_MIN_C, type ReadingMethod, type ReadingUnit } from '../lib/gravity';
import { parseTemperatureToC, temperatureUnitFor, formatTemperature, temperatureForDisplay } from '../lib/units';
import { formatTypedNumber } from '../lib/units/typed-number';
import { modelAt, type FittedCurve } from '../lib/forecast';
import { audit } from './audit';
import { HttpError, conflict, invalid, notFound, afterCommit } from './http';
import type { WorkspaceSettings } from './workspaces';
import type { Ctx } from './context';
import { typedNumber } from './numbers';
import type { Tx } from './tx';
import { CLOCK_SKEW_MS, parseWorkspaceTime } from './workspace-time';
import { getFerment } from './ferment-lookup';
import { getForecast, recomputeForecast } from './forecasts';

/** A reading as a person sends it (POST /api/ferments/[id]/readings; PATCH /api/readings/[id] takes it partial). */
export const readingInputSchema = z.object({
  value: typedNumber(z.number({ error: 'Enter the reading as a number.' }), { grouping: false }),
  unit: z.enum(READING_UNITS, { error: 'Choose SG, °Brix or °Plato.' }),
  method: z.enum(READING_METHODS, { error: 'Choose hydrometer, refractometer or digital sensor.' }),
  /** In the workspace's temperature unit (°C or °F). */
  sampleTemp: typedNumber(z.number({ error: 'Enter the sample temperature as a number.' }), { grouping: false })
    .nullable()
    .optional(),
  /** ISO time with a zone, or a wall-clock time in the distillery's zone; defaults to now. */
  takenAt: z.string().max(40).nullable().optional(),
  note: z.string().max(500, 'Keep the note to 500 characters.').nullable().optional(),
  fermentTemp: typedNumber(z.number({ error: 'Enter the ferment temperature as a number.' }), { grouping: false })
    .nullable()
    .optional(),
  ph: typedNumber(z.number({ error: 'Enter the pH as a number.' }).min(0, 'pH runs from 0 to 14.').max(14, 'pH runs from 0 to 14.'), { grouping: false })
    .nullable()
    .optional(),
  /** Sent again after a 409 `confirm_reading`: the person has seen the doubt and stores the reading as entered. */
  confirm: z.boolean({ error: 'confirm is true or false.' }).optional(),
});

/** Raw SG accepted from a person or a file. */
export const SG_MIN = 0.98;
export const SG_MAX = 1.2;
/** A reading this far below the OG shows the yeast is at work. */
export const STARTED_DROP = 0.002;
/** After this long since pitching, fermentation is taken as started even without a lower reading. */
export const STARTED_AFTER_MS = 12 * 3_600_000;

/**
 * Has fermentation started by the time of a reading? (It decides whether a refractometer
 * value needs the alcohol correction.) Yes when any earlier reading of the ferment is more
 * than 0.002 below the OG, or when the reading is taken more than 12 hours after pitching.
 */
export function fermentationStarted(earlier: Array<{ takenAt: Date; correctedSg: number }>, og: number, pitchedAt: Date, takenAt: Date): boolean {
  if (takenAt.getTime() - pitchedAt.getTime() > STARTED_AFTER_MS) return true;
  return earlier.some((r) => r.takenAt.getTime() < takenAt.getTime() && og - r.correctedSg > STARTED_DROP);
}

export interface ReadingEntry {
  value: number;
  unit: ReadingUnit;
  method: ReadingMethod;
  /** Sample temperature in °C (already converted from the entry unit). */
  sampleTempC: number | null;
  takenAt: Date;
}

const GRAVITY_FIELD: Record<string, string> = {
  value: 'value',
  unit: 'unit',
  method: 'method',
  sampleTempC: 'sampleTemp',
  originalGravity: 'value',
  wcf: 'value',
};

/**
 * Checks one reading against the trade's plausibility rules and derives its corrected SG.
 * Throws HttpError 400 with the offending field.
 */
export function deriveCorrected(
  ws: Pick<WorkspaceSettings, 'calibrationTempC' | 'wortCorrectionFactor' | 'units'>,
  ferment: { og: number; pitchedAt: Date; emptiedAt?: Date | null },
  entry: ReadingEntry,
  earlier: Array<{ takenAt: Date; correctedSg: number }>,
  now: Date,
): { sg: number; lowConfidence: boolean; steps: string[] } {
  const tempRange = ws.units === 'us' ? '32–140 °F' : '0–60 °C';
  if (entry.unit === 'sg' && (entry.value < SG_MIN || entry.value > SG_MAX)) {
    const alt = alternateUnit(entry.value, entry.unit);
    const guess = alt ? ` Did you mean ${alt.value} ${READING_UNIT_SYMBOLS[alt.unit]}?` : '';
    throw invalid('value', `An SG of ${entry.value} is not plausible: readings must lie between ${SG_MIN.toFixed(3)} and ${SG_MAX.toFixed(3)}.${guess}`);
  }
  // Sample temperatures: the range the hydrometer correction covers (lib/gravity), whatever the method.
  if (entry.sampleTempC !== null && (entry.sampleTempC < WATER_DENSITY_MIN_C || entry.sampleTempC > WATER_DENSITY_MAX_C)) {
    throw invalid('sampleTemp', `A sample at ${formatTemperature(entry.sampleTempC, ws.units)} is outside ${tempRange}: cool or warm it and read again.`);
  }
  if (entry.method === 'hydrometer' && entry.sampleTempC === null) {
    throw invalid('sampleTemp', 'A hydrometer reading needs the sample temperature.');
  }
  if (entry.takenAt.getTime() < ferment.pitchedAt.getTime()) throw invalid('takenAt', 'That time is before the ferment was pitched.');
  if (entry.takenAt.getTime() > now.getTime() + CLOCK_SKEW_MS) throw invalid('takenAt', 'That time is in the future.');
  if (ferment.emptiedAt && entry.takenAt.getTime() > ferment.emptiedAt.getTime()) throw invalid('takenAt', 'That time is after the fermenter was emptied.');
  const started = fermentationStarted(earlier, ferment.og, ferment.pitchedAt, entry.takenAt);
  if (entry.method === 'refractometer' && entry.unit !== 'sg') {
    const originalReading = sgToBrix(ferment.og) * ws.wortCorrectionFactor;
    if (entry.value > originalReading + 1e-9) {
      throw invalid(
        'value',
        `${entry.value.toFixed(1)} °Bx is above what the original gravity ${ferment.og.toFixed(3)} reads on a refractometer (${originalReading.toFixed(1)} °Bx): fermentation cannot raise it.`,
      );
    }
  }
  try {
    return correctReading({
      value: entry.value,
      unit: entry.unit,
      method: entry.method,
      sampleTempC: entry.sampleTempC,
      calibrationTempC: ws.calibrationTempC,
      wcf: ws.wortCorrectionFactor,
      originalGravity: ferment.og,
      fermentationStarted: started,
    });
  } catch (err) {
    if (err instanceof GravityInputError) {
      const field = GRAVITY_FIELD[err.field] ?? 'value';
      const alt = field === 'value' ? alternateUnit(entry.value, entry.unit) : null;
      throw invalid(field, alt ? `${err.message} Did you mean ${alt.value} ${READING_UNIT_SYMBOLS[alt.unit]}?` : err.message);
    }
    throw err;
  }
}

/*
 * Plausibility of a reading that passed the hard checks above. A doubtful manual reading is
 * held: the API answers 409 `confirm_reading` with the value and unit as entered, and the person
 * sends it again with `confirm: true`. Uploads (and later sensors and offline queues), which
 * cannot answer, store the row with `review_reason` set; such a row feeds neither the forecast
 * nor the stability rule until someone accepts it.
 */

/** A reading this far above the OG has not fermented: two hydrometer marks (common practice: 0.001 SG a mark). */
export const RISE_TOLERANCE = 0.002;
/** Off the fitted curve by more than this, or by more than OFF_CURVE_SPREADS × the fit's RMSE, whichever is larger. */
export const OFF_CURVE_MIN = 0.01;
export const OFF_CURVE_SPREADS = 4;
/** The fit is trusted for the off-curve check once this many readings (not held) are in. */
export const OFF_CURVE_MIN_READINGS = 4;
/**
 * Sugar and fruit washes end below 1.000 (more than 100 % apparent attenuation is normal for
 * them, common practice): for a wash type whose terminal range starts below 1.000, a reading is
 * held only this far below that range.
 */
export const BELOW_RANGE_MARGIN = 0.004;
/** A manual and a logger reading this close in time are a likely duplicate. */
export const DUPLICATE_WINDOW_MS = 60_000;

const DAY_MS = 86_400_000;

/** When a number fits another reading unit's range better, the unit the person probably meant. */
export function alternateUnit(value: number, unit: ReadingUnit): { value: number; unit: ReadingUnit } | null {
  if (unit !== 'sg' && value >= SG_MIN && value <= SG_MAX) return { value, unit: 'sg' };
  if (unit === 'sg' && value >= 980 && value <= 1200) return { value: value / 1000, unit: 'sg' };
  if (unit === 'sg' && value > 1.5 && value <= 40) return { value, unit: 'brix' };
  return null;
}

/** The fitted curve's SG at a moment (null when the fit's model is not one this code knows). */
export function fittedSgAt(fit: FittedCurve, og: number, pitchedAt: Date, at: Date): number | null {
  const t = (at.getTime() - pitchedAt.getTime()) / DAY_MS;
  const p = fit.params;
  let sg: number;
  if (fit.model === 'logistic' && [p.pi, p.pe, p.bPerDay, p.midpointDays].every(Number.isFinite) && p.bPerDay! > 0)
    sg = modelAt('logistic', t, [p.pi!, p.pe!, Math.log(p.bPerDay!), p.midpointDays!], og);
  else if (fit.model === 'first_order' && [p.fg, p.kPerDay, p.lagDays].every(Number.isFinite) && p.kPerDay! > 0)
    sg = modelAt('first_order', t, [p.fg!, Math.log(p.kPerDay!), p.lagDays!], og);
  else return null;
  return Number.isFinite(sg) ? sg : null;
}

export interface PlausibilityBasis {
  og: number;
  terminalMin: number;
  pitchedAt: Date;
  /** The ferment's current fit (held readings excluded), or null. */
  fit: FittedCurve | null;
  /** Readings the fit stands on. */
  fittedReadings: number;
}

export interface ReadingDoubt {
  /** Short, for review_reason: "132 % apparent attenuation". */
  reason: string;
  /** For the person: what was entered (value and unit), what it implies, and a guess. */
  message: string;
  suggestion: { value: number; unit: ReadingUnit } | null;
}

function shownValue(value: number, unit: ReadingUnit, format: NumberFormat): string {
  const decimals = (String(value).split('.')[1] ?? '').length;
  return `${formatTypedNumber(value, format, unit === 'sg' ? Math.max(3, Math.min(decimals, 6)) : undefined, { grouping: false })} ${READING_UNIT_SYMBOLS[unit]}`;
}

/**
 * Is this reading plausible for its ferment? Held when it implies more than 100 % apparent
 * attenuation ((OG − SG) / (OG − 1); below the wash type's own range for sugar and fruit), when
 * it lies above the OG, or when it is further from the fitted curve than
 * max(0.010 SG, 4 × the fit's RMSE). Null when plausible.
 */
export function readingDoubt(
  format: NumberFormat,
  basis: PlausibilityBasis,
  entry: { value: number; unit: ReadingUnit; takenAt: Date },
  sg: number,
): ReadingDoubt | null {
  const entered = shownValue(entry.value, entry.unit, format);
  const asSg = entry.unit === 'sg' ? '' : `, which reads as ${formatTypedNumber(sg, format, 3)} SG`;
  const og = formatTypedNumber(basis.og, format, 3);
  const alt = alternateUnit(entry.value, entry.unit);
  const guess = alt ? ` Did you mean ${shownValue(alt.value, alt.unit, format)}?` : '';
  const floor = basis.terminalMin < 1 ? basis.terminalMin - BELOW_RANGE_MARGIN : 1;
  if (basis.og > 1 && sg < floor - 1e-9) {
    const pct = Math.round(((basis.og - sg) / (basis.og - 1)) * 100);
    return {
      reason: `${pct} % apparent attenuation`,
      message: `You entered ${entered}${asSg}, which gives ${pct} % apparent attenuation for OG ${og}.${guess} Check it, or save it as entered.`,
      suggestion: alt,
    };
  }
  if (sg > basis.og + RISE_TOLERANCE + 1e-9) {
    return {
      reason: `${formatTypedNumber(sg, format, 3)} SG is above the OG ${og}`,
      message: `You entered ${entered}${asSg}, above the OG ${og}: gravity does not rise during fermentation.${guess} Check it, or save it as entered.`,
      suggestion: alt,
    };
  }
  if (basis.fit && basis.fittedReadings >= OFF_CURVE_MIN_READINGS) {
    const expected = fittedSgAt(basis.fit, basis.og, basis.pitchedAt, entry.takenAt);
    const limit = Math.max(OFF_CURVE_MIN, OFF_CURVE_SPREADS * (Number.isFinite(basis.fit.rmse) ? basis.fit.rmse : 0));
    if (expected !== null && Math.abs(sg - expected) > limit + 1e-9) {
      const off = formatTypedNumber(Math.abs(sg - expected), format, 3);
      return {
        reason: `${off} SG off the curve`,
        message: `You entered ${entered}${asSg}, ${off} SG off the fitted curve (about ${formatTypedNumber(expected, format, 3)} SG expected then).${guess} Check it, or save it as entered.`,
        suggestion: alt,
      };
    }
  }
  return null;
}

/** The ferment's fit and how many readings it stands on, for readingDoubt. */
export async function plausibilityBasis(
  ctx: Ctx,
  ferment: { id: number; og: number; terminalMin: number; pitchedAt: Date },
  now: Date,
): Promise<PlausibilityBasis> {
  const [counted] = await getDb()
    .select({ id: readings.id })
    .from(readings)
    .where(and(eq(readings.workspaceId, ctx.ws.id), eq(readings.fermentId, ferment.id), isNull(readings.deletedAt), isNull(readings.reviewReason)))
    .limit(1)
    .offset(OFF_CURVE_MIN_READINGS - 1);
  const forecast = counted ? await getForecast(ctx, ferment.id, now).catch(() => null) : null;
  return {
    og: ferment.og,
    terminalMin: ferment.terminalMin,
    pitchedAt: ferment.pitchedAt,
    fit: forecast?.fit ?? null,
    fittedReadings: counted ? OFF_CURVE_MIN_READINGS : 0,
  };
}

/** "08:14" in the distillery's time zone. */
export function clockTime(at: Date, timeZone: string): string {
  return new Intl.DateTimeFormat('en-GB', { timeZone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(at);
}

/** A reading of the other source (manual vs logger) within a minute of this one: "likely duplicate of a manual reading at 08:14". */
export async function duplicateReason(
  ws: Pick<WorkspaceSettings, 'id' | 'timeZone'>,
  fermentId: number,
  source: 'manual' | 'upload',
  takenAt: Date,
  exceptId?: number,
): Promise<string | null> {
  const other = source === 'manual' ? 'upload' : 'manual';
  const conds = [
    eq(readings.workspaceId, ws.id),
    eq(readings.fermentId, fermentId),
    isNull(readings.deletedAt),
    eq(readings.source, other),
    gt(readings.takenAt, new Date(takenAt.getTime() - DUPLICATE_WINDOW_MS)),
    lt(readings.takenAt, new Date(takenAt.getTime() + DUPLICATE_WINDOW_MS)),
  ];
  if (exceptId) conds.push(ne(readings.id, exceptId));
  const [hit] = await getDb()
    .select({ takenAt: readings.takenAt })
    .from(readings)
    .where(and(...conds))
    .limit(1);
  if (!hit) return null;
  return `likely duplicate of a ${other === 'manual' ? 'manual' : 'logger'} reading at ${clockTime(hit.takenAt, ws.timeZone)}`;
}

/** The 409 a person answers by sending the reading again with `confirm: true`. */
function confirmReading(doubt: ReadingDoubt): HttpError {
  return new HttpError(409, 'confirm_reading', doubt.message, { value: doubt.message }, { confirm: { reason: doubt.reason, suggestion: doubt.suggestion } });
}

/** Temperatures in the workspace's unit (°C or °F); takenAt as parseWorkspaceTime reads it. */
export type ReadingBody = z.infer<typeof readingInputSchema>;

function entryFrom(
  ws: WorkspaceSettings,
  body: ReadingBody,
  now: Date,
): ReadingEntry & { sampleTempUnit: TemperatureUnit | null; fermentTempC: number | null } {
  const tUnit = temperatureUnitFor(ws.units);
  const sampleTempC = body.sampleTemp == null ? null : parseTemperatureToC(body.sampleTemp, tUnit);
  const fermentTempC = body.fermentTemp == null ? null : parseTemperatureToC(body.fermentTemp, tUnit);
  if (fermentTempC !== null && (fermentTempC < -5 || fermentTempC > 60)) {
    throw invalid('fermentTemp', `A ferment at ${formatTemperature(fermentTempC, ws.units)} is not plausible.`);
  }
  const takenAt = body.takenAt ? parseWorkspaceTime(body.takenAt, ws.timeZone, 'takenAt') : now;
  return { value: body.value, unit: body.unit, method: body.method, sampleTempC, sampleTempUnit: sampleTempC === null ? null : tUnit, takenAt, fermentTempC };
}

async function earlierReadings(workspaceId: number, fermentId: number, before: Date, exceptId?: number) {
  const conds = [eq(readings.workspaceId, workspaceId), eq(readings.fermentId, fermentId), isNull(readings.deletedAt), lt(readings.takenAt, before)];
  if (exceptId) conds.push(ne(readings.id, exceptId));
  return getDb()
    .select({ takenAt: readings.takenAt, correctedSg: readings.correctedSg })
    .from(readings)
    .where(and(...conds));
}

export interface ReadingView {
  id: number;
  takenAt: string;
  method: ReadingMethod;
  rawValue: number;
  rawUnit: ReadingUnit;
  sampleTempC: number | null;
  sampleTempUnit: TemperatureUnit | null;
  correctedSg: number;
  lowConfidence: boolean;
  source: 'manual' | 'upload';
  fermentTempC: number | null;
  ph: number | null;
  note: string | null;
  takenById: number | null;
  takenByName: string | null;
  edited: boolean;
  /** Why the reading is held for review (left out of the forecast until accepted); null when it counts. */
  reviewReason: string | null;
}

export async function listReadings(ctx: Ctx, fermentId: number): Promise<ReadingView[]> {
  const workspaceId = ctx.ws.id;
  const rows = await getDb()
    .select({
      id: readings.id,
      takenAt: readings.takenAt,
      method: readings.method,
      rawValue: readings.rawValue,
      rawUnit: readings.rawUnit,
      sampleTempC: readings.sampleTempC,
      sampleTempUnit: readings.sampleTempUnit,
      correctedSg: readings.correctedSg,
      lowConfidence: readings.lowConfidence,
      source: readings.source,
      fermentTempC: readings.fermentTempC,
      ph: readings.ph,
      note: readings.note,
      takenById: readings.takenBy,
      takenByName: users.name,
      reviewReason: readings.reviewReason,
      createdAt: readings.createdAt,
      updatedAt: readings.updatedAt,
    })
    .from(readings)
    .leftJoin(users, eq(users.id, readings.takenBy))
    .where(and(eq(readings.workspaceId, workspaceId), eq(readings.fermentId, fermentId), isNull(readings.deletedAt)))
    .orderBy(asc(readings.takenAt), asc(readings.id));
  return rows.map(({ createdAt, updatedAt, ...r }) => ({ ...r, takenAt: r.takenAt.toISOString(), edited: updatedAt.getTime() - createdAt.getTime() > 1000 }));
}

async function readingById(workspaceId: number, id: number) {
  const [row] = await getDb()
    .select()
    .from(readings)
    .where(and(eq(readings.id, id), eq(readings.workspaceId, workspaceId), isNull(readings.deletedAt)))
    .limit(1);
  if (!row) throw notFound('No such reading.');
  return row;
}

export async function addReading(ctx: Ctx, fermentId: number, body: ReadingBody, now = new Date()): Promise<ReadingView> {
  const {
    ws,
    actor: { userId },
  } = ctx;
  const ferment = await getFerment(ctx, fermentId);
  if (ferment.emptiedAt) throw conflict(`${ferment.code} has been emptied; readings can no longer be added.`);
  const entry = entryFrom(ws, body, now);
  const corrected = deriveCorrected(ws, ferment, entry, await earlierReadings(ws.id, fermentId, entry.takenAt), now);
  if (!body.confirm) {
    const doubt = readingDoubt(ws.numberFormat, await plausibilityBasis(ctx, ferment, now), entry, corrected.sg);
    if (doubt) throw confirmReading(doubt);
  }
  const reviewReason = await duplicateReason(ws, fermentId, 'manual', entry.takenAt);
  const db = getDb();
  const id = await db.transaction(async (tx) => {
    const [row] = await tx
      .insert(readings)
      .values({
        workspaceId: ws.id,
        fermentId,
        takenAt: entry.takenAt,
        method: entry.method,
        rawValue: entry.value,
        rawUnit: entry.unit,
        sampleTempC: entry.sampleTempC,
        sampleTempUnit: entry.sampleTempUnit,
        correctedSg: corrected.sg,
        lowConfidence: corrected.lowConfidence,
        source: 'manual',
        fermentTempC: entry.fermentTempC,
        ph: body.ph ?? null,
        note: body.note?.trim() || null,
        takenBy: userId,
        reviewReason,
      })
      .$returningId();
    await audit(
      {
        workspaceId: ws.id,
        userId,
        action: 'reading.create',
        entityType: 'reading',
        entityId: row!.id,
        details: {
          fermentId,
          rawValue: entry.value,
          rawUnit: entry.unit,
          method: entry.method,
          correctedSg: corrected.sg,
          ...(body.confirm ? { confirmed: true } : {}),
          ...(reviewReason ? { reviewReason } : {}),
        },
      },
      tx,
    );
    return row!.id;
  });
  await recomputeForecast(ctx, fermentId, now);
  const stored = {
    id,
    fermentId,
    takenAt: entry.takenAt,
    method: entry.method,
    rawValue: entry.value,
    rawUnit: entry.unit,
    sampleTempC: entry.sampleTempC,
    correctedSg: corrected.sg,
    lowConfidence: corrected.lowConfidence,
    reviewReason,
  };
  return afterCommit(async () => (await listReadings(ctx, fermentId)).find((r) => r.id === id)!, stored as never);
}

const AUDITED = [
  'takenAt',
  'method',
  'rawValue',
  'rawUnit',
  'sampleTempC',
  'sampleTempUnit',
  'correctedSg',
  'lowConfidence',
  'fermentTempC',
  'ph',
  'note',
  'reviewReason',
] as const;

function snapshot(r: Record<string, unknown>): Record<string, unknown> {
  return Object.fromEntries(AUDITED.map((k) => [k, r[k] instanceof Date ? (r[k] as Date).toISOString() : (r[k] ?? null)]));
}

/** Edit = the new values, plus an audit entry holding the old and the new; the original stays readable there. */
export async function updateReading(ctx: Ctx, readingId: number, body: Partial<ReadingBody>, now = new Date()): Promise<ReadingView> {
  const {
    ws,
    actor: { userId },
  } = ctx;
  const before = await readingById(ws.id, readingId);
  const ferment = await getFerment(ctx, before.fermentId);
  const merged: ReadingBody = {
    value: body.value ?? before.rawValue,
    unit: body.unit ?? before.rawUnit,
    method: body.method ?? before.method,
    sampleTemp: body.sampleTemp !== undefined ? body.sampleTemp : before.sampleTempC == null ? null : temperatureForDisplay(before.sampleTempC, ws.units),
    takenAt: body.takenAt ?? before.takenAt.toISOString(),
    note: body.note !== undefined ? body.note : before.note,
    fermentTemp: body.fermentTemp !== undefined ? body.fermentTemp : before.fermentTempC == null ? null : temperatureForDisplay(before.fermentTempC, ws.units),
    ph: body.ph !== undefined ? body.ph : before.ph,
  };
  const entry = entryFrom(ws, merged, now);
  // Temperatures not sent keep their stored °C exactly (no round trip through °F).
  if (body.sampleTemp === undefined) {
    entry.sampleTempC = before.sampleTempC;
    entry.sampleTempUnit = before.sampleTempUnit;
  }
  if (body.fermentTemp === undefined) entry.fermentTempC = before.fermentTempC;
  const corrected = deriveCorrected(ws, { ...ferment, emptiedAt: null }, entry, await earlierReadings(ws.id, ferment.id, entry.takenAt, readingId), now);
  // A change of what was read (or when) is checked like a new reading and re-judged for duplicates;
  // a note or pH alone keeps the reading's review state.
  const reread = (['value', 'unit', 'method', 'sampleTemp', 'takenAt'] as const).some((k) => body[k] !== undefined);
  let reviewReason = before.reviewReason;
  if (reread) {
    if (!body.confirm) {
      const doubt = readingDoubt(ws.numberFormat, await plausibilityBasis(ctx, ferment, now), entry, corrected.sg);
      if (doubt) throw confirmReading(doubt);
    }
    reviewReason = await duplicateReason(ws, ferment.id, before.source, entry.takenAt, readingId);
  }
  const after = {
    takenAt: entry.takenAt,
    method: entry.method,
    rawValue: entry.value,
    rawUnit: entry.unit,
    sampleTempC: entry.sampleTempC,
    sampleTempUnit: entry.sampleTempUnit,
    correctedSg: corrected.sg,
    lowConfidence: corrected.lowConfidence,
    fermentTempC: entry.fermentTempC,
    ph: merged.ph ?? null,
    note: merged.note?.trim() || null,
    reviewReason,
  };
  const db = getDb();
  await db.transaction(async (tx) => {
    await tx
      .update(readings)
      .set(after)
      .where(and(eq(readings.id, readingId), eq(readings.workspaceId, ws.id)));
    await audit(
      {
        workspaceId: ws.id,
        userId,
        action: 'reading.update',
        entityType: 'reading',
        entityId: readingId,
        details: { fermentId: ferment.id, before: snapshot(before), after: snapshot(after) },
      },
      tx,
    );
  });
  await recomputeForecast(ctx, ferment.id, now);
  return (await listReadings(ctx, ferment.id)).find((r) => r.id === readingId)!;
}

/** Accept a reading held for review: it counts from now on (forecast and stability rule); audited. */
export async function acceptReading(ctx: Ctx, readingId: number, now = new Date()): Promise<ReadingView> {
  const {
    ws,
    actor: { userId },
  } = ctx;
  const before = await readingById(ws.id, readingId);
  if (!before.reviewReason) throw conflict('This reading is not held for review.');
  await getDb().transaction(async (tx) => {
    await tx
      .update(readings)
      .set({ reviewReason: null })
      .where(and(eq(readings.id, readingId), eq(readings.workspaceId, ws.id)));
    await audit(
      {
        workspaceId: ws.id,
        userId,
        action: 'reading.accept',
        entityType: 'reading',
        entityId: readingId,
        details: { fermentId: before.fermentId, reviewReason: before.reviewReason, correctedSg: before.correctedSg },
      },
      tx,
    );
  });
  await recomputeForecast(ctx, before.fermentId, now);
  return (await listReadings(ctx, before.fermentId)).find((r) => r.id === readingId)!;
}

/** Delete = soft delete (deleted_at) plus an audit entry with the full reading. */
export async function deleteReading(ctx: Ctx, readingId: number, now = new Date()): Promise<void> {
  const {
    ws,
    actor: { userId },
  } = ctx;
  const before = await readingById(ws.id, readingId);
  const db = getDb();
  await db.transaction(async (tx) => {
    await tx
      .update(readings)
      .set({ deletedAt: now })
      .where(and(eq(readings.id, readingId), eq(readings.workspaceId, ws.id), isNull(readings.deletedAt)));
    await audit(
      {
        workspaceId: ws.id,
        userId,
        action: 'reading.delete',
        entityType: 'reading',
        entityId: readingId,
        details: { fermentId: before.fermentId, reading: snapshot(before) },
      },
      tx,
    );
  });
  await recomputeForecast(ctx, before.fermentId, now);
}

/** After an OG or pitch-time change: re-derive every reading's corrected SG (in order, since "started" depends on earlier ones). */
export async function recorrectFermentReadings(ctx: Ctx, tx: Tx, ferment: { id: number; og: number; pitchedAt: Date }): Promise<void> {
  const {
    ws,
    actor: { userId },
  } = ctx;
  const rows = await tx
    .select()
    .from(readings)
    .where(and(eq(readings.workspaceId, ws.id), eq(readings.fermentId, ferment.id), isNull(readings.deletedAt)))
    .orderBy(asc(readings.takenAt), asc(readings.id));
  const done: Array<{ takenAt: Date; correctedSg: number }> = [];
  for (const r of rows) {
    let sg: number;
    try {
      sg = correctReading({
        value: r.rawValue,
        unit: r.rawUnit,
        method: r.method,
        sampleTempC: r.sampleTempC,
        calibrationTempC: ws.calibrationTempC,
        wcf: ws.wortCorrectionFactor,
        originalGravity: ferment.og,
        fermentationStarted: fermentationStarted(done, ferment.og, ferment.pitchedAt, r.takenAt),
      }).sg;
    } catch (err) {
      if (err instanceof GravityInputError)
        throw new HttpError(400, 'invalid', `With this OG the reading of ${r.takenAt.toISOString().slice(0, 16)} no longer makes sense: ${err.message}`, {
          og: err.message,
        });
      throw err;
    }
    if (Math.abs(sg - r.correctedSg) > 1e-9) {
      await tx.update(readings).set({ correctedSg: sg }).where(eq(readings.id, r.id));
      await audit(
        {
          workspaceId: ws.id,
          userId,
          action: 'reading.recorrect',
          entityType: 'reading',
          entityId: r.id,
          details: { fermentId: ferment.id, before: { correctedSg: r.correctedSg }, after: { correctedSg: sg } },
        },
        tx,
      );
    }
    done.push({ takenAt: r.takenAt, correctedSg: sg });
  }
}
