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
import { getDb, type Db } from '../db/client';
import { memberships, ferments, runFeeds, runFerments, runOutcomes, runs, stills, RUN_TYPES } from '../db/schema';
import { defaultRunMinutes, dehydrateRun, type BoardRun, type BoardRunJson } from '../lib/board';
import { findOverlap, type RunType } from '../lib/schedule';
import { audit } from './audit';
import { isRetryableTxError } from './db-errors';
import { conflict, HttpError, invalid, notFound } from './http';
import { getStill } from './stills';
import { notifyRunChanged } from './notify';

export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
type Reader = Pick<Db, 'select'>;

const MINUTE_MS = 60_000;
const MAX_RUN_MINUTES = 7 * 24 * 60;
const isoDate = z.iso.datetime({ offset: true, message: 'Use an ISO date-time with its offset.' }).transform((s) => new Date(s));

const chargeLines = z.array(z.object({ fermentId: z.number().int().positive(), litres: z.number().positive().max(1_000_000) })).max(20);
const feedLines = z.array(z.object({ runId: z.number().int().positive(), litres: z.number().positive().max(1_000_000) })).max(20);

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
  status: z.enum(['planned', 'confirmed']).optional(),
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
  status: z.enum(['planned', 'confirmed']).optional(),
  ...runDetails,
});
export type UpdateRunInput = z.infer<typeof updateRunSchema>;

export const versionSchema = z.object({ version: z.number().int().positive(), reason: z.string().max(500).optional() });

/** Fields a distiller may change (moving and resizing); the rest are booking decisions. */
export const MOVE_FIELDS = ['version', 'stillId', 'startsAt', 'endsAt'] as const;
export function onlyMoves(input: UpdateRunInput): boolean {
  return Object.keys(input).every((k) => (MOVE_FIELDS as readonly string[]).includes(k));
}

export interface RunChange {
  kind: 'create' | 'move' | 'update' | 'cancel' | 'start' | 'finish';
  workspaceId: number;
  before: BoardRun | null;
  after: BoardRun;
  actorId: number;
}

/**
 * Hook called inside the transaction of every run change (create, move, update incl.
 * operator assignment, cancel, start, finish). Notifications enqueue their mail here,
 * so the mail commits with the change or not at all. Does nothing yet.
 */
export async function onRunChanged(tx: Tx, change: RunChange): Promise<void> {
  // Mail to operators and planners, through the outbox, in this same transaction.
  await notifyRunChanged(tx, change);
}

/** Runs of a workspace with their charge lines, feeds and recorded low wines. */
export async function loadRuns(db: Reader, workspaceId: number, where: ReturnType<typeof and>): Promise<BoardRun[]> {
  const rows = await db.select({
    id: runs.id, stillId: runs.stillId, type: runs.type, status: runs.status, startsAt: runs.startsAt, endsAt: runs.endsAt,
    operatorId: runs.operatorId, chargeLitres: runs.chargeLitres, chargeAbv: runs.chargeAbv, version: runs.version, sequence: runs.sequence, notes: runs.notes,
  }).from(runs).where(and(eq(runs.workspaceId, workspaceId), where)).orderBy(asc(runs.startsAt), asc(runs.id));
  return attachLines(db, workspaceId, rows);
}

type RunBase = Omit<BoardRun, 'ferments' | 'feeds' | 'lowWinesLitres'>;

/**
 * Attach charge lines, feeds and recorded low wines to runs. `range` selects the lines by
 * joining runs in a time window instead of listing hundreds of run ids (much cheaper for
 * the board); rows outside `rows` are ignored either way.
 */
export async function attachLines(db: Reader, workspaceId: number, rows: RunBase[], range?: { from: Date; to: Date }): Promise<BoardRun[]> {
  if (rows.length === 0) return [];
  const ids = rows.map((r) => r.id);
  const inRuns = (runIdCol: typeof runFerments.runId | typeof runFeeds.runId | typeof runOutcomes.runId) =>
    range ? and(eq(runs.workspaceId, workspaceId), lt(runs.startsAt, range.to), gt(runs.endsAt, range.from)) : inArray(runIdCol, ids);
  const [charges, feeds, lowWines] = await Promise.all([
    (range
      ? db.select({ runId: runFerments.runId, fermentId: runFerments.fermentId, litres: runFerments.litres }).from(runFerments).innerJoin(runs, eq(runs.id, runFerments.runId))
      : db.select({ runId: runFerments.runId, fermentId: runFerments.fermentId, litres: runFerments.litres }).from(runFerments))
      .where(and(eq(runFerments.workspaceId, workspaceId), inRuns(runFerments.runId))),
    (range
      ? db.select({ runId: runFeeds.runId, feedRunId: runFeeds.feedRunId, litres: runFeeds.litres }).from(runFeeds).innerJoin(runs, eq(runs.id, runFeeds.runId))
      : db.select({ runId: runFeeds.runId, feedRunId: runFeeds.feedRunId, litres: runFeeds.litres }).from(runFeeds))
      .where(and(eq(runFeeds.workspaceId, workspaceId), inRuns(runFeeds.runId))),
    (range
      ? db.select({ runId: runOutcomes.runId, litres: sql<number>`SUM(${runOutcomes.volumeLitres})` }).from(runOutcomes).innerJoin(runs, eq(runs.id, runOutcomes.runId))
      : db.select({ runId: runOutcomes.runId, litres: sql<number>`SUM(${runOutcomes.volumeLitres})` }).from(runOutcomes))
      .where(and(eq(runOutcomes.workspaceId, workspaceId), eq(runOutcomes.fraction, 'low_wines'), inRuns(runOutcomes.runId)))
      .groupBy(runOutcomes.runId),
  ]);
  const byRun = new Map<number, BoardRun>();
  const out = rows.map((r) => {
    const run: BoardRun = { ...r, ferments: [], feeds: [], lowWinesLitres: null };
    byRun.set(r.id, run);
    return run;
  });
  for (const c of charges) byRun.get(c.runId)?.ferments.push({ fermentId: c.fermentId, litres: c.litres });
  for (const f of feeds) byRun.get(f.runId)?.feeds.push({ runId: f.feedRunId, litres: f.litres });
  for (const l of lowWines) {
    const run = byRun.get(l.runId);
    if (run) run.lowWinesLitres = Number(l.litres);
  }
  return out;
}

export async function getRun(workspaceId: number, id: number, db: Reader = getDb()): Promise<BoardRun> {
  const [run] = await loadRuns(db, workspaceId, and(eq(runs.id, id)));
  if (!run) throw notFound('No such run in this distillery.');
  return run;
}

export const runJson = (r: BoardRun): BoardRunJson => dehydrateRun(r);

function sleep(ms: number): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, ms));
}

/**
 * Run `fn` in a READ COMMITTED transaction, retrying a few times on deadlock / Galera
 * certification failure (the whole transaction is replayed, so `fn` must be pure apart
 * from its database writes).
 */
export async function inRetriedTransaction<T>(fn: (tx: Tx) => Promise<T>, attempts = 6): Promise<T> {
  const db = getDb();
  for (let attempt = 1; ; attempt++) {
    try {
      return await db.transaction(fn, { isolationLevel: 'read committed' });
    } catch (err) {
      if (attempt >= attempts || !isRetryableTxError(err)) throw err;
      await sleep(5 * attempt + Math.random() * 15 * attempt);
    }
  }
}

/**
 * Lock the still rows (in id order, so two writers cannot deadlock on each other) and bump
 * their updated_at by at least a millisecond, so the row really changes and a concurrent
 * writer on another cluster node conflicts with this one. Returns the locked stills.
 */
async function lockStills(tx: Tx, workspaceId: number, stillIds: number[]) {
  const ids = [...new Set(stillIds)].sort((a, b) => a - b);
  const locked = await tx.select({ id: stills.id, active: stills.active, cleaningAfterRunMinutes: stills.cleaningAfterRunMinutes, capacityLitres: stills.capacityLitres })
    .from(stills).where(and(eq(stills.workspaceId, workspaceId), inArray(stills.id, ids))).orderBy(asc(stills.id)).for('update');
  if (locked.length !== ids.length) throw notFound('No such still in this distillery.');
  await tx.update(stills)
    .set({ updatedAt: sql`GREATEST(CURRENT_TIMESTAMP(3), ${stills.updatedAt} + INTERVAL 1000 MICROSECOND)` })
    .where(and(eq(stills.workspaceId, workspaceId), inArray(stills.id, ids)));
  return new Map(locked.map((s) => [s.id, s]));
}

/** Refuse (409) when the run's busy time on its still, cleaning slot included, overlaps another live run's. */
async function assertNoOverlap(tx: Tx, workspaceId: number, candidate: Pick<BoardRun, 'stillId' | 'type' | 'status' | 'startsAt' | 'endsAt'> & { id: number | undefined }, cleaningMinutes: number): Promise<void> {
  if (candidate.status === 'cancelled' || candidate.status === 'done') return;
  const pad = cleaningMinutes * MINUTE_MS;
  const nearby = await tx.select({ id: runs.id, stillId: runs.stillId, type: runs.type, status: runs.status, startsAt: runs.startsAt, endsAt: runs.endsAt })
    .from(runs)
    .where(and(
      eq(runs.workspaceId, workspaceId), eq(runs.stillId, candidate.stillId), ne(runs.status, 'cancelled'),
      lt(runs.startsAt, new Date(candidate.endsAt.getTime() + pad)), gt(runs.endsAt, new Date(candidate.startsAt.getTime() - pad)),
    ));
  const clash = findOverlap(candidate, nearby, { cleaningAfterRunMinutes: cleaningMinutes });
  if (clash) {
    throw conflict('That still is already booked then (the cleaning slot after a run counts as booked).', {
      overlapping: { id: clash.id, type: clash.type, startsAt: clash.startsAt.toISOString(), endsAt: clash.endsAt.toISOString() },
    });
  }
}

async function assertOperator(db: Reader, workspaceId: number, operatorId: number | null | undefined): Promise<void> {
  if (operatorId === null || operatorId === undefined) return;
  const [m] = await db.select({ role: memberships.role }).from(memberships)
    .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, operatorId))).limit(1);
  if (!m) throw invalid('operatorId', 'That person is not a member of this distillery.');
}

async function assertCharges(db: Reader, workspaceId: number, type: RunType, lines: CreateRunInput['ferments'], runId?: number): Promise<void> {
  if (!lines?.length) return;
  if (type !== 'stripping' && type !== 'redistillation') throw invalid('ferments', 'Only stripping runs take wash from ferments; spirit runs are fed by stripping runs.');
  const ids = [...new Set(lines.map((l) => l.fermentId))];
  if (ids.length !== lines.length) throw invalid('ferments', 'Name each ferment once.');
  const found = await db.select({ id: ferments.id }).from(ferments).where(and(eq(ferments.workspaceId, workspaceId), inArray(ferments.id, ids)));
  if (found.length !== ids.length) throw invalid('ferments', 'One of those ferments is not in this distillery.');
  void runId;
}

async function assertFeeds(db: Reader, workspaceId: number, type: RunType, lines: CreateRunInput['feeds'], runId?: number): Promise<void> {
  if (!lines?.length) return;
  if (type !== 'spirit' && type !== 'redistillation') throw invalid('feeds', 'Only spirit runs are fed with low wines from stripping runs.');
  const ids = [...new Set(lines.map((l) => l.runId))];
  if (ids.length !== lines.length) throw invalid('feeds', 'Name each feeding run once.');
  if (runId !== undefined && ids.includes(runId)) throw invalid('feeds', 'A run cannot feed itself.');
  const found = await db.select({ id: runs.id, type: runs.type }).from(runs).where(and(eq(runs.workspaceId, workspaceId), inArray(runs.id, ids)));
  if (found.length !== ids.length) throw invalid('feeds', 'One of those feeding runs is not in this distillery.');
  if (found.some((r) => r.type !== 'stripping')) throw invalid('feeds', 'Low wines come from stripping runs.');
}

function assertTimes(startsAt: Date, endsAt: Date): void {
  const minutes = (endsAt.getTime() - startsAt.getTime()) / MINUTE_MS;
  if (!(minutes >= 1)) throw invalid('endsAt', 'A run must end after it starts.');
  if (minutes > MAX_RUN_MINUTES) throw invalid('endsAt', 'A run can be at most a week long.');
}

async function writeLines(tx: Tx, workspaceId: number, runId: number, input: { ferments?: CreateRunInput['ferments']; feeds?: CreateRunInput['feeds'] }): Promise<void> {
  if (input.ferments) {
    await tx.delete(runFerments).where(and(eq(runFerments.workspaceId, workspaceId), eq(runFerments.runId, runId)));
    if (input.ferments.length) await tx.insert(runFerments).values(input.ferments.map((l) => ({ runId, fermentId: l.fermentId, workspaceId, litres: l.litres })));
  }
  if (input.feeds) {
    await tx.delete(runFeeds).where(and(eq(runFeeds.workspaceId, workspaceId), eq(runFeeds.runId, runId)));
    if (input.feeds.length) await tx.insert(runFeeds).values(input.feeds.map((l) => ({ runId, feedRunId: l.runId, workspaceId, litres: l.litres })));
  }
}

const auditRun = (r: BoardRun) => ({ stillId: r.stillId, type: r.type, status: r.status, startsAt: r.startsAt.toISOString(), endsAt: r.endsAt.toISOString(), operatorId: r.operatorId });

export async function createRun(workspaceId: number, userId: number, input: CreateRunInput): Promise<BoardRun> {
  const db = getDb();
  const still = await getStill(workspaceId, input.stillId);
  if (!still.active) throw invalid('stillId', 'That still is retired.');
  await assertOperator(db, workspaceId, input.operatorId);
  await assertCharges(db, workspaceId, input.type, input.ferments);
  await assertFeeds(db, workspaceId, input.type, input.feeds);
  const fromLines = input.ferments?.length ? input.ferments.reduce((s, l) => s + l.litres, 0)
    : input.feeds?.length ? input.feeds.reduce((s, l) => s + l.litres, 0) : null;
  const chargeLitres = input.chargeLitres !== undefined ? input.chargeLitres : fromLines;
  const minutes = input.durationMinutes ?? defaultRunMinutes(still, input.type, chargeLitres, input.chargeAbv ?? null);
  const endsAt = input.endsAt ?? new Date(input.startsAt.getTime() + minutes * MINUTE_MS);
  assertTimes(input.startsAt, endsAt);

  return inRetriedTransaction(async (tx) => {
    const locked = await lockStills(tx, workspaceId, [input.stillId]);
    const cleaning = locked.get(input.stillId)!.cleaningAfterRunMinutes;
    const status = input.status ?? 'planned';
    await assertNoOverlap(tx, workspaceId, { id: undefined, stillId: input.stillId, type: input.type, status, startsAt: input.startsAt, endsAt }, cleaning);
    const [row] = await tx.insert(runs).values({
      workspaceId, stillId: input.stillId, type: input.type, status, startsAt: input.startsAt, endsAt,
      operatorId: input.operatorId ?? null, chargeLitres, chargeAbv: input.chargeAbv ?? null, notes: input.notes ?? null, createdBy: userId,
    }).$returningId();
    const id = row!.id;
    await writeLines(tx, workspaceId, id, input);
    const after = await getRun(workspaceId, id, tx);
    await audit({ workspaceId, userId, action: 'run.create', entityType: 'run', entityId: id, details: { after: auditRun(after) } }, tx);
    await onRunChanged(tx, { kind: 'create', workspaceId, before: null, after, actorId: userId });
    return after;
  });
}

/** Lock the run row and check the version the caller saw; 409 with the current run when stale. */
async function lockRun(tx: Tx, workspaceId: number, id: number, version: number): Promise<BoardRun> {
  const [row] = await tx.select({ id: runs.id }).from(runs).where(and(eq(runs.id, id), eq(runs.workspaceId, workspaceId))).for('update');
  if (!row) throw notFound('No such run in this distillery.');
  const current = await getRun(workspaceId, id, tx);
  if (current.version !== version) {
    throw new HttpError(409, 'stale', 'Someone changed this run since you loaded it.', undefined, { current: runJson(current) });
  }
  return current;
}

const same = (a: Date, b: Date) => a.getTime() === b.getTime();

/** Move, resize or edit a run. Moving and resizing keep its wall-clock meaning only as sent: the island snaps times. */
export async function updateRun(workspaceId: number, userId: number, id: number, input: UpdateRunInput): Promise<BoardRun> {
  const db = getDb();
  await assertOperator(db, workspaceId, input.operatorId);
  // Validate lines against the type they will have (the current type when unchanged).
  const pre = await getRun(workspaceId, id);
  const type = input.type ?? pre.type;
  await assertCharges(db, workspaceId, type, input.ferments, id);
  await assertFeeds(db, workspaceId, type, input.feeds, id);

  return inRetriedTransaction(async (tx) => {
    const before = await lockRun(tx, workspaceId, id, input.version);
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
      stillId, startsAt, endsAt, type, status,
      version: sql`${runs.version} + 1` as unknown as number,
    };
    if (timeOrStillChanged || statusChanged) set.sequence = sql`${runs.sequence} + 1` as unknown as number;
    if (input.operatorId !== undefined) set.operatorId = input.operatorId;
    if (input.chargeLitres !== undefined) set.chargeLitres = input.chargeLitres;
    if (input.chargeAbv !== undefined) set.chargeAbv = input.chargeAbv;
    if (input.notes !== undefined) set.notes = input.notes;
    await tx.update(runs).set(set).where(and(eq(runs.id, id), eq(runs.workspaceId, workspaceId)));
    await writeLines(tx, workspaceId, id, input);
    const after = await getRun(workspaceId, id, tx);
    const kind = timeOrStillChanged ? 'move' : 'update';
    await audit({
      workspaceId, userId, action: timeOrStillChanged ? 'run.move' : 'run.update', entityType: 'run', entityId: id,
      details: { before: auditRun(before), after: auditRun(after), fields: Object.keys(input).filter((k) => k !== 'version') },
    }, tx);
    await onRunChanged(tx, { kind, workspaceId, before, after, actorId: userId });
    return after;
  });
}

async function changeStatus(
  workspaceId: number, userId: number, id: number, version: number,
  kind: 'cancel' | 'start' | 'finish', reason?: string,
): Promise<BoardRun> {
  return inRetriedTransaction(async (tx) => {
    const before = await lockRun(tx, workspaceId, id, version);
    const allowed: Record<typeof kind, string[]> = { cancel: ['planned', 'confirmed'], start: ['planned', 'confirmed'], finish: ['running'] };
    if (!allowed[kind].includes(before.status)) {
      const verb = kind === 'cancel' ? 'cancelled' : kind === 'start' ? 'started' : 'finished';
      throw conflict(`A ${before.status} run cannot be ${verb}.`, { current: runJson(before) });
    }
    await lockStills(tx, workspaceId, [before.stillId]);
    const now = new Date();
    const next = kind === 'cancel' ? 'cancelled' : kind === 'start' ? 'running' : 'done';
    await tx.update(runs).set({
      status: next,
      version: sql`${runs.version} + 1` as unknown as number,
      sequence: sql`${runs.sequence} + 1` as unknown as number,
      ...(kind === 'start' ? { startedAt: now } : {}),
      ...(kind === 'finish' ? { finishedAt: now } : {}),
    }).where(and(eq(runs.id, id), eq(runs.workspaceId, workspaceId)));
    const after = await getRun(workspaceId, id, tx);
    await audit({ workspaceId, userId, action: `run.${kind}`, entityType: 'run', entityId: id, details: { before: auditRun(before), ...(reason ? { reason } : {}) } }, tx);
    await onRunChanged(tx, { kind, workspaceId, before, after, actorId: userId });
    return after;
  });
}

export const cancelRun = (ws: number, user: number, id: number, version: number, reason?: string) => changeStatus(ws, user, id, version, 'cancel', reason);
export const startRun = (ws: number, user: number, id: number, version: number) => changeStatus(ws, user, id, version, 'start');
export const finishRun = (ws: number, user: number, id: number, version: number) => changeStatus(ws, user, id, version, 'finish');
