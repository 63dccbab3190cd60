import { createHash } from 'node:crypto';
import { and, desc, eq, inArray, isNotNull, isNull, sql } from 'drizzle-orm';
import { getDb } from '../db/client';
import { fermentForecasts, ferments, forecastHistory, readings, washTypes } from '../db/schema';
import { forecastFerment, type Forecast, type ForecastStatus } from '../lib/forecast';
import { notifyFermentStatusChange } from './notify';
import type { Ctx } from './context';

/** What the board and the ferments list need from a forecast. */
export interface ForecastSummary {
  fermentId: number;
  status: ForecastStatus;
  reason: string;
  readyAt: Date | null;
  readyP10: Date | null;
  readyP90: Date | null;
  ruleMetAt: Date | null;
  predictedFg: number | null;
  lastSg: number | null;
}

const HOUR_MS = 3_600_000;
/** forecast_history gets at most one row per ferment per this interval. */
const HISTORY_EVERY_MS = 6 * HOUR_MS;
const DAY_MS = 24 * HOUR_MS;
/** A forecast learns from at most this many of its wash type's latest finished ferments. */
export const HISTORY_LIMIT = 20;

/** A finished ferment of the workspace: when it was pitched, confirmed stable and emptied. */
interface FinishedFerment {
  id: number;
  washTypeId: number;
  pitchedAt: Date;
  ruleMetAt: Date;
  emptiedAt: Date;
}

/**
 * The wash type's past pitch-to-stable durations (days) that were known at `asOf`: ferments of
 * the same wash type, other than this one, emptied by then after meeting the stability rule,
 * latest first, at most HISTORY_LIMIT. An emptied ferment's forecast is frozen at its emptying,
 * so it only ever learns from ferments that had finished before that.
 */
export function historyFor(f: Pick<FermentInputs, 'id' | 'washTypeId' | 'emptiedAt'>, finished: readonly FinishedFerment[], now: Date): number[] {
  const asOf = effectiveNow(f, now).getTime();
  return finished
    .filter((q) => q.washTypeId === f.washTypeId && q.id !== f.id && q.emptiedAt.getTime() <= asOf && q.ruleMetAt.getTime() > q.pitchedAt.getTime())
    .sort((a, b) => b.emptiedAt.getTime() - a.emptiedAt.getTime() || b.id - a.id)
    .slice(0, HISTORY_LIMIT)
    .map((q) => (q.ruleMetAt.getTime() - q.pitchedAt.getTime()) / DAY_MS);
}

interface FermentInputs {
  id: number;
  washTypeId: number;
  og: number;
  pitchedAt: Date;
  emptiedAt: Date | null;
  updatedAt: Date;
  terminalMin: number;
  terminalMax: number;
}

interface ReadingInput {
  id: number;
  takenAt: Date;
  correctedSg: number;
  lowConfidence: boolean;
  ph: number | null;
  updatedAt: Date;
}

interface Settings {
  stableDays: number;
  stableTolerance: number;
}

/**
 * Cache key of a forecast: the readings (ids, times, values, edits), the ferment's OG and
 * pitch time, the wash type's range and history, the workspace's stability settings, and "now" rounded
 * down to the hour. Status depends on time passing even without new readings (a lag that
 * goes on, a ready time that slips into the past), so a forecast is at most an hour stale;
 * an emptied ferment is frozen at its emptying time and keeps its key.
 */
export function forecastInputKey(f: FermentInputs, rs: ReadingInput[], s: Settings, now: Date, history: readonly number[] = []): string {
  const asOf = effectiveNow(f, now);
  const bucket = f.emptiedAt ? 'emptied' : String(Math.floor(asOf.getTime() / HOUR_MS));
  const h = createHash('sha256');
  h.update(
    JSON.stringify([
      f.og,
      f.pitchedAt.getTime(),
      f.emptiedAt?.getTime() ?? null,
      f.terminalMin,
      f.terminalMax,
      s.stableDays,
      s.stableTolerance,
      bucket,
      history.map((d) => Math.round(d * 1e4)),
    ]),
  );
  for (const r of [...rs].sort((a, b) => a.id - b.id)) {
    h.update(`|${r.id},${r.takenAt.getTime()},${r.correctedSg},${r.lowConfidence ? 1 : 0},${r.ph ?? ''},${r.updatedAt.getTime()}`);
  }
  return h.digest('hex');
}

function effectiveNow(f: { emptiedAt: Date | null }, now: Date): Date {
  return f.emptiedAt && f.emptiedAt < now ? f.emptiedAt : now;
}

function compute(f: FermentInputs, rs: ReadingInput[], s: Settings, now: Date, history: number[]): Forecast {
  return forecastFerment({
    history: history.length ? history : undefined,
    readings: rs.map((r) => ({ takenAt: r.takenAt, sg: r.correctedSg, lowConfidence: r.lowConfidence, ph: r.ph })),
    og: f.og,
    pitchedAt: f.pitchedAt,
    terminalRange: { min: f.terminalMin, max: f.terminalMax },
    stableDays: s.stableDays,
    tolerance: s.stableTolerance,
    now: effectiveNow(f, now),
    seed: f.id,
  });
}

const toDate = (v: unknown): Date | null => (v == null ? null : new Date(v as string));

/** JSON payload back to a Forecast with Date objects. */
type ForecastPayload = Omit<Forecast, 'fit'> & { fit: (Omit<NonNullable<Forecast['fit']>, 'curve'> & { curve?: Array<{ t: string; sg: number }> }) | null };

function revive(payload: ForecastPayload): Forecast {
  return {
    ...payload,
    fit: payload.fit ? { ...payload.fit, curve: (payload.fit.curve ?? []).map((p) => ({ t: new Date(p.t), sg: p.sg })) } : null,
    plateauAt: toDate(payload.plateauAt),
    readyAt: toDate(payload.readyAt),
    readyP10: toDate(payload.readyP10),
    readyP90: toDate(payload.readyP90),
    ruleMetAt: toDate(payload.ruleMetAt),
    stableSince: toDate(payload.stableSince),
  };
}

function summaryOf(fermentId: number, f: Forecast): ForecastSummary {
  return {
    fermentId,
    status: f.status,
    reason: f.reason,
    readyAt: f.readyAt,
    readyP10: f.readyP10,
    readyP90: f.readyP90,
    ruleMetAt: f.ruleMetAt,
    predictedFg: f.predictedFg?.value ?? null,
    lastSg: f.lastSg,
  };
}

async function loadAll(ctx: Ctx, fermentIds: number[]) {
  const db = getDb();
  const workspaceId = ctx.ws.id;
  const settings: Settings = { stableDays: ctx.ws.stableDays, stableTolerance: ctx.ws.stableTolerance };
  if (fermentIds.length === 0) return { settings, fs: [], byFerment: new Map<number, ReadingInput[]>(), cached: new Map(), finished: [] as FinishedFerment[] };
  const fs: FermentInputs[] = await db
    .select({
      id: ferments.id,
      washTypeId: ferments.washTypeId,
      og: ferments.og,
      pitchedAt: ferments.pitchedAt,
      emptiedAt: ferments.emptiedAt,
      updatedAt: ferments.updatedAt,
      terminalMin: washTypes.terminalMin,
      terminalMax: washTypes.terminalMax,
    })
    .from(ferments)
    .innerJoin(washTypes, eq(washTypes.id, ferments.washTypeId))
    .where(and(eq(ferments.workspaceId, workspaceId), inArray(ferments.id, fermentIds)));
  const rs = await db
    .select({
      fermentId: readings.fermentId,
      id: readings.id,
      takenAt: readings.takenAt,
      correctedSg: readings.correctedSg,
      lowConfidence: readings.lowConfidence,
      ph: readings.ph,
      updatedAt: readings.updatedAt,
    })
    .from(readings)
    // A reading held for review (implausible, or a likely duplicate) feeds neither the fit nor the stability rule until accepted.
    .where(and(eq(readings.workspaceId, workspaceId), inArray(readings.fermentId, fermentIds), isNull(readings.deletedAt), isNull(readings.reviewReason)));
  const byFerment = new Map<number, ReadingInput[]>();
  for (const r of rs) {
    const list = byFerment.get(r.fermentId) ?? [];
    list.push(r);
    byFerment.set(r.fermentId, list);
  }
  const cachedRows = await db
    .select()
    .from(fermentForecasts)
    .where(and(eq(fermentForecasts.workspaceId, workspaceId), inArray(fermentForecasts.fermentId, fermentIds)));
  const cached = new Map(cachedRows.map((c) => [c.fermentId, c]));
  const types = [...new Set(fs.map((f) => f.washTypeId))];
  const finished =
    types.length === 0
      ? []
      : ((await db
          .select({
            id: ferments.id,
            washTypeId: ferments.washTypeId,
            pitchedAt: ferments.pitchedAt,
            ruleMetAt: fermentForecasts.ruleMetAt,
            emptiedAt: ferments.emptiedAt,
          })
          .from(ferments)
          .innerJoin(fermentForecasts, eq(fermentForecasts.fermentId, ferments.id))
          .where(
            and(
              eq(ferments.workspaceId, workspaceId),
              inArray(ferments.washTypeId, types),
              isNotNull(ferments.emptiedAt),
              isNotNull(fermentForecasts.ruleMetAt),
            ),
          )
          .orderBy(desc(ferments.emptiedAt))
          .limit(HISTORY_LIMIT * 10 * types.length)) as FinishedFerment[]);
  return { settings, fs, byFerment, cached, finished };
}

async function store(workspaceId: number, fermentId: number, key: string, f: Forecast, now: Date): Promise<void> {
  const db = getDb();
  const row = {
    workspaceId,
    inputKey: key,
    status: f.status,
    readyAt: f.readyAt,
    readyP10: f.readyP10,
    readyP90: f.readyP90,
    ruleMetAt: f.ruleMetAt,
    predictedFg: f.predictedFg?.value ?? null,
    payload: f as unknown,
    computedAt: now,
  };
  await db
    .insert(fermentForecasts)
    .values({ fermentId, ...row })
    .onDuplicateKeyUpdate({ set: row });
  const [last] = await db
    .select({ asOf: forecastHistory.asOf })
    .from(forecastHistory)
    .where(and(eq(forecastHistory.workspaceId, workspaceId), eq(forecastHistory.fermentId, fermentId)))
    .orderBy(desc(forecastHistory.asOf))
    .limit(1);
  if (!last || now.getTime() - last.asOf.getTime() >= HISTORY_EVERY_MS) {
    await db.insert(forecastHistory).values({
      workspaceId,
      fermentId,
      asOf: now,
      status: f.status,
      readyAt: f.readyAt,
      readyP10: f.readyP10,
      readyP90: f.readyP90,
    });
  }
}

/** Forecasts for many ferments of one workspace: cached rows when their key still matches, else recomputed and stored. */
async function forecastsFor(ctx: Ctx, fermentIds: number[], now: Date, force = false): Promise<Map<number, Forecast>> {
  const workspaceId = ctx.ws.id;
  const ids = [...new Set(fermentIds)];
  const out = new Map<number, Forecast>();
  const { settings, fs, byFerment, cached, finished } = await loadAll(ctx, ids);
  for (const f of fs) {
    const rs = byFerment.get(f.id) ?? [];
    const history = historyFor(f, finished, now);
    const key = forecastInputKey(f, rs, settings, now, history);
    const hit = cached.get(f.id);
    if (!force && hit && hit.inputKey === key) {
      out.set(f.id, revive(hit.payload));
      continue;
    }
    const forecast = compute(f, rs, settings, now, history);
    await store(workspaceId, f.id, key, forecast, now);
    if (hit?.status !== forecast.status)
      await notifyFermentStatusChange(getDb(), { workspaceId, fermentId: f.id, before: hit?.status ?? null, after: forecast.status });
    out.set(f.id, forecast);
  }
  return out;
}

export async function getForecasts(ctx: Ctx, fermentIds: number[], now: Date = new Date()): Promise<Map<number, ForecastSummary>> {
  const full = await forecastsFor(ctx, fermentIds, now);
  const out = new Map<number, ForecastSummary>();
  for (const [id, f] of full) out.set(id, summaryOf(id, f));
  return out;
}

/** The full forecast of one ferment (curve included), or null when the ferment is not in this workspace. */
export async function getForecast(ctx: Ctx, fermentId: number, now: Date = new Date()): Promise<Forecast | null> {
  return (await forecastsFor(ctx, [fermentId], now)).get(fermentId) ?? null;
}

/** Recompute after a change of readings or ferment (called after the change's transaction commits). */
export async function recomputeForecast(ctx: Ctx, fermentId: number, now: Date = new Date()): Promise<Forecast | null> {
  try {
    return (await forecastsFor(ctx, [fermentId], now, true)).get(fermentId) ?? null;
  } catch (err) {
    // The change itself is committed; a failed forecast is recomputed on the next read.
    console.error('[plateau] forecast recompute failed:', err instanceof Error ? err.message : String(err));
    return null;
  }
}

/**
 * Fill forecast_history back from each ferment's pitching to its first recorded forecast, as
 * if Plateau had been forecasting it all along: every `stepHours`, the forecast from the
 * readings taken by then and the wash type's ferments finished by then. For a distillery's
 * past ferments that arrive at once (the demo distillery), so the forecast-accuracy report
 * has something to show. Returns the number of rows written.
 */
export async function replayForecastHistory(ctx: Ctx, fermentIds: number[], now: Date = new Date(), stepHours = 12): Promise<number> {
  const workspaceId = ctx.ws.id;
  const ids = [...new Set(fermentIds)];
  if (!ids.length) return 0;
  const db = getDb();
  const firstRecorded = new Map(
    (
      await db
        .select({ id: forecastHistory.fermentId, first: sql<string | Date>`MIN(${forecastHistory.asOf})` })
        .from(forecastHistory)
        .where(and(eq(forecastHistory.workspaceId, workspaceId), inArray(forecastHistory.fermentId, ids)))
        .groupBy(forecastHistory.fermentId)
    ).map((r) => [r.id, r.first instanceof Date ? r.first.getTime() : Date.parse(`${String(r.first).replace(' ', 'T')}Z`)]),
  );
  const { settings, fs, byFerment, finished } = await loadAll(ctx, ids);
  const rows: Array<typeof forecastHistory.$inferInsert> = [];
  for (const f of fs) {
    const rs = [...(byFerment.get(f.id) ?? [])].sort((a, b) => a.takenAt.getTime() - b.takenAt.getTime());
    const end = Math.min(f.emptiedAt?.getTime() ?? now.getTime(), now.getTime(), firstRecorded.get(f.id) ?? Infinity);
    for (let at = f.pitchedAt.getTime() + stepHours * HOUR_MS; at < end; at += stepHours * HOUR_MS) {
      const asOf = new Date(at);
      const seen = rs.filter((r) => r.takenAt.getTime() <= at);
      if (!seen.length) continue;
      const fc = compute(f, seen, settings, asOf, historyFor(f, finished, asOf));
      rows.push({ workspaceId, fermentId: f.id, asOf, status: fc.status, readyAt: fc.readyAt, readyP10: fc.readyP10, readyP90: fc.readyP90 });
    }
  }
  for (let i = 0; i < rows.length; i += 500) await db.insert(forecastHistory).values(rows.slice(i, i + 500));
  return rows.length;
}

/** Forecast as JSON for the API and islands (ISO times). */
export function forecastJson(f: Forecast | null): unknown {
  return f ? JSON.parse(JSON.stringify(f)) : null;
}
