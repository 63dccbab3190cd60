import { and, asc, desc, eq, isNull, isNotNull, sql } from 'drizzle-orm';
import { getDb } from '../db/client';
import { fermentIngredients, fermenters, ferments, readings, washTypes } from '../db/schema';
import { parseMassToKg, parseVolumeToLitres, massUnitFor, volumeUnitFor } from '../lib/units';
import { resolveLocalTime } from '../lib/csv';
import { audit } from './audit';
import { HttpError, conflict, invalid, notFound } from './http';
import type { WorkspaceSettings } from './workspaces';
import { recorrectFermentReadings } from './readings';
import { getForecasts, recomputeForecast, type ForecastSummary } from './forecasts';

/** Clocks on phones and loggers drift: times up to this far ahead of the server are accepted. */
export const CLOCK_SKEW_MS = 5 * 60_000;

const LOCAL_TIME = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2}))?$/;

/**
 * A time from a form or API body: ISO 8601 with a zone is taken as written; a wall-clock
 * time without a zone ("2026-11-04T08:30", as a datetime-local input sends) is read in the
 * distillery's time zone.
 */
export function parseWorkspaceTime(text: string, timeZone: string, field: string): Date {
  const m = LOCAL_TIME.exec(text.trim());
  if (m) {
    const r = resolveLocalTime({ year: +m[1]!, month: +m[2]!, day: +m[3]!, hour: +m[4]!, minute: +m[5]!, second: m[6] ? +m[6] : 0, millisecond: 0 }, timeZone);
    if (!r.ok) throw invalid(field, `${text} does not exist in ${timeZone} (the clocks went forward).`);
    return r.instant;
  }
  const d = new Date(text);
  if (!/^\d{4}-\d{2}-\d{2}T/.test(text) || Number.isNaN(d.getTime())) throw invalid(field, 'Give a date and time, e.g. 2026-11-04T08:30.');
  return d;
}

export interface FermentRecord {
  id: number;
  code: string;
  washTypeId: number;
  washTypeName: string;
  category: string;
  terminalMin: number;
  terminalMax: number;
  fermenterId: number | null;
  fermenterName: string | null;
  fermenterCapacityLitres: number | null;
  volumeLitres: number;
  pitchedAt: Date;
  og: number;
  yeast: string | null;
  notes: string | null;
  emptiedAt: Date | null;
  emptiedReason: 'distilled' | 'dumped' | null;
  createdAt: Date;
  updatedAt: Date;
  ingredients: Array<{ id: number; name: string; quantityKg: number }>;
}

const fermentColumns = {
  id: ferments.id, code: ferments.code, washTypeId: ferments.washTypeId, washTypeName: washTypes.name, category: washTypes.category,
  terminalMin: washTypes.terminalMin, terminalMax: washTypes.terminalMax, fermenterId: ferments.fermenterId, fermenterName: fermenters.name,
  fermenterCapacityLitres: fermenters.capacityLitres, volumeLitres: ferments.volumeLitres, pitchedAt: ferments.pitchedAt, og: ferments.og,
  yeast: ferments.yeast, notes: ferments.notes, emptiedAt: ferments.emptiedAt, emptiedReason: ferments.emptiedReason,
  createdAt: ferments.createdAt, updatedAt: ferments.updatedAt,
};

/** One ferment of the workspace, or 404. */
/** For pages: the ferment named by a route param, or null when it is not this workspace's (render the 404). */
export async function fermentForPage(workspaceId: number, param: string | undefined): Promise<FermentRecord | null> {
  const id = Number(param);
  if (!Number.isSafeInteger(id) || id <= 0) return null;
  try {
    return await getFerment(workspaceId, id);
  } catch (e) {
    if (e instanceof HttpError && e.status === 404) return null;
    throw e;
  }
}

export async function getFerment(workspaceId: number, id: number): Promise<FermentRecord> {
  const db = getDb();
  const [row] = await db.select(fermentColumns).from(ferments)
    .innerJoin(washTypes, eq(washTypes.id, ferments.washTypeId))
    .leftJoin(fermenters, eq(fermenters.id, ferments.fermenterId))
    .where(and(eq(ferments.id, id), eq(ferments.workspaceId, workspaceId))).limit(1);
  if (!row) throw notFound('No such ferment.');
  const ingredients = await db.select({ id: fermentIngredients.id, name: fermentIngredients.name, quantityKg: fermentIngredients.quantityKg })
    .from(fermentIngredients).where(and(eq(fermentIngredients.fermentId, id), eq(fermentIngredients.workspaceId, workspaceId))).orderBy(asc(fermentIngredients.id));
  return { ...row, ingredients };
}

export interface FermentListRow {
  id: number;
  code: string;
  washTypeId: number;
  washTypeName: string;
  fermenterId: number | null;
  fermenterName: string | null;
  volumeLitres: number;
  pitchedAt: Date;
  og: number;
  emptiedAt: Date | null;
  emptiedReason: 'distilled' | 'dumped' | null;
  lastReadingAt: Date | null;
  lastSg: number | null;
  readingCount: number;
  forecast: ForecastSummary | null;
}

export interface FermentFilters { state?: 'active' | 'emptied' | 'all'; washTypeId?: number; fermenterId?: number }

export async function listFerments(workspaceId: number, filters: FermentFilters = {}, now = new Date()): Promise<FermentListRow[]> {
  const db = getDb();
  const conds = [eq(ferments.workspaceId, workspaceId)];
  const state = filters.state ?? 'active';
  if (state === 'active') conds.push(isNull(ferments.emptiedAt));
  if (state === 'emptied') conds.push(isNotNull(ferments.emptiedAt));
  if (filters.washTypeId) conds.push(eq(ferments.washTypeId, filters.washTypeId));
  if (filters.fermenterId) conds.push(eq(ferments.fermenterId, filters.fermenterId));
  const rows = await db.select({
    id: ferments.id, code: ferments.code, washTypeId: ferments.washTypeId, washTypeName: washTypes.name, fermenterId: ferments.fermenterId,
    fermenterName: fermenters.name, volumeLitres: ferments.volumeLitres, pitchedAt: ferments.pitchedAt, og: ferments.og,
    emptiedAt: ferments.emptiedAt, emptiedReason: ferments.emptiedReason,
  }).from(ferments)
    .innerJoin(washTypes, eq(washTypes.id, ferments.washTypeId))
    .leftJoin(fermenters, eq(fermenters.id, ferments.fermenterId))
    .where(and(...conds)).orderBy(desc(ferments.pitchedAt)).limit(500);
  if (rows.length === 0) return [];
  const [latest] = await db.execute(sql`
    SELECT r.ferment_id AS fermentId, r.taken_at AS takenAt, r.corrected_sg AS sg, x.n AS n
    FROM ${readings} r
    JOIN (SELECT ferment_id, MAX(taken_at) AS m, COUNT(*) AS n FROM ${readings}
          WHERE workspace_id = ${workspaceId} AND deleted_at IS NULL GROUP BY ferment_id) x
      ON x.ferment_id = r.ferment_id AND x.m = r.taken_at
    WHERE r.workspace_id = ${workspaceId} AND r.deleted_at IS NULL`) as unknown as [Array<{ fermentId: number; takenAt: Date | string; sg: number; n: number }>];
  const last = new Map<number, { takenAt: Date; sg: number; n: number }>();
  for (const r of latest) last.set(Number(r.fermentId), { takenAt: new Date(r.takenAt instanceof Date ? r.takenAt : `${r.takenAt}Z`), sg: Number(r.sg), n: Number(r.n) });
  const forecasts = await getForecasts(workspaceId, rows.map((r) => r.id), now);
  return rows.map((r) => {
    const l = last.get(r.id);
    return { ...r, lastReadingAt: l?.takenAt ?? null, lastSg: l?.sg ?? null, readingCount: l?.n ?? 0, forecast: forecasts.get(r.id) ?? null };
  });
}

export interface FermentInput {
  code: string;
  washTypeId: number;
  fermenterId: number | null;
  /** In the workspace's volume unit (L or US gal). */
  volume: number;
  pitchedAt: string;
  og: number;
  yeast?: string | null;
  notes?: string | null;
  /** Quantities in the workspace's mass unit (kg or lb). */
  ingredients?: Array<{ name: string; quantity: number }>;
}

async function checkRefs(ws: WorkspaceSettings, input: Partial<FermentInput>, volumeLitres: number | undefined): Promise<void> {
  const db = getDb();
  if (input.washTypeId !== undefined) {
    const [w] = await db.select({ id: washTypes.id }).from(washTypes).where(and(eq(washTypes.id, input.washTypeId), eq(washTypes.workspaceId, ws.id))).limit(1);
    if (!w) throw invalid('washTypeId', 'Choose a wash type of this distillery.');
  }
  if (input.fermenterId) {
    const [f] = await db.select().from(fermenters).where(and(eq(fermenters.id, input.fermenterId), eq(fermenters.workspaceId, ws.id))).limit(1);
    if (!f) throw invalid('fermenterId', 'Choose a fermenter of this distillery.');
    if (volumeLitres !== undefined && volumeLitres > f.capacityLitres * 1.0001) {
      throw invalid('volume', `${f.name} holds at most ${Math.floor(ws.units === 'us' ? f.capacityLitres / 3.785411784 : f.capacityLitres)} ${volumeUnitFor(ws.units)}.`);
    }
  }
}

async function checkCode(workspaceId: number, code: string, exceptId?: number): Promise<void> {
  const same = await getDb().select({ id: ferments.id }).from(ferments).where(and(eq(ferments.workspaceId, workspaceId), eq(ferments.code, code)));
  if (same.some((r) => r.id !== exceptId)) {
    throw new HttpError(409, 'conflict', `Code ${code} is already used by another ferment.`, { code: `Code ${code} is already used by another ferment.` });
  }
}

type Tx = Parameters<Parameters<ReturnType<typeof getDb>['transaction']>[0]>[0];

/** A fermenter holds one ferment at a time: lock its row, then look for an active ferment in it. */
async function claimFermenter(tx: Tx, workspaceId: number, fermenterId: number, exceptFermentId?: number): Promise<void> {
  await tx.select({ id: fermenters.id }).from(fermenters).where(and(eq(fermenters.id, fermenterId), eq(fermenters.workspaceId, workspaceId))).for('update');
  const busy = await tx.select({ id: ferments.id, code: ferments.code, name: fermenters.name }).from(ferments)
    .innerJoin(fermenters, eq(fermenters.id, ferments.fermenterId))
    .where(and(eq(ferments.workspaceId, workspaceId), eq(ferments.fermenterId, fermenterId), isNull(ferments.emptiedAt)));
  const other = busy.find((b) => b.id !== exceptFermentId);
  if (other) {
    const msg = `${other.name} already holds ${other.code}; mark it emptied first or choose a free fermenter.`;
    throw new HttpError(409, 'fermenter_busy', msg, { fermenterId: msg });
  }
}

function checkPitch(pitchedAt: Date, now: Date): void {
  if (pitchedAt.getTime() > now.getTime() + CLOCK_SKEW_MS) throw invalid('pitchedAt', 'The pitch time is in the future.');
}

export async function createFerment(ws: WorkspaceSettings, userId: number, input: FermentInput, now = new Date()): Promise<FermentRecord> {
  const volumeLitres = parseVolumeToLitres(input.volume, volumeUnitFor(ws.units));
  const pitchedAt = parseWorkspaceTime(input.pitchedAt, ws.timeZone, 'pitchedAt');
  checkPitch(pitchedAt, now);
  await checkRefs(ws, input, volumeLitres);
  await checkCode(ws.id, input.code);
  const db = getDb();
  const id = await db.transaction(async (tx) => {
    if (input.fermenterId) await claimFermenter(tx, ws.id, input.fermenterId);
    const [row] = await tx.insert(ferments).values({
      workspaceId: ws.id, code: input.code, washTypeId: input.washTypeId, fermenterId: input.fermenterId, volumeLitres, pitchedAt,
      og: input.og, yeast: input.yeast || null, notes: input.notes || null, createdBy: userId,
    }).$returningId();
    const fid = row!.id;
    const ingredients = (input.ingredients ?? []).filter((i) => i.name.trim() !== '');
    if (ingredients.length) {
      await tx.insert(fermentIngredients).values(ingredients.map((i) => ({
        workspaceId: ws.id, fermentId: fid, name: i.name.trim(), quantityKg: parseMassToKg(i.quantity, massUnitFor(ws.units)),
      })));
    }
    await audit({ workspaceId: ws.id, userId, action: 'ferment.create', entityType: 'ferment', entityId: fid, details: { code: input.code, volumeLitres, og: input.og, pitchedAt: pitchedAt.toISOString() } }, tx);
    return fid;
  });
  await recomputeForecast(ws.id, id, now);
  return getFerment(ws.id, id);
}

export async function updateFerment(ws: WorkspaceSettings, userId: number, id: number, input: Partial<FermentInput>, now = new Date()): Promise<FermentRecord> {
  const before = await getFerment(ws.id, id);
  const patch: Partial<typeof ferments.$inferInsert> = {};
  if (input.code !== undefined && input.code !== before.code) { await checkCode(ws.id, input.code, id); patch.code = input.code; }
  if (input.washTypeId !== undefined) patch.washTypeId = input.washTypeId;
  if (input.fermenterId !== undefined) patch.fermenterId = input.fermenterId;
  if (input.volume !== undefined) patch.volumeLitres = parseVolumeToLitres(input.volume, volumeUnitFor(ws.units));
  if (input.pitchedAt !== undefined) {
    patch.pitchedAt = parseWorkspaceTime(input.pitchedAt, ws.timeZone, 'pitchedAt');
    checkPitch(patch.pitchedAt, now);
    const [first] = await getDb().select({ takenAt: readings.takenAt }).from(readings)
      .where(and(eq(readings.fermentId, id), eq(readings.workspaceId, ws.id), isNull(readings.deletedAt))).orderBy(asc(readings.takenAt)).limit(1);
    if (first && first.takenAt.getTime() < patch.pitchedAt.getTime()) throw invalid('pitchedAt', 'The pitch time cannot be after the first reading.');
  }
  if (input.og !== undefined) patch.og = input.og;
  if (input.yeast !== undefined) patch.yeast = input.yeast || null;
  if (input.notes !== undefined) patch.notes = input.notes || null;
  await checkRefs(ws, { ...input, fermenterId: input.fermenterId === undefined ? before.fermenterId : input.fermenterId }, patch.volumeLitres ?? before.volumeLitres);
  const db = getDb();
  await db.transaction(async (tx) => {
    const fermenterId = input.fermenterId === undefined ? before.fermenterId : input.fermenterId;
    if (fermenterId && !before.emptiedAt && fermenterId !== before.fermenterId) await claimFermenter(tx, ws.id, fermenterId, id);
    if (Object.keys(patch).length) await tx.update(ferments).set(patch).where(and(eq(ferments.id, id), eq(ferments.workspaceId, ws.id)));
    if (input.ingredients !== undefined) {
      await tx.delete(fermentIngredients).where(and(eq(fermentIngredients.fermentId, id), eq(fermentIngredients.workspaceId, ws.id)));
      const ingredients = input.ingredients.filter((i) => i.name.trim() !== '');
      if (ingredients.length) {
        await tx.insert(fermentIngredients).values(ingredients.map((i) => ({
          workspaceId: ws.id, fermentId: id, name: i.name.trim(), quantityKg: parseMassToKg(i.quantity, massUnitFor(ws.units)),
        })));
      }
    }
    // OG and pitch time feed the refractometer correction: re-derive the corrected values.
    if (patch.og !== undefined || patch.pitchedAt !== undefined) {
      await recorrectFermentReadings(tx, ws, userId, { id, og: patch.og ?? before.og, pitchedAt: patch.pitchedAt ?? before.pitchedAt });
    }
    const pick = (o: Record<string, unknown>) => Object.fromEntries(Object.keys(patch).map((k) => [k, o[k] instanceof Date ? (o[k] as Date).toISOString() : o[k]]));
    await audit({
      workspaceId: ws.id, userId, action: 'ferment.update', entityType: 'ferment', entityId: id,
      details: { before: pick(before as unknown as Record<string, unknown>), after: pick(patch as Record<string, unknown>), ingredientsChanged: input.ingredients !== undefined },
    }, tx);
  });
  await recomputeForecast(ws.id, id, now);
  return getFerment(ws.id, id);
}

export async function emptyFerment(ws: WorkspaceSettings, userId: number, id: number, input: { reason: 'distilled' | 'dumped'; at?: string }, now = new Date()): Promise<FermentRecord> {
  const before = await getFerment(ws.id, id);
  if (before.emptiedAt) throw conflict(`${before.code} was already marked emptied.`);
  const at = input.at ? parseWorkspaceTime(input.at, ws.timeZone, 'at') : now;
  if (at.getTime() > now.getTime() + CLOCK_SKEW_MS) throw invalid('at', 'That time is in the future.');
  if (at.getTime() < before.pitchedAt.getTime()) throw invalid('at', 'That time is before the ferment was pitched.');
  const db = getDb();
  await db.transaction(async (tx) => {
    const res = await tx.update(ferments).set({ emptiedAt: at, emptiedReason: input.reason })
      .where(and(eq(ferments.id, id), eq(ferments.workspaceId, ws.id), isNull(ferments.emptiedAt)));
    if ((res as unknown as [{ affectedRows: number }])[0].affectedRows !== 1) throw conflict(`${before.code} was already marked emptied.`);
    await audit({ workspaceId: ws.id, userId, action: 'ferment.empty', entityType: 'ferment', entityId: id, details: { reason: input.reason, at: at.toISOString(), fermenterId: before.fermenterId } }, tx);
  });
  await recomputeForecast(ws.id, id, now);
  return getFerment(ws.id, id);
}

/** Ferment as JSON in the workspace's display units. */
export function fermentJson(f: FermentRecord): Record<string, unknown> {
  return { ...f, pitchedAt: f.pitchedAt.toISOString(), emptiedAt: f.emptiedAt?.toISOString() ?? null };
}
