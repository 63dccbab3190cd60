import { and, asc, desc, eq, isNull, isNotNull, sql } from 'drizzle-orm';
import { z } from 'zod';
import { getDb } from '../db/client';
import { fermentIngredients, fermenters, ferments, readings, runFerments, runs, stills, washTypes } from '../db/schema';
import { parseMassToKg, parseVolumeToLitres, massUnitFor, volumeUnitFor, volumeForDisplay } from '../lib/units';
import { EMPTIED_REASONS, type EmptiedReason, type RunType } from '../lib/vocabulary';
import { audit } from './audit';
import { HttpError, conflict, invalid } from './http';
import type { Ctx } from './context';
import { typedNumber } from './numbers';
import type { Tx } from './tx';
import { CLOCK_SKEW_MS, parseWorkspaceTime } from './workspace-time';
import { getFerment, type FermentRecord } from './ferment-lookup';
import { recorrectFermentReadings } from './readings';
import { getForecasts, recomputeForecast, type ForecastSummary } from './forecasts';
import { releaseInstant } from './fermenter-release';

// The lookup and the time parsing live in their own modules (readings.ts needs them too); re-exported here.
export { CLOCK_SKEW_MS, parseWorkspaceTime } from './workspace-time';
export { fermentForPage, fermentJson, getFerment, type FermentRecord } from './ferment-lookup';

const sgField = (what: string) =>
  typedNumber(
    z
      .number({ error: `Enter the ${what} as an SG, e.g. 1.060.` })
      .min(1, `The ${what} must be at least 1.000.`)
      .max(1.2, `The ${what} must be at most 1.200.`),
    { grouping: false },
  );

/** A ferment as a person sends it (POST /api/ferments; PATCH takes it partial). */
export const fermentInputSchema = z.object({
  code: z.string().trim().min(1, 'Give the ferment a code, e.g. FV3-0412.').max(40, 'Keep the code to 40 characters.'),
  washTypeId: z.number({ error: 'Choose a wash type.' }).int().positive('Choose a wash type.'),
  fermenterId: z.number().int().positive().nullable(),
  /** In the workspace's volume unit. */
  volume: typedNumber(z.number({ error: 'Enter the volume as a number.' }).positive('The volume must be above zero.').max(1_000_000)),
  pitchedAt: z.string({ error: 'Give the pitch time.' }).min(1, 'Give the pitch time.').max(40),
  og: sgField('OG'),
  yeast: z.string().trim().max(120).nullable().optional(),
  notes: z.string().max(5000).nullable().optional(),
  /** Quantities in the workspace's mass unit (kg or lb). */
  ingredients: z
    .array(
      z.object({
        name: z.string().trim().max(120),
        quantity: typedNumber(z.number({ error: 'Enter the quantity as a number.' }).min(0).max(1_000_000)),
      }),
    )
    .max(30)
    .optional(),
});

const blankToUndefined = (v: unknown) => (v === null || (typeof v === 'string' && v.trim() === '') ? undefined : v);

/** The longest note kept about an emptying (the column is varchar 200). */
export const EMPTIED_NOTE_MAX = 200;

/**
 * Marking a fermenter emptied: the wash went to the still (distilled) or was dumped. A dump needs
 * a note (why); `runId` names the stripping run that took the last of it (the "Is FV3 empty?"
 * answer). Read from JSON (islands, tests) and from plain form posts alike.
 */
export const emptyInputSchema = z.object({
  reason: z.enum(EMPTIED_REASONS, { error: 'Say whether the wash went to the still or was dumped.' }),
  note: z.preprocess(
    blankToUndefined,
    z.string({ error: 'Write the note as text.' }).trim().max(EMPTIED_NOTE_MAX, `Keep the note to ${EMPTIED_NOTE_MAX} characters.`).optional(),
  ),
  runId: z.preprocess(blankToUndefined, z.coerce.number({ error: 'Name the run by its number.' }).int().positive('Name the run by its number.').optional()),
  at: z.preprocess(blankToUndefined, z.string({ error: 'Give a date and time, e.g. 2026-11-04T08:30.' }).max(40).optional()),
});
export type EmptyInput = z.infer<typeof emptyInputSchema>;

/** What the page says when a dumped wash comes without its reason. */
export const DUMP_NOTE_MESSAGE = 'Why was it dumped? Say in a few words (e.g. soured, infected, spilled).';

/** Why a plain form post to mark a fermenter emptied was sent back (the page shows the words). */
export const EMPTY_ERROR_CODES = ['note', 'reason', 'at', 'runId', 'confirm', 'conflict', 'invalid'] as const;
export type EmptyErrorCode = (typeof EMPTY_ERROR_CODES)[number];

export function emptyErrorMessage(code: string | null, fermenter: string | null): string | null {
  const vessel = fermenter ?? 'the fermenter';
  switch (code) {
    case 'note':
      return DUMP_NOTE_MESSAGE;
    case 'reason':
      return 'Say whether the wash went to the still or was dumped.';
    case 'at':
      return 'Check the time it was emptied: not in the future, not before the pitch.';
    case 'runId':
      return 'That run did not take wash from this ferment.';
    case 'confirm':
      return `Tick the box to confirm ${vessel} is empty, then mark it emptied.`;
    case 'conflict':
      return 'It was already marked emptied.';
    case 'invalid':
      return 'That could not be saved; check the form and try again.';
    default:
      return null;
  }
}

/** Where a plain form post goes back to: the ferment page, or a run's page or record page; nothing else. */
export function emptyBackPath(back: string | undefined, fermentId: number): string {
  return back && /^\/(ferments\/\d{1,15}|runs\/\d{1,15}(\/record)?)$/.test(back) ? back : `/ferments/${fermentId}`;
}

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
          WHERE workspace_id = ${workspaceId} AND deleted_at IS NULL AND review_reason IS NULL GROUP BY ferment_id) x
      ON x.ferment_id = r.ferment_id AND x.m = r.taken_at
    WHERE r.workspace_id = ${workspaceId} AND r.deleted_at IS NULL AND r.review_reason IS NULL`)) as unknown as [
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

/**
 * Mark a fermenter emptied by hand (or by answering "Is FV3 empty?" for a run): frees the
 * fermenter and freezes the ferment's forecast at that time. Checked in route order: the ferment
 * (404), already emptied (409), then the rules that need it: a dump needs a note, a run named must
 * be a stripping run of this distillery that took wash from this ferment.
 */
export async function emptyFerment(ctx: Ctx, id: number, input: EmptyInput, now = new Date()): Promise<FermentRecord> {
  const {
    ws,
    actor: { userId },
  } = ctx;
  const before = await getFerment(ctx, id);
  if (before.emptiedAt) throw conflict(`${before.code} was already marked emptied.`);
  const note = input.note ?? null;
  if (input.reason === 'dumped' && !note) throw invalid('note', DUMP_NOTE_MESSAGE);
  let runAt: Date | null = null;
  if (input.runId !== undefined) {
    if (input.reason !== 'distilled') throw invalid('runId', 'A dumped wash did not go to a run; leave the run out.');
    const [run] = await getDb()
      .select({ id: runs.id, type: runs.type, status: runs.status, startedAt: runs.startedAt, finishedAt: runs.finishedAt })
      .from(runs)
      .innerJoin(runFerments, and(eq(runFerments.runId, runs.id), eq(runFerments.workspaceId, runs.workspaceId), eq(runFerments.fermentId, id)))
      .where(and(eq(runs.id, input.runId), eq(runs.workspaceId, ws.id)))
      .limit(1);
    if (!run || run.type !== 'stripping') throw invalid('runId', `That is not a stripping run that took wash from ${before.code}.`);
    runAt = releaseInstant(run, ws.releaseFermentersOn);
  }
  const at = input.at ? parseWorkspaceTime(input.at, ws.timeZone, 'at') : (runAt ?? now);
  if (at.getTime() > now.getTime() + CLOCK_SKEW_MS) throw invalid('at', 'That time is in the future.');
  if (at.getTime() < before.pitchedAt.getTime()) throw invalid('at', 'That time is before the ferment was pitched.');
  const db = getDb();
  await db.transaction(async (tx) => {
    const res = await tx
      .update(ferments)
      .set({ emptiedAt: at, emptiedReason: input.reason, emptiedByRunId: input.runId ?? null, emptiedNote: note })
      .where(and(eq(ferments.id, id), eq(ferments.workspaceId, ws.id), isNull(ferments.emptiedAt)));
    if ((res as unknown as [{ affectedRows: number }])[0].affectedRows !== 1) throw conflict(`${before.code} was already marked emptied.`);
    await audit(
      {
        workspaceId: ws.id,
        userId,
        action: 'ferment.empty',
        entityType: 'ferment',
        entityId: id,
        details: { reason: input.reason, at: at.toISOString(), fermenterId: before.fermenterId, runId: input.runId ?? null, note, by: 'hand' },
        ip: ctx.actor.ip,
      },
      tx,
    );
  });
  await recomputeForecast(ctx, id, now);
  return getFerment(ctx, id);
}

/** How a ferment was emptied: by which run (with its type and still) and the person's note. */
export interface Emptying {
  byRun: { id: number; type: RunType; stillName: string } | null;
  note: string | null;
}

export async function emptyingOf(ctx: Ctx, fermentId: number): Promise<Emptying> {
  const [row] = await getDb()
    .select({ runId: ferments.emptiedByRunId, note: ferments.emptiedNote, type: runs.type, stillName: stills.name })
    .from(ferments)
    .leftJoin(runs, and(eq(runs.id, ferments.emptiedByRunId), eq(runs.workspaceId, ferments.workspaceId)))
    .leftJoin(stills, eq(stills.id, runs.stillId))
    .where(and(eq(ferments.id, fermentId), eq(ferments.workspaceId, ctx.ws.id)))
    .limit(1);
  if (!row) return { byRun: null, note: null };
  return {
    byRun: row.runId !== null && row.type !== null ? { id: row.runId, type: row.type, stillName: row.stillName ?? 'a still' } : null,
    note: row.note,
  };
}
