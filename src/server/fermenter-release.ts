/**
 * The fermenter is freed by the run that empties it. When a stripping run reaches the moment the
 * distillery chose (it starts, or it finishes: `ws.releaseFermentersOn`), each wash it charged is
 * marked emptied — reason "distilled", by this run — once the litres charged by that wash's runs
 * that have reached the moment cover its volume. A wash split over several runs with some left is
 * not assumed empty: it is reported as remaining, and the run's pages ask "Is FV3 empty?".
 */
import { and, asc, eq, inArray, isNull, sql } from 'drizzle-orm';
import { getDb } from '../db/client';
import { fermenters, ferments, runFerments, runs } from '../db/schema';
import type { BoardRun } from '../lib/board';
import type { FermenterReleaseMoment, RunStatus } from '../lib/vocabulary';
import { audit } from './audit';
import type { Ctx } from './context';
import { notFound } from './http';
import type { Reader } from './run-query';
import type { Tx } from './tx';

/**
 * A wash counts as taken whole when what the charges leave is at most the larger of 1 % of its
 * volume and 5 L: the heel below the fermenter's outlet and the dead volume of hoses and pump
 * never reach the still (common practice).
 */
export const HEEL_FRACTION = 0.01;
export const HEEL_LITRES = 5;

export function heelAllowanceLitres(volumeLitres: number): number {
  return Math.max(volumeLitres * HEEL_FRACTION, HEEL_LITRES);
}

/** Litres the charges booked leave in the fermenter (never below zero). */
export function litresLeft(volumeLitres: number, chargedLitres: number): number {
  return Math.max(0, volumeLitres - chargedLitres);
}

/** True when the charges take the wash whole, heel allowed. */
export function takenWhole(volumeLitres: number, chargedLitres: number): boolean {
  return volumeLitres - chargedLitres <= heelAllowanceLitres(volumeLitres) + 1e-9;
}

/** Run statuses that have reached the moment the distillery frees fermenters at. */
export function reachedStatuses(releaseOn: FermenterReleaseMoment): RunStatus[] {
  return releaseOn === 'start' ? ['running', 'done'] : ['done'];
}

export interface ReleasedWash {
  fermentId: number;
  code: string;
  fermenter: string | null;
}

export interface RemainingWash extends ReleasedWash {
  fermenterId: number | null;
  volumeLitres: number;
  /** What the charges of the runs that reached the moment leave in the fermenter. */
  litresLeft: number;
}

export interface ReleaseResult {
  emptied: ReleasedWash[];
  remaining: RemainingWash[];
}

const NOTHING: ReleaseResult = { emptied: [], remaining: [] };

/** Litres charged per ferment by the runs (of any type taking wash) whose status has reached the moment. */
async function chargedByReachedRuns(db: Reader, workspaceId: number, fermentIds: number[], statuses: RunStatus[]): Promise<Map<number, number>> {
  if (!fermentIds.length) return new Map();
  const rows = await db
    .select({ fermentId: runFerments.fermentId, litres: sql<string | number>`SUM(${runFerments.litres})` })
    .from(runFerments)
    .innerJoin(runs, and(eq(runs.id, runFerments.runId), eq(runs.workspaceId, runFerments.workspaceId)))
    .where(and(eq(runFerments.workspaceId, workspaceId), inArray(runFerments.fermentId, fermentIds), inArray(runs.status, statuses)))
    .groupBy(runFerments.fermentId);
  return new Map(rows.map((r) => [Number(r.fermentId), Number(r.litres)]));
}

const washColumns = {
  id: ferments.id,
  code: ferments.code,
  volumeLitres: ferments.volumeLitres,
  pitchedAt: ferments.pitchedAt,
  emptiedAt: ferments.emptiedAt,
  fermenterId: ferments.fermenterId,
  fermenterName: fermenters.name,
};

/**
 * Called inside the transaction that starts or finishes a run (changeStatus in runs.ts), after the
 * run's new status is written. Only stripping runs release, at the moment the setting says; at a
 * finish the rule is applied again when the setting is "start" (a run started before the setting
 * changed still frees its washes).
 */
export async function releaseFermentersForRun(
  tx: Tx,
  ctx: Ctx,
  run: Pick<BoardRun, 'id' | 'type' | 'ferments'>,
  moment: 'start' | 'finish',
  at: Date,
): Promise<ReleaseResult> {
  const releaseOn = ctx.ws.releaseFermentersOn;
  if (run.type !== 'stripping') return NOTHING;
  if (moment === 'start' && releaseOn === 'finish') return NOTHING;
  const ids = [...new Set(run.ferments.map((c) => c.fermentId))].sort((a, b) => a - b);
  if (!ids.length) return NOTHING;
  const workspaceId = ctx.ws.id;
  // Lock the ferment rows (in id order) so two runs of one wash finishing at once cannot both miss the full sum.
  await tx
    .select({ id: ferments.id })
    .from(ferments)
    .where(and(eq(ferments.workspaceId, workspaceId), inArray(ferments.id, ids)))
    .orderBy(asc(ferments.id))
    .for('update');
  const washes = await tx
    .select(washColumns)
    .from(ferments)
    .leftJoin(fermenters, eq(fermenters.id, ferments.fermenterId))
    .where(and(eq(ferments.workspaceId, workspaceId), inArray(ferments.id, ids)));
  const open = washes.filter((w) => w.emptiedAt === null);
  if (!open.length) return NOTHING;
  const charged = await chargedByReachedRuns(
    tx,
    workspaceId,
    open.map((w) => w.id),
    reachedStatuses(releaseOn),
  );
  const out: ReleaseResult = { emptied: [], remaining: [] };
  for (const w of open) {
    const sum = charged.get(w.id) ?? 0;
    if (!takenWhole(w.volumeLitres, sum)) {
      out.remaining.push({
        fermentId: w.id,
        code: w.code,
        fermenter: w.fermenterName,
        fermenterId: w.fermenterId,
        volumeLitres: w.volumeLitres,
        litresLeft: litresLeft(w.volumeLitres, sum),
      });
      continue;
    }
    // Never before the pitch (a run started early against a wash whose pitch time was entered late).
    const when = at.getTime() < w.pitchedAt.getTime() ? w.pitchedAt : at;
    await tx
      .update(ferments)
      .set({ emptiedAt: when, emptiedReason: 'distilled', emptiedByRunId: run.id, emptiedNote: null })
      .where(and(eq(ferments.id, w.id), eq(ferments.workspaceId, workspaceId), isNull(ferments.emptiedAt)));
    await audit(
      {
        workspaceId,
        userId: ctx.actor.userId || null,
        action: 'ferment.empty',
        entityType: 'ferment',
        entityId: w.id,
        details: {
          reason: 'distilled',
          at: when.toISOString(),
          runId: run.id,
          moment,
          fermenterId: w.fermenterId,
          volumeLitres: w.volumeLitres,
          chargedLitres: sum,
        },
        ip: ctx.actor.ip,
      },
      tx,
    );
    out.emptied.push({ fermentId: w.id, code: w.code, fermenter: w.fermenterName });
  }
  return out;
}

/**
 * The washes a run charged that are still in their fermenters although the run has reached the
 * moment fermenters are freed at: what the run's pages ask about ("Is FV3 empty?"). Empty for a
 * run of another type, a run not yet at the moment, or washes all emptied.
 */
export async function washesLeftByRun(ctx: Ctx, runId: number, db: Reader = getDb()): Promise<RemainingWash[]> {
  const workspaceId = ctx.ws.id;
  const [run] = await db
    .select({ id: runs.id, type: runs.type, status: runs.status })
    .from(runs)
    .where(and(eq(runs.id, runId), eq(runs.workspaceId, workspaceId)))
    .limit(1);
  if (!run) throw notFound('No such run in this distillery.');
  const statuses = reachedStatuses(ctx.ws.releaseFermentersOn);
  if (run.type !== 'stripping' || !statuses.includes(run.status)) return [];
  const lines = await db
    .select({ fermentId: runFerments.fermentId })
    .from(runFerments)
    .where(and(eq(runFerments.workspaceId, workspaceId), eq(runFerments.runId, runId)));
  const ids = [...new Set(lines.map((l) => l.fermentId))];
  if (!ids.length) return [];
  const washes = await db
    .select(washColumns)
    .from(ferments)
    .leftJoin(fermenters, eq(fermenters.id, ferments.fermenterId))
    .where(and(eq(ferments.workspaceId, workspaceId), inArray(ferments.id, ids), isNull(ferments.emptiedAt)))
    .orderBy(asc(ferments.code));
  if (!washes.length) return [];
  const charged = await chargedByReachedRuns(
    db,
    workspaceId,
    washes.map((w) => w.id),
    statuses,
  );
  return washes.map((w) => ({
    fermentId: w.id,
    code: w.code,
    fermenter: w.fermenterName,
    fermenterId: w.fermenterId,
    volumeLitres: w.volumeLitres,
    litresLeft: litresLeft(w.volumeLitres, charged.get(w.id) ?? 0),
  }));
}

/**
 * When the run named as the reason for emptying a wash freed it: its finish or start (per the
 * setting) if it has reached that moment, else null. Used when someone answers "Yes, FV3 is empty".
 */
export function releaseInstant(run: { status: RunStatus; startedAt: Date | null; finishedAt: Date | null }, releaseOn: FermenterReleaseMoment): Date | null {
  if (releaseOn === 'start' && (run.status === 'running' || run.status === 'done')) return run.startedAt;
  if (run.status === 'done') return run.finishedAt;
  return null;
}

/**
 * After a correction of a run's actual start or finish: the washes this run emptied move to its
 * corrected moment (per the setting), so the fermenter's occupancy follows the record. Returns how
 * many washes moved. Meant to be called in the correcting transaction.
 */
export async function retimeReleasesForRun(
  tx: Tx,
  ctx: Ctx,
  run: { id: number; status: RunStatus; startedAt: Date | null; finishedAt: Date | null },
): Promise<number> {
  const at = releaseInstant(run, ctx.ws.releaseFermentersOn);
  if (!at) return 0;
  const emptied = await tx
    .select({ id: ferments.id, pitchedAt: ferments.pitchedAt })
    .from(ferments)
    .where(and(eq(ferments.workspaceId, ctx.ws.id), eq(ferments.emptiedByRunId, run.id), eq(ferments.emptiedReason, 'distilled')))
    .for('update');
  for (const f of emptied) {
    await tx
      .update(ferments)
      .set({ emptiedAt: at.getTime() < f.pitchedAt.getTime() ? f.pitchedAt : at })
      .where(and(eq(ferments.id, f.id), eq(ferments.workspaceId, ctx.ws.id)));
  }
  return emptied.length;
}
