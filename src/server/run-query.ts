/**
 * The one way to read runs: a workspace's runs with their ferment lines, feed lines and
 * recorded low wines. Every reader (board, run pages, reports, exports, run records, calendar
 * feeds, notifications, the digest) goes through `selectRuns`, so a run reads the same
 * everywhere. Always scoped by the workspace; pass a transaction as `db` to read inside it.
 */
import { and, asc, eq, gt, inArray, lt, sql, type Column, type GetColumnData, type SQL } from 'drizzle-orm';
import type { Db } from '../db/client';
import { runFeeds, runFerments, runOutcomes, runs, stills, users } from '../db/schema';
import type { BoardRun } from '../lib/board';

export type Reader = Pick<Db, 'select'>;

/** A run as it was and as it is after a change (what notifications read, in the change's transaction). */
export interface RunChange {
  kind: 'create' | 'move' | 'update' | 'cancel' | 'start' | 'finish';
  workspaceId: number;
  before: BoardRun | null;
  after: BoardRun;
  actorId: number;
}

/** The columns every run is read with. */
export const runColumns = {
  id: runs.id,
  stillId: runs.stillId,
  type: runs.type,
  status: runs.status,
  startsAt: runs.startsAt,
  endsAt: runs.endsAt,
  operatorId: runs.operatorId,
  chargeLitres: runs.chargeLitres,
  chargeAbv: runs.chargeAbv,
  version: runs.version,
  sequence: runs.sequence,
  notes: runs.notes,
  startedAt: runs.startedAt,
  finishedAt: runs.finishedAt,
  bookedAtRisk: runs.bookedAtRisk,
};

/** A run row before its lines are attached. */
export type RunBase = Omit<BoardRun, 'ferments' | 'feeds' | 'lowWinesLitres'>;

/** Further fields a reader wants beside the run's own (run columns, still and operator names). */
export type RunExtras = Record<string, Column | SQL>;
type ExtraData<E extends RunExtras> = { [K in keyof E]: E[K] extends SQL<infer T> ? T : E[K] extends Column ? GetColumnData<E[K]> : never };

/** Extras that need a join: the still's name and capacity, the operator's name (null without one). */
export const stillName = stills.name;
export const stillCapacityLitres = stills.capacityLitres;
export const operatorName = sql<string | null>`${users.name}`;

export interface RunQuery<E extends RunExtras> {
  /** Runs overlapping [from, to); their lines are read by joining the window (cheaper than listing ids). */
  window?: { from: Date; to: Date };
  /** These runs only. */
  ids?: readonly number[];
  /** Runs that take wash from this ferment. */
  takingFerment?: number;
  /** Any further condition on `runs`. */
  where?: SQL;
  /** Further fields; `stillName`, `stillCapacityLitres` and `operatorName` join what they need. */
  extra?: E;
}

/** Runs of a workspace, ordered by start, with their charge lines, feeds and recorded low wines. */
export async function selectRuns<E extends RunExtras = Record<never, never>>(
  db: Reader,
  workspaceId: number,
  q: RunQuery<E> = {},
): Promise<Array<BoardRun & ExtraData<E>>> {
  if (q.ids && q.ids.length === 0) return [];
  const extra = (q.extra ?? {}) as RunExtras;
  const values = Object.values(extra);
  const needsStill = values.some((v) => v === stillName || v === stillCapacityLitres);
  const needsOperator = values.some((v) => v === operatorName);
  let query = db
    .select({ ...runColumns, ...extra })
    .from(runs)
    .$dynamic();
  if (needsStill) query = query.innerJoin(stills, eq(stills.id, runs.stillId));
  if (needsOperator) query = query.leftJoin(users, eq(users.id, runs.operatorId));
  const rows = await query
    .where(
      and(
        eq(runs.workspaceId, workspaceId),
        q.window ? and(lt(runs.startsAt, q.window.to), gt(runs.endsAt, q.window.from)) : undefined,
        q.ids ? inArray(runs.id, [...q.ids]) : undefined,
        q.takingFerment !== undefined
          ? inArray(
              runs.id,
              db
                .select({ id: runFerments.runId })
                .from(runFerments)
                .where(and(eq(runFerments.workspaceId, workspaceId), eq(runFerments.fermentId, q.takingFerment))),
            )
          : undefined,
        q.where,
      ),
    )
    .orderBy(asc(runs.startsAt), asc(runs.id));
  return attachLines(db, workspaceId, rows as unknown as Array<RunBase & ExtraData<E>>, q.window);
}

/** One run of the workspace, or null. */
export async function selectRun<E extends RunExtras = Record<never, never>>(
  db: Reader,
  workspaceId: number,
  id: number,
  extra?: E,
): Promise<(BoardRun & ExtraData<E>) | null> {
  const [run] = await selectRuns(db, workspaceId, { ids: [id], extra });
  return run ?? null;
}

/**
 * Attach charge lines, feeds and recorded low wines to runs. `range` selects the lines by
 * joining runs in a time window instead of listing hundreds of run ids (much cheaper for
 * the board); rows outside `rows` are ignored either way.
 */
async function attachLines<R extends RunBase>(
  db: Reader,
  workspaceId: number,
  rows: R[],
  range?: { from: Date; to: Date },
): Promise<Array<R & Pick<BoardRun, 'ferments' | 'feeds' | 'lowWinesLitres'>>> {
  if (rows.length === 0) return [];
  const ids = rows.map((r) => r.id);
  const inRuns = (runIdCol: typeof runFerments.runId | typeof runFeeds.runId | typeof runOutcomes.runId) =>
    range ? and(eq(runs.workspaceId, workspaceId), lt(runs.startsAt, range.to), gt(runs.endsAt, range.from)) : inArray(runIdCol, ids);
  const [charges, feeds, lowWines] = await Promise.all([
    (range
      ? db
          .select({ runId: runFerments.runId, fermentId: runFerments.fermentId, litres: runFerments.litres })
          .from(runFerments)
          .innerJoin(runs, eq(runs.id, runFerments.runId))
      : db.select({ runId: runFerments.runId, fermentId: runFerments.fermentId, litres: runFerments.litres }).from(runFerments)
    ).where(and(eq(runFerments.workspaceId, workspaceId), inRuns(runFerments.runId))),
    (range
      ? db.select({ runId: runFeeds.runId, feedRunId: runFeeds.feedRunId, litres: runFeeds.litres }).from(runFeeds).innerJoin(runs, eq(runs.id, runFeeds.runId))
      : db.select({ runId: runFeeds.runId, feedRunId: runFeeds.feedRunId, litres: runFeeds.litres }).from(runFeeds)
    ).where(and(eq(runFeeds.workspaceId, workspaceId), inRuns(runFeeds.runId))),
    (range
      ? db
          .select({ runId: runOutcomes.runId, litres: sql<number>`SUM(${runOutcomes.volumeLitres})` })
          .from(runOutcomes)
          .innerJoin(runs, eq(runs.id, runOutcomes.runId))
      : db.select({ runId: runOutcomes.runId, litres: sql<number>`SUM(${runOutcomes.volumeLitres})` }).from(runOutcomes)
    )
      .where(and(eq(runOutcomes.workspaceId, workspaceId), eq(runOutcomes.fraction, 'low_wines'), inRuns(runOutcomes.runId)))
      .groupBy(runOutcomes.runId),
  ]);
  type Out = R & Pick<BoardRun, 'ferments' | 'feeds' | 'lowWinesLitres'>;
  const byRun = new Map<number, Out>();
  const out = rows.map((r) => {
    const run: Out = { ...r, ferments: [], feeds: [], lowWinesLitres: null };
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
