import { gzipSync } from 'node:zlib';
import { createHash } from 'node:crypto';
/**
 * The board's read side: stills, runs, ferments with their forecasts, fermenters and
 * people for a time range, in one payload; plus warnings and move suggestions.
 */
import { and, asc, eq, gte, inArray, isNull, lt, ne, or, sql } from 'drizzle-orm';
import { getDb } from '../db/client';
import { fermentForecasts, fermenters, ferments, memberships, runFerments, runs, users, washTypes } from '../db/schema';
import {
  dehydrateRun,
  toFermentState,
  toScheduleRun,
  toScheduleStill,
  type BoardFerment,
  type BoardPayload,
  type BoardRun,
  type BoardStill,
} from '../lib/board';
import { computeRunWarnings, earliestStartNotAtRisk, findEarliestSlots, runChargeLitres, type FermentStatus, type Slot, type Warning } from '../lib/schedule';
import { getForecasts } from './forecasts';
import { fermentJson } from './ferment-lookup';
import { notFound } from './http';
import type { Ctx } from './context';
import { selectRuns } from './run-query';
import { getRun } from './runs';
import { listStills } from './stills';
import { SnapshotCache } from './snapshot-cache';

const DAY_MS = 86_400_000;
const HOUR_MS = 3_600_000;
/** Runs this far either side of the range come along, so warnings at its edges see their neighbours. */
const CONTEXT_MS = 3 * DAY_MS;
export const MAX_RANGE_DAYS = 50;

type FermentBase = Omit<BoardFerment, 'status' | 'reason' | 'readyAt' | 'readyP10' | 'readyP90' | 'confirmedAt' | 'lastSg' | 'predictedFg'>;

/**
 * Forecast state of ferments. Cached forecasts computed within the current hour are
 * trusted as they are (every change of readings recomputes them at once, and their cache
 * key changes only by the hour otherwise); the rest go through getForecasts.
 */
async function withForecasts(ctx: Ctx, base: FermentBase[], now: Date): Promise<BoardFerment[]> {
  if (base.length === 0) return [];
  const db = getDb();
  const workspaceId = ctx.ws.id;
  const ids = base.map((f) => f.id);
  const hourStart = new Date(Math.floor(now.getTime() / HOUR_MS) * HOUR_MS);
  const cached = await db
    .select({
      fermentId: fermentForecasts.fermentId,
      status: fermentForecasts.status,
      readyAt: fermentForecasts.readyAt,
      readyP10: fermentForecasts.readyP10,
      readyP90: fermentForecasts.readyP90,
      ruleMetAt: fermentForecasts.ruleMetAt,
      predictedFg: fermentForecasts.predictedFg,
      computedAt: fermentForecasts.computedAt,
      reason: sql<string | null>`JSON_UNQUOTE(JSON_EXTRACT(${fermentForecasts.payload}, '$.reason'))`,
      lastSg: sql<string | null>`JSON_EXTRACT(${fermentForecasts.payload}, '$.lastSg')`,
    })
    .from(fermentForecasts)
    .where(and(eq(fermentForecasts.workspaceId, workspaceId), inArray(fermentForecasts.fermentId, ids)));
  const fresh = new Map<
    number,
    {
      status: string;
      reason: string;
      readyAt: Date | null;
      readyP10: Date | null;
      readyP90: Date | null;
      ruleMetAt: Date | null;
      predictedFg: number | null;
      lastSg: number | null;
    }
  >();
  const baseById = new Map(base.map((b) => [b.id, b]));
  for (const c of cached) {
    const f = baseById.get(c.fermentId);
    if (c.computedAt.getTime() >= hourStart.getTime() || (f?.emptiedAt && c.computedAt.getTime() >= f.emptiedAt.getTime())) {
      fresh.set(c.fermentId, { ...c, reason: c.reason ?? '', lastSg: c.lastSg === null || c.lastSg === 'null' ? null : Number(c.lastSg) });
    }
  }
  const missing = ids.filter((id) => !fresh.has(id));
  if (missing.length) {
    const computed = await getForecasts(ctx, missing, now);
    for (const [id, f] of computed) fresh.set(id, f);
  }
  return base.map((f) => {
    const fc = fresh.get(f.id);
    return {
      ...f,
      status: (fc?.status ?? 'insufficient_data') as FermentStatus,
      reason: fc?.reason ?? 'No forecast yet.',
      readyAt: fc?.readyAt ?? null,
      readyP10: fc?.readyP10 ?? null,
      readyP90: fc?.readyP90 ?? null,
      confirmedAt: fc?.status === 'finished' ? (fc.ruleMetAt ?? null) : null,
      lastSg: fc?.lastSg ?? null,
      predictedFg: fc?.predictedFg ?? null,
    };
  });
}

const fermentColumns = {
  id: ferments.id,
  code: ferments.code,
  volumeLitres: ferments.volumeLitres,
  fermenterId: ferments.fermenterId,
  washCategory: washTypes.category,
  pitchedAt: ferments.pitchedAt,
  emptiedAt: ferments.emptiedAt,
};

export interface BoardData {
  stills: BoardStill[];
  runs: BoardRun[];
  ferments: BoardFerment[];
  fermenters: BoardPayload['fermenters'];
  people: BoardPayload['people'];
}

/**
 * Everything the board draws for [from, to): the active stills, runs overlapping the range
 * (and a few days either side), the stripping runs feeding them, other runs drawing on the
 * same ferments, the ferments in their fermenters or linked to those runs, with forecasts.
 */
export async function loadBoardData(ctx: Ctx, from: Date, to: Date, now: Date): Promise<BoardData> {
  const db = getDb();
  const ws = ctx.ws.id;
  const ctxFrom = new Date(from.getTime() - CONTEXT_MS);
  const ctxTo = new Date(to.getTime() + CONTEXT_MS);
  const [stillRows, inRange, fermenterRows, people, openFerments] = await Promise.all([
    listStills(ctx),
    selectRuns(db, ws, { window: { from: ctxFrom, to: ctxTo } }),
    db
      .select({ id: fermenters.id, name: fermenters.name, capacityLitres: fermenters.capacityLitres })
      .from(fermenters)
      .where(and(eq(fermenters.workspaceId, ws), eq(fermenters.active, true)))
      .orderBy(asc(fermenters.position), asc(fermenters.id)),
    db
      .select({ id: users.id, name: users.name, role: memberships.role })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(eq(memberships.workspaceId, ws))
      .orderBy(asc(users.name)),
    db
      .select(fermentColumns)
      .from(ferments)
      .innerJoin(washTypes, eq(washTypes.id, ferments.washTypeId))
      .where(and(eq(ferments.workspaceId, ws), lt(ferments.pitchedAt, ctxTo), or(isNull(ferments.emptiedAt), gte(ferments.emptiedAt, ctxFrom)))),
  ]);

  // Runs outside the window that matter to runs inside it: feeders, and other runs on the same washes.
  const have = new Set(inRange.map((r) => r.id));
  const fermentIds = new Set<number>(openFerments.map((f) => f.id));
  const extraRunIds = new Set<number>();
  for (const r of inRange) {
    for (const f of r.feeds) if (!have.has(f.runId)) extraRunIds.add(f.runId);
    for (const c of r.ferments) fermentIds.add(c.fermentId);
  }
  const linkedFermentIds = inRange.flatMap((r) => r.ferments.map((c) => c.fermentId));
  if (linkedFermentIds.length) {
    const sharing = await db
      .select({ runId: runFerments.runId })
      .from(runFerments)
      .where(and(eq(runFerments.workspaceId, ws), inArray(runFerments.fermentId, [...new Set(linkedFermentIds)])));
    for (const s of sharing) if (!have.has(s.runId)) extraRunIds.add(s.runId);
  }
  let allRuns = inRange;
  if (extraRunIds.size) {
    const extra = await selectRuns(db, ws, { ids: [...extraRunIds] });
    for (const r of extra) for (const c of r.ferments) fermentIds.add(c.fermentId);
    allRuns = [...inRange, ...extra];
  }
  const openIds = new Set(openFerments.map((f) => f.id));
  const missingFerments = [...fermentIds].filter((id) => !openIds.has(id));
  const linkedFerments = missingFerments.length
    ? await db
        .select(fermentColumns)
        .from(ferments)
        .innerJoin(washTypes, eq(washTypes.id, ferments.washTypeId))
        .where(and(eq(ferments.workspaceId, ws), inArray(ferments.id, missingFerments)))
    : [];
  const fermentList = await withForecasts(ctx, [...openFerments, ...linkedFerments], now);
  return { stills: stillRows, runs: allRuns, ferments: fermentList, fermenters: fermenterRows, people };
}

/**
 * Recently built payloads, kept while the workspace's fingerprint and the hour are unchanged, for
 * at most five minutes (forecast statuses move with time alone); the island draws "now" from its own clock.
 */
const boardCache = new SnapshotCache<BoardBody>(5 * 60_000);

/** The board as bytes ready to send: plain and gzip-compressed JSON and a validator. */
export interface BoardBody {
  json: Uint8Array<ArrayBuffer>;
  gzip: Uint8Array<ArrayBuffer>;
  etag: string;
}

function boardBody(payload: BoardPayload): BoardBody {
  const json = new Uint8Array(Buffer.from(JSON.stringify(payload)));
  return { json, gzip: new Uint8Array(gzipSync(json, { level: 6 })), etag: `W/"${createHash('sha1').update(json).digest('base64url')}"` };
}

/**
 * The board payload as a JSON string, served from a short cache while nothing in the
 * workspace changed: the 30-second refresh of every open board then costs one small query.
 */
export async function getBoardBody(ctx: Ctx, from: Date, to: Date, now = new Date(), opts: { fresh?: boolean } = {}): Promise<BoardBody> {
  const { ws } = ctx;
  const key = `${ws.id}|${ws.timeZone}|${ws.stableDays}|${ws.atRiskThreshold}|${from.getTime()}|${to.getTime()}`;
  return boardCache.get(ws.id, key, now, async () => boardBody(await getBoard(ctx, from, to, now)), opts);
}

export async function getBoard(ctx: Ctx, from: Date, to: Date, now = new Date()): Promise<BoardPayload> {
  const data = await loadBoardData(ctx, from, to, now);
  return {
    range: { from: from.toISOString(), to: to.toISOString() },
    timeZone: ctx.ws.timeZone,
    now: now.toISOString(),
    stableDays: ctx.ws.stableDays,
    atRiskThreshold: ctx.ws.atRiskThreshold,
    stills: data.stills.map(({ id, name, kind, capacityLitres, heatingKw, operatingHours, closures, cleaningAfterRunMinutes, typicalMinutes, position }) => ({
      id,
      name,
      kind,
      capacityLitres,
      heatingKw,
      operatingHours,
      closures,
      cleaningAfterRunMinutes,
      typicalMinutes,
      position,
    })),
    runs: data.runs.map(dehydrateRun),
    ferments: data.ferments.map(fermentJson),
    fermenters: data.fermenters,
    people: data.people,
  };
}

/** The board data around one run (a week either side), for its warnings and its page. */
export async function runContext(ctx: Ctx, run: BoardRun, now = new Date()): Promise<BoardData> {
  return loadBoardData(ctx, new Date(run.startsAt.getTime() - 4 * DAY_MS), new Date(run.endsAt.getTime() + 4 * DAY_MS), now);
}

export async function warningsForRun(ctx: Ctx, run: BoardRun, now = new Date()): Promise<Warning[]> {
  const data = await runContext(ctx, run, now);
  const still = data.stills.find((s) => s.id === run.stillId);
  if (!still) return [];
  const others = data.runs.filter((r) => r.id !== run.id).map(toScheduleRun);
  return computeRunWarnings(toScheduleRun(run), {
    still: toScheduleStill(still),
    runs: [...others, toScheduleRun(run)],
    ferments: new Map(data.ferments.map((f) => [f.id, toFermentState(f)])),
    timeZone: ctx.ws.timeZone,
    now,
    atRiskThreshold: ctx.ws.atRiskThreshold,
  });
}

export interface Suggestions {
  runId: number;
  notBefore: string;
  slots: Array<{ stillId: number; startsAt: string; endsAt: string }>;
}

/**
 * Earliest feasible slots for a run at risk: on its still or another that takes the
 * charge, from when it is no longer at risk (the at-risk threshold quantile of its washes'
 * ready times; a fresh stability period for a stalled or souring wash), inside operating
 * hours with room for the run and its cleaning before closing, without overlapping anything
 * (cleaning slots included). The run's own still comes first on equal start times.
 */
export async function suggestSlots(ctx: Ctx, runId: number, now = new Date(), limit = 3): Promise<Suggestions> {
  const run = await getRun(ctx, runId);
  if (run.status === 'cancelled' || run.status === 'done' || run.status === 'running') throw notFound('That run is not open to a move.');
  const horizonDays = 28;
  const probe = await loadBoardData(ctx, now, new Date(now.getTime() + (horizonDays + 2) * DAY_MS), now);
  const notBefore = earliestStartNotAtRisk(run, probe.ferments, now, ctx.ws.stableDays, ctx.ws.atRiskThreshold);
  const data =
    notBefore.getTime() > now.getTime() + DAY_MS ? await loadBoardData(ctx, notBefore, new Date(notBefore.getTime() + (horizonDays + 2) * DAY_MS), now) : probe;
  const own = data.stills.find((s) => s.id === run.stillId);
  const ordered = [...(own ? [own] : []), ...data.stills.filter((s) => s.id !== run.stillId)].map(toScheduleStill);
  const charge = runChargeLitres(run) ?? 0;
  const slots: Slot[] = findEarliestSlots({
    durationMinutes: Math.max(1, Math.round((run.endsAt.getTime() - run.startsAt.getTime()) / 60_000)),
    chargeLitres: charge,
    notBefore,
    stills: ordered,
    runs: data.runs.map(toScheduleRun),
    timeZone: ctx.ws.timeZone,
    excludeRunId: run.id,
    type: run.type,
    limit,
    horizonDays,
    slotMinutes: 30,
  });
  return {
    runId: run.id,
    notBefore: notBefore.toISOString(),
    slots: slots.map((s) => ({ stillId: s.stillId, startsAt: s.startsAt.toISOString(), endsAt: s.endsAt.toISOString() })),
  };
}

/** Today's runs per still for the day view (local day in the distillery's zone). */
export async function dayRuns(ctx: Ctx, from: Date, to: Date): Promise<BoardRun[]> {
  return selectRuns(getDb(), ctx.ws.id, { window: { from, to }, where: ne(runs.status, 'cancelled') });
}
