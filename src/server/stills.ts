/** Stills and their closures: the manager's settings the board plans against. */
import { and, asc, eq, inArray } from 'drizzle-orm';
import { z } from 'zod';
import { getDb } from '../db/client';
import { runs, stillClosures, stills } from '../db/schema';
import { RUN_TYPES, STILL_KINDS } from '../lib/vocabulary';
import type { BoardStill } from '../lib/board';
import { addDaysYmd, formatYmd, isPlanningDate, wallClock, type RunType } from '../lib/schedule';
import { audit } from './audit';
import { invalid, notFound } from './http';
import type { Ctx } from './context';
import { typedNumber } from './numbers';

const hm = z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$|^24:00$/, 'Use HH:MM (00:00 to 24:00).');
const ymd = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Use a date like 2026-12-24.')
  .refine(isPlanningDate, 'Use a real date, like 2026-12-24.');

/**
 * One opening on a weekday. A closing time at or before the opening time closes the next
 * day (an overnight shift, e.g. 22:00–06:00); the same time for both is refused, since it
 * could mean no hours or all of them (use 00:00–24:00 for round the clock).
 */
export const operatingHoursSchema = z
  .array(
    z
      .object({
        weekday: z.number().int().min(0).max(6),
        open: hm.refine((v) => v !== '24:00', 'Opening time runs from 00:00 to 23:59.'),
        close: hm,
      })
      .refine((h) => h.open !== h.close && !(h.open === '00:00' && h.close === '00:00'), {
        message: 'Opening and closing time are the same: use 00:00 to 24:00 for round the clock, or a closing time after midnight for a night shift.',
        path: ['close'],
      }),
  )
  .max(21);

export const typicalMinutesSchema = z.object(
  Object.fromEntries(
    RUN_TYPES.map((t) => [
      t,
      z
        .number()
        .int()
        .min(0)
        .max(7 * 24 * 60),
    ]),
  ) as Record<RunType, z.ZodNumber>,
);

export const stillInputSchema = z.object({
  name: z.string().trim().min(1, 'Give the still a name.').max(80),
  kind: z.enum(STILL_KINDS),
  capacityLitres: typedNumber(z.number().positive('The working charge must be above zero.').max(1_000_000)),
  heatingKw: typedNumber(z.number().positive('Heating power must be above zero.').max(100_000)),
  operatingHours: operatingHoursSchema,
  cleaningAfterRunMinutes: typedNumber(
    z
      .number()
      .int()
      .min(0)
      .max(24 * 60),
  ),
  typicalMinutes: typicalMinutesSchema,
  active: z.boolean().optional(),
});
export type StillInput = z.infer<typeof stillInputSchema>;

export const closureInputSchema = z
  .object({
    /** Null = the whole distillery. */
    stillId: z.number().int().positive().nullable(),
    startsOn: ymd,
    endsOn: ymd,
    reason: z.string().trim().min(1, 'Say why (holiday, maintenance...).').max(160),
  })
  .refine((c) => c.endsOn >= c.startsOn, { message: 'The last day must be on or after the first.', path: ['endsOn'] });
export type ClosureInput = z.infer<typeof closureInputSchema>;

/** Board order of the stills, top to bottom (PUT /api/stills/order). */
export const stillOrderSchema = z.object({ ids: z.array(z.number().int().positive()).min(1).max(200) });

export interface StillRow extends BoardStill {
  active: boolean;
}

export interface ClosureRow {
  id: number;
  stillId: number | null;
  startsOn: string;
  endsOn: string;
  reason: string;
}

const DEFAULT_TYPICAL: Record<RunType, number> = { stripping: 240, spirit: 420, redistillation: 360, cleaning: 120, maintenance: 240 };

function typicalOf(raw: Partial<Record<RunType, number>> | null | undefined): Record<RunType, number> {
  return { ...DEFAULT_TYPICAL, ...(raw ?? {}) };
}

/** Stills of a workspace in board order, each with its own and the distillery-wide closures. */
export async function listStills(ctx: Ctx, opts: { includeInactive?: boolean } = {}): Promise<StillRow[]> {
  const db = getDb();
  const workspaceId = ctx.ws.id;
  const [rows, closures] = await Promise.all([
    db
      .select()
      .from(stills)
      .where(opts.includeInactive ? eq(stills.workspaceId, workspaceId) : and(eq(stills.workspaceId, workspaceId), eq(stills.active, true)))
      .orderBy(asc(stills.position), asc(stills.id)),
    listClosures(ctx),
  ]);
  return rows.map((s) => ({
    id: s.id,
    name: s.name,
    kind: s.kind,
    capacityLitres: s.capacityLitres,
    heatingKw: s.heatingKw,
    operatingHours: (s.operatingHours ?? []) as BoardStill['operatingHours'],
    closures: closures.filter((c) => c.stillId === null || c.stillId === s.id).map(({ startsOn, endsOn, reason }) => ({ startsOn, endsOn, reason })),
    cleaningAfterRunMinutes: s.cleaningAfterRunMinutes,
    typicalMinutes: typicalOf(s.typicalMinutes),
    position: s.position,
    active: s.active,
  }));
}

export async function listClosures(ctx: Ctx): Promise<ClosureRow[]> {
  const workspaceId = ctx.ws.id;
  return getDb()
    .select({
      id: stillClosures.id,
      stillId: stillClosures.stillId,
      startsOn: stillClosures.startsOn,
      endsOn: stillClosures.endsOn,
      reason: stillClosures.reason,
    })
    .from(stillClosures)
    .where(eq(stillClosures.workspaceId, workspaceId))
    .orderBy(asc(stillClosures.startsOn), asc(stillClosures.id));
}

export async function getStill(ctx: Ctx, id: number): Promise<StillRow> {
  const all = await listStills(ctx, { includeInactive: true });
  const still = all.find((s) => s.id === id);
  if (!still) throw notFound('No such still in this distillery.');
  return still;
}

async function assertUniqueName(workspaceId: number, name: string, exceptId?: number): Promise<void> {
  const same = await getDb()
    .select({ id: stills.id })
    .from(stills)
    .where(and(eq(stills.workspaceId, workspaceId), eq(stills.name, name)));
  if (same.some((r) => r.id !== exceptId)) throw invalid('name', `A still called "${name}" already exists.`);
}

export async function createStill(ctx: Ctx, input: StillInput): Promise<StillRow> {
  const {
    ws: { id: workspaceId },
    actor: { userId },
  } = ctx;
  await assertUniqueName(workspaceId, input.name);
  const db = getDb();
  const id = await db.transaction(async (tx) => {
    const existing = await tx.select({ position: stills.position }).from(stills).where(eq(stills.workspaceId, workspaceId));
    const position = existing.reduce((m, r) => Math.max(m, r.position + 1), 0);
    const [row] = await tx
      .insert(stills)
      .values({ workspaceId, ...input, active: input.active ?? true, position })
      .$returningId();
    await audit({ workspaceId, userId, action: 'still.create', entityType: 'still', entityId: row!.id, details: { name: input.name } }, tx);
    return row!.id;
  });
  return getStill(ctx, id);
}

export async function updateStill(ctx: Ctx, id: number, input: Partial<StillInput>): Promise<StillRow> {
  const {
    ws: { id: workspaceId },
    actor: { userId },
  } = ctx;
  const before = await getStill(ctx, id);
  if (input.name !== undefined) await assertUniqueName(workspaceId, input.name, id);
  await getDb().transaction(async (tx) => {
    if (Object.keys(input).length)
      await tx
        .update(stills)
        .set(input)
        .where(and(eq(stills.id, id), eq(stills.workspaceId, workspaceId)));
    await audit(
      { workspaceId, userId, action: 'still.update', entityType: 'still', entityId: id, details: { name: before.name, changed: Object.keys(input) } },
      tx,
    );
  });
  return getStill(ctx, id);
}

/** Remove a still: deleted outright when it never had runs, else retired (hidden from the board, its history kept). */
export async function removeStill(ctx: Ctx, id: number): Promise<{ removed: 'deleted' | 'retired' }> {
  const {
    ws: { id: workspaceId },
    actor: { userId },
  } = ctx;
  const still = await getStill(ctx, id);
  const db = getDb();
  return db.transaction(async (tx) => {
    const [used] = await tx
      .select({ id: runs.id })
      .from(runs)
      .where(and(eq(runs.workspaceId, workspaceId), eq(runs.stillId, id)))
      .limit(1);
    if (used) {
      await tx
        .update(stills)
        .set({ active: false })
        .where(and(eq(stills.id, id), eq(stills.workspaceId, workspaceId)));
      await audit({ workspaceId, userId, action: 'still.retire', entityType: 'still', entityId: id, details: { name: still.name } }, tx);
      return { removed: 'retired' as const };
    }
    await tx.delete(stills).where(and(eq(stills.id, id), eq(stills.workspaceId, workspaceId)));
    await audit({ workspaceId, userId, action: 'still.delete', entityType: 'still', entityId: id, details: { name: still.name } }, tx);
    return { removed: 'deleted' as const };
  });
}

/** Board order: the stills named in `ids` take positions 0, 1, 2 ... in that order. */
export async function setStillOrder(ctx: Ctx, ids: number[]): Promise<StillRow[]> {
  const {
    ws: { id: workspaceId },
    actor: { userId },
  } = ctx;
  const db = getDb();
  const mine = await db
    .select({ id: stills.id })
    .from(stills)
    .where(and(eq(stills.workspaceId, workspaceId), inArray(stills.id, ids.length ? ids : [0])));
  if (mine.length !== new Set(ids).size) throw notFound('No such still in this distillery.');
  await db.transaction(async (tx) => {
    for (const [position, id] of ids.entries()) {
      await tx
        .update(stills)
        .set({ position })
        .where(and(eq(stills.id, id), eq(stills.workspaceId, workspaceId)));
    }
    await audit({ workspaceId, userId, action: 'still.reorder', entityType: 'still', details: { order: ids } }, tx);
  });
  return listStills(ctx, { includeInactive: true });
}

/** How far back a closure may start: history for reports, not decades. */
export const CLOSURE_PAST_DAYS = 2 * 366;

/** Refuse (400, naming the field) a closure ending beyond the booking horizon or starting absurdly far back. */
export function assertClosureDates(ctx: Ctx, input: Pick<ClosureInput, 'startsOn' | 'endsOn'>, now = new Date()): void {
  const today = wallClock(now, ctx.ws.timeZone).ymd;
  const latest = addDaysYmd(today, ctx.ws.bookingHorizonDays);
  if (input.endsOn > latest) {
    throw invalid(
      'endsOn',
      `A closure can end at most ${ctx.ws.bookingHorizonDays} days ahead, by ${longYmd(latest)} (the booking horizon in the distillery settings).`,
    );
  }
  const earliest = addDaysYmd(today, -CLOSURE_PAST_DAYS);
  if (input.startsOn < earliest) throw invalid('startsOn', `A closure can start at most two years back, from ${longYmd(earliest)}.`);
}

const longYmd = (ymd: string) => `${formatYmd(ymd)} ${ymd.slice(0, 4)}`;

export async function addClosure(ctx: Ctx, input: ClosureInput): Promise<ClosureRow> {
  const {
    ws: { id: workspaceId },
    actor: { userId },
  } = ctx;
  assertClosureDates(ctx, input);
  if (input.stillId !== null) await getStill(ctx, input.stillId);
  const db = getDb();
  const id = await db.transaction(async (tx) => {
    const [row] = await tx
      .insert(stillClosures)
      .values({ workspaceId, ...input })
      .$returningId();
    await audit({ workspaceId, userId, action: 'still.closure.add', entityType: 'still_closure', entityId: row!.id, details: { ...input } }, tx);
    return row!.id;
  });
  return { id, ...input };
}

export async function removeClosure(ctx: Ctx, id: number): Promise<void> {
  const {
    ws: { id: workspaceId },
    actor: { userId },
  } = ctx;
  const db = getDb();
  const [row] = await db
    .select()
    .from(stillClosures)
    .where(and(eq(stillClosures.id, id), eq(stillClosures.workspaceId, workspaceId)));
  if (!row) throw notFound('No such closure in this distillery.');
  await db.transaction(async (tx) => {
    await tx.delete(stillClosures).where(and(eq(stillClosures.id, id), eq(stillClosures.workspaceId, workspaceId)));
    await audit(
      {
        workspaceId,
        userId,
        action: 'still.closure.remove',
        entityType: 'still_closure',
        entityId: id,
        details: { startsOn: row.startsOn, endsOn: row.endsOn, reason: row.reason },
      },
      tx,
    );
  });
}
