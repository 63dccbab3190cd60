/**
 * Runs on the stills: booking, moving, resizing, cancelling, starting and finishing.
 *
 * Every change names the run's version (optimistic locking). The overlap check and the
 * write happen in ONE transaction that first locks the still rows concerned
 * (SELECT ... FOR UPDATE) and then bumps their updated_at: row locks serialise writers on
 * one MariaDB node, and the bumped row makes a second writer on another Galera node fail
 * certification (error 1213) instead of committing an overlap; that error is retried.
 */
import { and, asc, eq, gt, inArray, lt, ne, sql } from 'drizzle-orm';
import { z } from 'zod';
import { getDb } from '../db/client';
import { memberships, ferments, runFeeds, runFerments, runs, stills } from '../db/schema';
import { BOOKABLE_RUN_STATUSES, RUN_TYPES } from '../lib/vocabulary';
import { defaultRunMinutes, dehydrateRun, type BoardRun, type BoardRunJson } from '../lib/board';
import { correctionProblems, findOverlap, finishQuestion, runChargeLitres, type RunType } from '../lib/schedule';
import { audit } from './audit';
import { conflict, HttpError, invalid, notFound } from './http';
import type { Ctx } from './context';
import { selectRun, type Reader, type RunChange } from './run-query';

export type { RunChange };
import { getStill } from './stills';
import { notifyRunChanged } from './notify';
import { recordRiskAtBooking } from './run-risk';
import { releaseFermentersForRun, retimeReleasesForRun } from './fermenter-release';

import { inRetriedTransaction, type Tx } from './tx';

// Moved to tx.ts; re-exported so importers of runs.ts keep working.
export { inRetriedTransaction, type Tx };

const MINUTE_MS = 60_000;
const MAX_RUN_MINUTES = 7 * 24 * 60;
const isoDate = z.iso.datetime({ offset: true, message: 'Use an ISO date-time with its offset.' }).transform((s) => new Date(s));

const chargeLines = z
  .array(
    z.object({
      fermentId: z.number().int().positive(),
      litres: z
        .number({ error: 'Say how many litres of this wash go into the charge, or remove the wash from the run.' })
        .positive('Say how many litres of this wash go into the charge, or remove the wash from the run.')
        .max(1_000_000),
    }),
  )
  .max(20);
/** A spirit run's link to a stripping run without litres is refused in words, never dropped. */
const feedLines = z
  .array(
    z.object({
      runId: z.number().int().positive(),
      litres: z
        .number({ error: 'Say how many litres of low wines come from this stripping run, or remove the link.' })
        .positive('Say how many litres of low wines come from this stripping run, or remove the link.')
        .max(1_000_000),
    }),
  )
  .max(20);

/** What a booking and a change of it may both set. */
const runDetails = {
  operatorId: z.number().int().positive().nullable().optional(),
  chargeLitres: z.number().positive().max(1_000_000).nullable().optional(),
  chargeAbv: z.number().min(0).max(100).nullable().optional(),
  ferments: chargeLines.optional(),
  feeds: feedLines.optional(),
  notes: z.string().max(4000).nullable().optional(),
};

export const createRunSchema = z.object({
  stillId: z.number().int().positive(),
  type: z.enum(RUN_TYPES),
  status: z.enum(BOOKABLE_RUN_STATUSES).optional(),
  startsAt: isoDate,
  /** Give endsAt, or durationMinutes, or neither (then the default duration applies). */
  endsAt: isoDate.optional(),
  durationMinutes: z.number().int().min(1).max(MAX_RUN_MINUTES).optional(),
  ...runDetails,
});
export type CreateRunInput = z.infer<typeof createRunSchema>;

export const updateRunSchema = z.object({
  version: z.number().int().positive(),
  stillId: z.number().int().positive().optional(),
  startsAt: isoDate.optional(),
  endsAt: isoDate.optional(),
  type: z.enum(RUN_TYPES).optional(),
  status: z.enum(BOOKABLE_RUN_STATUSES).optional(),
  ...runDetails,
});
export type UpdateRunInput = z.infer<typeof updateRunSchema>;

export const versionSchema = z.object({ version: z.number().int().positive(), reason: z.string().max(500).optional() });

/** Start and Finish: the version seen, and `confirm: true` once the person has read and accepted the questions asked. */
export const operateSchema = z.object({ version: z.number().int().positive(), confirm: z.literal(true).optional() });
export type OperateInput = z.infer<typeof operateSchema>;

/** A planner's correction of a run's actual times, with the reason kept in the audit log. */
export const actualTimesSchema = z.object({
  version: z.number().int().positive(),
  startedAt: isoDate.optional(),
  finishedAt: isoDate.optional(),
  reason: z.string().trim().min(3, 'Say why the times are corrected (at least a few words).').max(500),
});
export type ActualTimesInput = z.infer<typeof actualTimesSchema>;

/** Fields a distiller may change (moving and resizing); the rest are booking decisions. */
export const MOVE_FIELDS = ['version', 'stillId', 'startsAt', 'endsAt'] as const;
export function onlyMoves(input: UpdateRunInput): boolean {
  return Object.keys(input).every((k) => (MOVE_FIELDS as readonly string[]).includes(k));
}

/**
 * Hook called inside the transaction of every run change (create, move, update incl.
 * operator assignment, cancel, start, finish). Notifications enqueue their mail here,
 * so the mail commits with the change or not at all.
 */
export async function onRunChanged(tx: Tx, change: RunChange): Promise<void> {
  // Mail to operators and planners, through the outbox, in this same transaction.
  await notifyRunChanged(tx, change);
}

/** One run of the caller's distillery with its lines (404 when it is not theirs); `db` may be a transaction. */
export async function getRun(ctx: Ctx, id: number, db: Reader = getDb()): Promise<BoardRun> {
  const run = await selectRun(db, ctx.ws.id, id);
  if (!run) throw notFound('No such run in this distillery.');
  return run;
}

export const runJson = (r: BoardRun): BoardRunJson => dehydrateRun(r);

/**
 * Lock the still rows (in id order, so two writers cannot deadlock on each other) and bump
 * their updated_at by at least a millisecond, so the row really changes and a concurrent
 * writer on another cluster node conflicts with this one. Returns the locked stills.
 */
async function lockStills(tx: Tx, workspaceId: number, stillIds: number[]) {
  const ids = [...new Set(stillIds)].sort((a, b) => a - b);
  const locked = await tx
    .select({ id: stills.id, active: stills.active, cleaningAfterRunMinutes: stills.cleaningAfterRunMinutes, capacityLitres: stills.capacityLitres })
    .from(stills)
    .where(and(eq(stills.workspaceId, workspaceId), inArray(stills.id, ids)))
    .orderBy(asc(stills.id))
    .for('update');
  if (locked.length !== ids.length) throw notFound('No such still in this distillery.');
  await tx
    .update(stills)
    .set({ updatedAt: sql`GREATEST(CURRENT_TIMESTAMP(3), ${stills.updatedAt} + INTERVAL 1000 MICROSECOND)` })
    .where(and(eq(stills.workspaceId, workspaceId), inArray(stills.id, ids)));
  return new Map(locked.map((s) => [s.id, s]));
}

/** Refuse (409) when the run's busy time on its still, cleaning slot included, overlaps another live run's. */
async function assertNoOverlap(
  tx: Tx,
  workspaceId: number,
  candidate: Pick<BoardRun, 'stillId' | 'type' | 'status' | 'startsAt' | 'endsAt'> & { id: number | undefined },
  cleaningMinutes: number,
): Promise<void> {
  if (candidate.status === 'cancelled' || candidate.status === 'done') return;
  const pad = cleaningMinutes * MINUTE_MS;
  const nearby = await tx
    .select({ id: runs.id, stillId: runs.stillId, type: runs.type, status: runs.status, startsAt: runs.startsAt, endsAt: runs.endsAt })
    .from(runs)
    .where(
      and(
        eq(runs.workspaceId, workspaceId),
        eq(runs.stillId, candidate.stillId),
        ne(runs.status, 'cancelled'),
        lt(runs.startsAt, new Date(candidate.endsAt.getTime() + pad)),
        gt(runs.endsAt, new Date(candidate.startsAt.getTime() - pad)),
      ),
    );
  const clash = findOverlap(candidate, nearby, { cleaningAfterRunMinutes: cleaningMinutes });
  if (clash) {
    throw conflict('That still is already booked then (the cleaning slot after a run counts as booked).', {
      overlapping: { id: clash.id, type: clash.type, startsAt: clash.startsAt.toISOString(), endsAt: clash.endsAt.toISOString() },
    });
  }
}

async function assertOperator(db: Reader, workspaceId: number, operatorId: number | null | undefined): Promise<void> {
  if (operatorId === null || operatorId === undefined) return;
  const [m] = await db
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, operatorId)))
    .limit(1);
  if (!m) throw invalid('operatorId', 'That person is not a member of this distillery.');
}

async function assertCharges(db: Reader, workspaceId: number, type: RunType, lines: CreateRunInput['ferments']): Promise<void> {
  if (!lines?.length) return;
  if (type !== 'stripping' && type !== 'redistillation')
    throw invalid('ferments', 'Only stripping runs take wash from ferments; spirit runs are fed by stripping runs.');
  const ids = [...new Set(lines.map((l) => l.fermentId))];
  if (ids.length !== lines.length) throw invalid('ferments', 'Name each ferment once.');
  const found = await db
    .select({ id: ferments.id })
    .from(ferments)
    .where(and(eq(ferments.workspaceId, workspaceId), inArray(ferments.id, ids)));
  if (found.length !== ids.length) throw invalid('ferments', 'One of those ferments is not in this distillery.');
}

async function assertFeeds(db: Reader, workspaceId: number, type: RunType, lines: CreateRunInput['feeds'], runId?: number): Promise<void> {
  if (!lines?.length) return;
  if (type !== 'spirit' && type !== 'redistillation') throw invalid('feeds', 'Only spirit runs are fed with low wines from stripping runs.');
  const ids = [...new Set(lines.map((l) => l.runId))];
  if (ids.length !== lines.length) throw invalid('feeds', 'Name each feeding run once.');
  if (runId !== undefined && ids.includes(runId)) throw invalid('feeds', 'A run cannot feed itself.');
  const found = await db
    .select({ id: runs.id, type: runs.type })
    .from(runs)
    .where(and(eq(runs.workspaceId, workspaceId), inArray(runs.id, ids)));
  if (found.length !== ids.length) throw invalid('feeds', 'One of those feeding runs is not in this distillery.');
  if (found.some((r) => r.type !== 'stripping')) throw invalid('feeds', 'Low wines come from stripping runs.');
}

function assertTimes(startsAt: Date, endsAt: Date): void {
  const minutes = (endsAt.getTime() - startsAt.getTime()) / MINUTE_MS;
  if (!(minutes >= 1)) throw invalid('endsAt', 'A run must end after it starts.');
  if (minutes > MAX_RUN_MINUTES) throw invalid('endsAt', 'A run can be at most a week long.');
}

/** Refuse (400) a booking further ahead, or further back, than the distillery's booking horizon: usually a mistyped year. */
function assertHorizon(ctx: Ctx, startsAt: Date, endsAt: Date, now = new Date()): void {
  const days = ctx.ws.bookingHorizonDays;
  const limit = days * 24 * 60 * MINUTE_MS;
  for (const [field, at] of [
    ['startsAt', startsAt],
    ['endsAt', endsAt],
  ] as const) {
    if (at.getTime() > now.getTime() + limit) throw invalid(field, `Runs can be booked at most ${days} days ahead; check the year.`);
    if (at.getTime() < now.getTime() - limit) throw invalid(field, `Runs can be booked at most ${days} days back; check the year.`);
  }
}

async function writeLines(
  tx: Tx,
  workspaceId: number,
  runId: number,
  input: { ferments?: CreateRunInput['ferments']; feeds?: CreateRunInput['feeds'] },
): Promise<void> {
  if (input.ferments) {
    await tx.delete(runFerments).where(and(eq(runFerments.workspaceId, workspaceId), eq(runFerments.runId, runId)));
    if (input.ferments.length)
      await tx.insert(runFerments).values(input.ferments.map((l) => ({ runId, fermentId: l.fermentId, workspaceId, litres: l.litres })));
  }
  if (input.feeds) {
    await tx.delete(runFeeds).where(and(eq(runFeeds.workspaceId, workspaceId), eq(runFeeds.runId, runId)));
    if (input.feeds.length) await tx.insert(runFeeds).values(input.feeds.map((l) => ({ runId, feedRunId: l.runId, workspaceId, litres: l.litres })));
  }
}

const auditRun = (r: BoardRun) => ({
  stillId: r.stillId,
  type: r.type,
  status: r.status,
  startsAt: r.startsAt.toISOString(),
  endsAt: r.endsAt.toISOString(),
  operatorId: r.operatorId,
});

export async function createRun(ctx: Ctx, input: CreateRunInput): Promise<BoardRun> {
  const {
    ws: { id: workspaceId },
    actor: { userId },
  } = ctx;
  const db = getDb();
  const still = await getStill(ctx, input.stillId);
  if (!still.active) throw invalid('stillId', 'That still is retired.');
  await assertOperator(db, workspaceId, input.operatorId);
  await assertCharges(db, workspaceId, input.type, input.ferments);
  await assertFeeds(db, workspaceId, input.type, input.feeds);
  // A charge sent (even null) is stored as sent; otherwise the charge the lines give.
  const chargeLitres =
    input.chargeLitres !== undefined ? input.chargeLitres : runChargeLitres({ chargeLitres: null, ferments: input.ferments ?? [], feeds: input.feeds ?? [] });
  const minutes = input.durationMinutes ?? defaultRunMinutes(still, input.type, chargeLitres, input.chargeAbv ?? null);
  const endsAt = input.endsAt ?? new Date(input.startsAt.getTime() + minutes * MINUTE_MS);
  assertTimes(input.startsAt, endsAt);
  assertHorizon(ctx, input.startsAt, endsAt);

  return inRetriedTransaction(async (tx) => {
    const locked = await lockStills(tx, workspaceId, [input.stillId]);
    const cleaning = locked.get(input.stillId)!.cleaningAfterRunMinutes;
    const status = input.status ?? 'planned';
    await assertNoOverlap(tx, workspaceId, { id: undefined, stillId: input.stillId, type: input.type, status, startsAt: input.startsAt, endsAt }, cleaning);
    const [row] = await tx
      .insert(runs)
      .values({
        workspaceId,
        stillId: input.stillId,
        type: input.type,
        status,
        startsAt: input.startsAt,
        endsAt,
        operatorId: input.operatorId ?? null,
        chargeLitres,
        chargeAbv: input.chargeAbv ?? null,
        notes: input.notes ?? null,
        createdBy: userId,
      })
      .$returningId();
    const id = row!.id;
    await writeLines(tx, workspaceId, id, input);
    await recordRiskAtBooking(tx, ctx, id);
    const after = await getRun(ctx, id, tx);
    await audit({ workspaceId, userId, action: 'run.create', entityType: 'run', entityId: id, details: { after: auditRun(after) } }, tx);
    await onRunChanged(tx, { kind: 'create', workspaceId, before: null, after, actorId: userId });
    return after;
  });
}

/** Lock the run row and check the version the caller saw; 409 with the current run when stale. */
async function lockRun(tx: Tx, ctx: Ctx, id: number, version: number): Promise<BoardRun> {
  const [row] = await tx
    .select({ id: runs.id })
    .from(runs)
    .where(and(eq(runs.id, id), eq(runs.workspaceId, ctx.ws.id)))
    .for('update');
  if (!row) throw notFound('No such run in this distillery.');
  const current = await getRun(ctx, id, tx);
  if (current.version !== version) {
    throw new HttpError(409, 'stale', 'Someone changed this run since you loaded it.', undefined, { current: runJson(current) });
  }
  return current;
}

const same = (a: Date, b: Date) => a.getTime() === b.getTime();

/** Move, resize or edit a run. Moving and resizing keep its wall-clock meaning only as sent: the island snaps times. */
export async function updateRun(ctx: Ctx, id: number, input: UpdateRunInput): Promise<BoardRun> {
  const {
    ws: { id: workspaceId },
    actor: { userId },
  } = ctx;
  const db = getDb();
  await assertOperator(db, workspaceId, input.operatorId);
  // Validate lines against the type they will have (the current type when unchanged).
  const pre = await getRun(ctx, id);
  const type = input.type ?? pre.type;
  await assertCharges(db, workspaceId, type, input.ferments);
  await assertFeeds(db, workspaceId, type, input.feeds, id);

  return inRetriedTransaction(async (tx) => {
    const before = await lockRun(tx, ctx, id, input.version);
    const moving = input.stillId !== undefined || input.startsAt !== undefined || input.endsAt !== undefined;
    if (moving && before.status !== 'planned' && before.status !== 'confirmed') {
      throw conflict(`A ${before.status} run cannot be moved.`, { current: runJson(before) });
    }
    if (input.status && before.status !== 'planned' && before.status !== 'confirmed') {
      throw conflict(`A ${before.status} run keeps its status.`, { current: runJson(before) });
    }
    const stillId = input.stillId ?? before.stillId;
    let startsAt = input.startsAt ?? before.startsAt;
    let endsAt = input.endsAt ?? before.endsAt;
    // Moving only the start keeps the run's true length.
    if (input.startsAt && !input.endsAt) endsAt = new Date(startsAt.getTime() + (before.endsAt.getTime() - before.startsAt.getTime()));
    if (input.endsAt && !input.startsAt) startsAt = before.startsAt;
    assertTimes(startsAt, endsAt);
    if (moving) assertHorizon(ctx, startsAt, endsAt);
    const status = input.status ?? before.status;
    const locked = await lockStills(tx, workspaceId, [before.stillId, stillId]);
    const target = locked.get(stillId)!;
    if (!target.active) throw invalid('stillId', 'That still is retired.');
    const timeOrStillChanged = stillId !== before.stillId || !same(startsAt, before.startsAt) || !same(endsAt, before.endsAt);
    const statusChanged = status !== before.status;
    if (timeOrStillChanged || type !== before.type) {
      await assertNoOverlap(tx, workspaceId, { id, stillId, type, status, startsAt, endsAt }, target.cleaningAfterRunMinutes);
    }
    const set: Partial<typeof runs.$inferInsert> = {
      stillId,
      startsAt,
      endsAt,
      type,
      status,
      version: sql`${runs.version} + 1` as unknown as number,
    };
    if (timeOrStillChanged || statusChanged) set.sequence = sql`${runs.sequence} + 1` as unknown as number;
    if (input.operatorId !== undefined) set.operatorId = input.operatorId;
    if (input.chargeLitres !== undefined) set.chargeLitres = input.chargeLitres;
    if (input.chargeAbv !== undefined) set.chargeAbv = input.chargeAbv;
    if (input.notes !== undefined) set.notes = input.notes;
    await tx
      .update(runs)
      .set(set)
      .where(and(eq(runs.id, id), eq(runs.workspaceId, workspaceId)));
    await writeLines(tx, workspaceId, id, input);
    if (timeOrStillChanged || input.ferments) await recordRiskAtBooking(tx, ctx, id);
    const after = await getRun(ctx, id, tx);
    const kind = timeOrStillChanged ? 'move' : 'update';
    await audit(
      {
        workspaceId,
        userId,
        action: timeOrStillChanged ? 'run.move' : 'run.update',
        entityType: 'run',
        entityId: id,
        details: { before: auditRun(before), after: auditRun(after), fields: Object.keys(input).filter((k) => k !== 'version') },
      },
      tx,
    );
    await onRunChanged(tx, { kind, workspaceId, before, after, actorId: userId });
    return after;
  });
}

/** What a status change may carry: a cancel's reason; the questions a start or finish asks, and whether the person accepted them. */
export interface StatusOptions {
  reason?: string;
  confirm?: boolean;
  /** Sentences to accept before the change, from the run as locked and the moment of the change. */
  questions?: (before: BoardRun, now: Date) => string[];
}

async function changeStatus(ctx: Ctx, id: number, version: number, kind: 'cancel' | 'start' | 'finish', opts: StatusOptions = {}): Promise<BoardRun> {
  const { reason } = opts;
  const {
    ws: { id: workspaceId },
    actor: { userId },
  } = ctx;
  return inRetriedTransaction(async (tx) => {
    const before = await lockRun(tx, ctx, id, version);
    const allowed: Record<typeof kind, string[]> = { cancel: ['planned', 'confirmed'], start: ['planned', 'confirmed'], finish: ['running'] };
    if (!allowed[kind].includes(before.status)) {
      const verb = kind === 'cancel' ? 'cancelled' : kind === 'start' ? 'started' : 'finished';
      throw conflict(`A ${before.status} run cannot be ${verb}.`, { current: runJson(before) });
    }
    const now = new Date();
    // Asked before anything is written; with `confirm` the person has read them and they go into the audit row.
    const asked = opts.questions?.(before, now) ?? [];
    if (asked.length && !opts.confirm) {
      throw new HttpError(409, 'confirm_required', `Please confirm: ${asked.join(' ')}`, undefined, { warnings: asked });
    }
    await lockStills(tx, workspaceId, [before.stillId]);
    const next = kind === 'cancel' ? 'cancelled' : kind === 'start' ? 'running' : 'done';
    await tx
      .update(runs)
      .set({
        status: next,
        version: sql`${runs.version} + 1` as unknown as number,
        sequence: sql`${runs.sequence} + 1` as unknown as number,
        ...(kind === 'start' ? { startedAt: now } : {}),
        ...(kind === 'finish' ? { finishedAt: now } : {}),
      })
      .where(and(eq(runs.id, id), eq(runs.workspaceId, workspaceId)));
    const after = await getRun(ctx, id, tx);
    if (kind !== 'cancel') await releaseFermentersForRun(tx, ctx, after, kind, now);
    await audit(
      {
        workspaceId,
        userId,
        action: `run.${kind}`,
        entityType: 'run',
        entityId: id,
        details: { before: auditRun(before), ...(reason ? { reason } : {}), ...(asked.length ? { accepted: asked } : {}) },
      },
      tx,
    );
    await onRunChanged(tx, { kind, workspaceId, before, after, actorId: userId });
    return after;
  });
}

export const cancelRun = (ctx: Ctx, id: number, version: number, reason?: string) => changeStatus(ctx, id, version, 'cancel', { reason });
/** Start a run now; `questions` come from its washes and booking (src/server/run-times.ts asks them). */
export const startRun = (ctx: Ctx, id: number, version: number, opts: Pick<StatusOptions, 'confirm' | 'questions'> = {}) =>
  changeStatus(ctx, id, version, 'start', opts);
/** Finish a running run now; a finish less than MIN_RUN_MINUTES after its start is questioned first. */
export const finishRun = (ctx: Ctx, id: number, version: number, opts: Pick<StatusOptions, 'confirm'> = {}) =>
  changeStatus(ctx, id, version, 'finish', {
    confirm: opts.confirm,
    questions: (before, now) => {
      const q = finishQuestion(before.startedAt, now);
      return q ? [q] : [];
    },
  });

const auditTimes = (r: Pick<BoardRun, 'startedAt' | 'finishedAt'>) => ({
  startedAt: r.startedAt?.toISOString() ?? null,
  finishedAt: r.finishedAt?.toISOString() ?? null,
});

/**
 * A planner's or manager's correction of when a run really started or finished (the booking
 * stays). Checked against now, the booking and each other; audited with before, after and the
 * reason; version and calendar SEQUENCE bumped so feeds move the event.
 * Signed-off production periods do not exist in Plateau yet: when they do, a run with a record
 * inside one must be refused here with 409.
 */
export async function correctActualTimes(ctx: Ctx, id: number, input: ActualTimesInput, now = new Date()): Promise<BoardRun> {
  const {
    ws: { id: workspaceId },
    actor: { userId },
  } = ctx;
  if (!input.startedAt && !input.finishedAt) throw invalid('startedAt', 'Give the corrected start, the corrected finish, or both.');
  return inRetriedTransaction(async (tx) => {
    const before = await lockRun(tx, ctx, id, input.version);
    if (before.status !== 'running' && before.status !== 'done') {
      throw conflict(`A ${before.status} run has not started, so it has no actual times to correct.`, { current: runJson(before) });
    }
    if (input.finishedAt && before.status !== 'done') throw invalid('finishedAt', 'This run is still running: finish it first, then correct its finish.');
    const startedAt = input.startedAt ?? before.startedAt ?? null;
    const finishedAt = input.finishedAt ?? before.finishedAt ?? null;
    const changed = (['startedAt', 'finishedAt'] as const).filter((k) => input[k] !== undefined);
    const problems = correctionProblems({ ...before, startedAt, finishedAt, changed, now, timeZone: ctx.ws.timeZone });
    const first = Object.values(problems)[0];
    if (first) throw new HttpError(400, 'invalid', first, problems);
    await tx
      .update(runs)
      .set({
        startedAt,
        finishedAt,
        version: sql`${runs.version} + 1` as unknown as number,
        sequence: sql`${runs.sequence} + 1` as unknown as number,
      })
      .where(and(eq(runs.id, id), eq(runs.workspaceId, workspaceId)));
    const after = await getRun(ctx, id, tx);
    // The washes this run emptied follow its corrected moment, so the fermenter's occupancy matches the record.
    const washesMoved = await retimeReleasesForRun(tx, ctx, { id, status: after.status, startedAt, finishedAt });
    await audit(
      {
        workspaceId,
        userId,
        action: 'run.correct_times',
        entityType: 'run',
        entityId: id,
        details: {
          booked: { startsAt: before.startsAt.toISOString(), endsAt: before.endsAt.toISOString() },
          before: auditTimes(before),
          after: auditTimes(after),
          reason: input.reason,
          ...(washesMoved ? { washesMoved } : {}),
        },
      },
      tx,
    );
    return after;
  });
}
