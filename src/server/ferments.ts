import { and, asc, desc, eq, isNull, isNotNull, sql } from 'drizzle-orm';
import { z } from 'zod';
import { getDb } from '../db/client';
import { fermentIngredients, fermenters, ferments, readings, washTypes } from '../db/schema';
import { parseMassToKg, parseVolumeToLitres, massUnitFor, volumeUnitFor, volumeForDisplay } from '../lib/units';
import { EMPTIED_REASONS, type EmptiedReason } from '../lib/vocabulary';
import { audit } from './audit';
import { HttpError, conflict, invalid } from './http';
import type { Ctx } from './context';
import type { Tx } from './tx';
import { CLOCK_SKEW_MS, parseWorkspaceTime } from './workspace-time';
import { getFerment, type FermentRecord } from './ferment-lookup';
import { recorrectFermentReadings } from './readings';
import { getForecasts, recomputeForecast, type ForecastSummary } from './forecasts';

// The lookup and the time parsing live in their own modules (readings.ts needs them too); re-exported here.
export { CLOCK_SKEW_MS, parseWorkspaceTime } from './workspace-time';
export { fermentForPage, fermentJson, getFerment, type FermentRecord } from './ferment-lookup';

const sgField = (what: string) =>
  z
    .number({ error: `Enter the ${what} as an SG, e.g. 1.060.` })
    .min(1, `The ${what} must be at least 1.000.`)
    .max(1.2, `The ${what} must be at most 1.200.`);

/** A ferment as a person sends it (POST /api/ferments; PATCH takes it partial). */
export const fermentInputSchema = z.object({
  code: z.string().trim().min(1, 'Give the ferment a code, e.g. FV3-0412.').max(40, 'Keep the code to 40 characters.'),
  washTypeId: z.number({ error: 'Choose a wash type.' }).int().positive('Choose a wash type.'),
  fermenterId: z.number().int().positive().nullable(),
  /** In the workspace's volume unit. */
  volume: z.number({ error: 'Enter the volume as a number.' }).positive('The volume must be above zero.').max(1_000_000),
  pitchedAt: z.string({ error: 'Give the pitch time.' }).min(1, 'Give the pitch time.').max(40),
  og: sgField('OG'),
  yeast: z.string().trim().max(120).nullable().optional(),
  notes: z.string().max(5000).nullable().optional(),
  /** Quantities in the workspace's mass unit (kg or lb). */
  ingredients: z
    .array(
      z.object({
        name: z.string().trim().max(120),
        quantity: z.number({ error: 'Enter the quantity as a number.' }).min(0).max(1_000_000),
      }),
    )
    .max(30)
    .optional(),
});

/** Marking a fermenter emptied: the wash went to the still (distilled) or was dumped. */
export const emptyInputSchema = z.object({
  reason: z.enum(EMPTIED_REASONS, { error: 'Say whether the wash went to the still or was dumped.' }),
  at: z.string().max(40).optional(),
});

/** Filters of the ferments list (GET /api/ferments). */
export const fermentListQuery = z.object({
  state: z.enum(['active', 'emptied', 'all']).optional(),
  washTypeId: z.coerce.number().int().positive().optional(),
  fermenterId: z.coerce.number().int().positive().optional(),
});

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
  emptiedReason: EmptiedReason | null;
  lastReadingAt: Date | null;
  lastSg: number | null;
  readingCount: number;
  forecast: ForecastSummary | null;
}

export interface FermentFilters {
  state?: 'active' | 'emptied' | 'all';
  washTypeId?: number;
  fermenterId?: number;
}

export async function listFerments(ctx: Ctx, filters: FermentFilters = {}, now = new Date()): Promise<FermentListRow[]> {
  const db = getDb();
  const workspaceId = ctx.ws.id;
  const conds = [eq(ferments.workspaceId, workspaceId)];
  const state = filters.state ?? 'active';
  if (state === 'active') conds.push(isNull(ferments.emptiedAt));
  if (state === 'emptied') conds.push(isNotNull(ferments.emptiedAt));
  if (filters.washTypeId) conds.push(eq(ferments.washTypeId, filters.washTypeId));
  if (filters.fermenterId) conds.push(eq(ferments.fermenterId, filters.fermenterId));
  const rows = await db
    .select({
      id: ferments.id,
      code: ferments.code,
      washTypeId: ferments.washTypeId,
      washTypeName: washTypes.name,
      fermenterId: ferments.fermenterId,
      fermenterName: fermenters.name,
      volumeLitres: ferments.volumeLitres,
      pitchedAt: ferments.pitchedAt,
      og: ferments.og,
      emptiedAt: ferments.emptiedAt,
      emptiedReason: ferments.emptiedReason,
    })
    .from(ferments)
    .innerJoin(washTypes, eq(washTypes.id, ferments.washTypeId))
    .leftJoin(fermenters, eq(fermenters.id, ferments.fermenterId))
    .where(and(...conds))
    .orderBy(desc(ferments.pitchedAt))
    .limit(500);
  if (rows.length === 0) return [];
  const [latest] = (await db.execute(sql`
    SELECT r.ferment_id AS fermentId, r.taken_at AS takenAt, r.corrected_sg AS sg, x.n AS n
    FROM ${readings} r
    JOIN (SELECT ferment_id, MAX(taken_at) AS m, COUNT(*) AS n FROM ${readings}
          WHERE workspace_id = ${workspaceId} AND deleted_at IS NULL GROUP BY ferment_id) x
      ON x.ferment_id = r.ferment_id AND x.m = r.taken_at
    WHERE r.workspace_id = ${workspaceId} AND r.deleted_at IS NULL`)) as unknown as [
    Array<{ fermentId: number; takenAt: Date | string; sg: number; n: number }>,
  ];
  const last = new Map<number, { takenAt: Date; sg: number; n: number }>();
  for (const r of latest)
    last.set(Number(r.fermentId), { takenAt: new Date(r.takenAt instanceof Date ? r.takenAt : `${r.takenAt}Z`), sg: Number(r.sg), n: Number(r.n) });
  const forecasts = await getForecasts(
    ctx,
    rows.map((r) => r.id),
    now,
  );
  return rows.map((r) => {
    const l = last.get(r.id);
    return { ...r, lastReadingAt: l?.takenAt ?? null, lastSg: l?.sg ?? null, readingCount: l?.n ?? 0, forecast: forecasts.get(r.id) ?? null };
  });
}

/** Volume in the workspace's volume unit (L or US gal), ingredient quantities in its mass unit (kg or lb). */
export type FermentInput = z.infer<typeof fermentInputSchema>;

async function checkRefs(ws: Ctx['ws'], input: Partial<FermentInput>, volumeLitres: number | undefined): Promise<void> {
  const db = getDb();
  if (input.washTypeId !== undefined) {
    const [w] = await db
      .select({ id: washTypes.id })
      .from(washTypes)
      .where(and(eq(washTypes.id, input.washTypeId), eq(washTypes.workspaceId, ws.id)))
      .limit(1);
    if (!w) throw invalid('washTypeId', 'Choose a wash type of this distillery.');
  }
  if (input.fermenterId) {
    const [f] = await db
      .select()
      .from(fermenters)
      .where(and(eq(fermenters.id, input.fermenterId), eq(fermenters.workspaceId, ws.id)))
      .limit(1);
    if (!f) throw invalid('fermenterId', 'Choose a fermenter of this distillery.');
    if (volumeLitres !== undefined && volumeLitres > f.capacityLitres * 1.0001) {
      throw invalid('volume', `${f.name} holds at most ${Math.floor(volumeForDisplay(f.capacityLitres, ws.units))} ${volumeUnitFor(ws.units)}.`);
    }
  }
}

async function checkCode(workspaceId: number, code: string, exceptId?: number): Promise<void> {
  const same = await getDb()
    .select({ id: ferments.id })
    .from(ferments)
    .where(and(eq(ferments.workspaceId, workspaceId), eq(ferments.code, code)));
  if (same.some((r) => r.id !== exceptId)) {
    throw new HttpError(409, 'conflict', `Code ${code} is already used by another ferment.`, { code: `Code ${code} is already used by another ferment.` });
  }
}

/** A fermenter holds one ferment at a time: lock its row, then look for an active ferment in it. */
async function claimFermenter(tx: Tx, workspaceId: number, fermenterId: number, exceptFermentId?: number): Promise<void> {
  await tx
    .select({ id: fermenters.id })
    .from(fermenters)
    .where(and(eq(fermenters.id, fermenterId), eq(fermenters.workspaceId, workspaceId)))
    .for('update');
  const busy = await tx
    .select({ id: ferments.id, code: ferments.code, name: fermenters.name })
    .from(ferments)
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

export async function createFerment(ctx: Ctx, input: FermentInput, now = new Date()): Promise<FermentRecord> {
  const {
    ws,
    actor: { userId },
  } = ctx;
  const volumeLitres = parseVolumeToLitres(input.volume, volumeUnitFor(ws.units));
  const pitchedAt = parseWorkspaceTime(input.pitchedAt, ws.timeZone, 'pitchedAt');
  checkPitch(pitchedAt, now);
  await checkRefs(ws, input, volumeLitres);
  await checkCode(ws.id, input.code);
  const db = getDb();
  const id = await db.transaction(async (tx) => {
    if (input.fermenterId) await claimFermenter(tx, ws.id, input.fermenterId);
    const [row] = await tx
      .insert(ferments)
      .values({
        workspaceId: ws.id,
        code: input.code,
        washTypeId: input.washTypeId,
        fermenterId: input.fermenterId,
        volumeLitres,
        pitchedAt,
        og: input.og,
        yeast: input.yeast || null,
        notes: input.notes || null,
        createdBy: userId,
      })
      .$returningId();
    const fid = row!.id;
    const ingredients = (input.ingredients ?? []).filter((i) => i.name.trim() !== '');
    if (ingredients.length) {
      await tx.insert(fermentIngredients).values(
        ingredients.map((i) => ({
          workspaceId: ws.id,
          fermentId: fid,
          name: i.name.trim(),
          quantityKg: parseMassToKg(i.quantity, massUnitFor(ws.units)),
        })),
      );
    }
    await audit(
      {
        workspaceId: ws.id,
        userId,
        action: 'ferment.create',
        entityType: 'ferment',
        entityId: fid,
        details: { code: input.code, volumeLitres, og: input.og, pitchedAt: pitchedAt.toISOString() },
      },
      tx,
    );
    return fid;
  });
  await recomputeForecast(ctx, id, now);
  return getFerment(ctx, id);
}

export async function updateFerment(ctx: Ctx, id: number, input: Partial<FermentInput>, now = new Date()): Promise<FermentRecord> {
  const {
    ws,
    actor: { userId },
  } = ctx;
  const before = await getFerment(ctx, id);
  const patch: Partial<typeof ferments.$inferInsert> = {};
  if (input.code !== undefined && input.code !== before.code) {
    await checkCode(ws.id, input.code, id);
    patch.code = input.code;
  }
  if (input.washTypeId !== undefined) patch.washTypeId = input.washTypeId;
  if (input.fermenterId !== undefined) patch.fermenterId = input.fermenterId;
  if (input.volume !== undefined) patch.volumeLitres = parseVolumeToLitres(input.volume, volumeUnitFor(ws.units));
  if (input.pitchedAt !== undefined) {
    patch.pitchedAt = parseWorkspaceTime(input.pitchedAt, ws.timeZone, 'pitchedAt');
    checkPitch(patch.pitchedAt, now);
    const [first] = await getDb()
      .select({ takenAt: readings.takenAt })
      .from(readings)
      .where(and(eq(readings.fermentId, id), eq(readings.workspaceId, ws.id), isNull(readings.deletedAt)))
      .orderBy(asc(readings.takenAt))
      .limit(1);
    if (first && first.takenAt.getTime() < patch.pitchedAt.getTime()) throw invalid('pitchedAt', 'The pitch time cannot be after the first reading.');
  }
  if (input.og !== undefined) patch.og = input.og;
  if (input.yeast !== undefined) patch.yeast = input.yeast || null;
  if (input.notes !== undefined) patch.notes = input.notes || null;
  await checkRefs(
    ws,
    { ...input, fermenterId: input.fermenterId === undefined ? before.fermenterId : input.fermenterId },
    patch.volumeLitres ?? before.volumeLitres,
  );
  const db = getDb();
  await db.transaction(async (tx) => {
    const fermenterId = input.fermenterId === undefined ? before.fermenterId : input.fermenterId;
    if (fermenterId && !before.emptiedAt && fermenterId !== before.fermenterId) await claimFermenter(tx, ws.id, fermenterId, id);
    if (Object.keys(patch).length)
      await tx
        .update(ferments)
        .set(patch)
        .where(and(eq(ferments.id, id), eq(ferments.workspaceId, ws.id)));
    if (input.ingredients !== undefined) {
      await tx.delete(fermentIngredients).where(and(eq(fermentIngredients.fermentId, id), eq(fermentIngredients.workspaceId, ws.id)));
      const ingredients = input.ingredients.filter((i) => i.name.trim() !== '');
      if (ingredients.length) {
        await tx.insert(fermentIngredients).values(
          ingredients.map((i) => ({
            workspaceId: ws.id,
            fermentId: id,
            name: i.name.trim(),
            quantityKg: parseMassToKg(i.quantity, massUnitFor(ws.units)),
          })),
        );
      }
    }
    // OG and pitch time feed the refractometer correction: re-derive the corrected values.
    if (patch.og !== undefined || patch.pitchedAt !== undefined) {
      await recorrectFermentReadings(ctx, tx, { id, og: patch.og ?? before.og, pitchedAt: patch.pitchedAt ?? before.pitchedAt });
    }
    const pick = (o: Record<string, unknown>) =>
      Object.fromEntries(Object.keys(patch).map((k) => [k, o[k] instanceof Date ? (o[k] as Date).toISOString() : o[k]]));
    await audit(
      {
        workspaceId: ws.id,
        userId,
        action: 'ferment.update',
        entityType: 'ferment',
        entityId: id,
        details: {
          before: pick(before as unknown as Record<string, unknown>),
          after: pick(patch as Record<string, unknown>),
          ingredientsChanged: input.ingredients !== undefined,
        },
      },
      tx,
    );
  });
  await recomputeForecast(ctx, id, now);
  return getFerment(ctx, id);
}

export async function emptyFerment(ctx: Ctx, id: number, input: z.infer<typeof emptyInputSchema>, now = new Date()): Promise<FermentRecord> {
  const {
    ws,
    actor: { userId },
  } = ctx;
  const before = await getFerment(ctx, id);
  if (before.emptiedAt) throw conflict(`${before.code} was already marked emptied.`);
  const at = input.at ? parseWorkspaceTime(input.at, ws.timeZone, 'at') : now;
  if (at.getTime() > now.getTime() + CLOCK_SKEW_MS) throw invalid('at', 'That time is in the future.');
  if (at.getTime() < before.pitchedAt.getTime()) throw invalid('at', 'That time is before the ferment was pitched.');
  const db = getDb();
  await db.transaction(async (tx) => {
    const res = await tx
      .update(ferments)
      .set({ emptiedAt: at, emptiedReason: input.reason })
      .where(and(eq(ferments.id, id), eq(ferments.workspaceId, ws.id), isNull(ferments.emptiedAt)));
    if ((res as unknown as [{ affectedRows: number }])[0].affectedRows !== 1) throw conflict(`${before.code} was already marked emptied.`);
    await audit(
      {
        workspaceId: ws.id,
        userId,
        action: 'ferment.empty',
        entityType: 'ferment',
        entityId: id,
        details: { reason: input.reason, at: at.toISOString(), fermenterId: before.fermenterId },
      },
      tx,
    );
  });
  await recomputeForecast(ctx, id, now);
  return getFerment(ctx, id);
}
