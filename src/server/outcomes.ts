/**
 * Run records: the charge and what came off the still (fractions with volume, alcoholmeter
 * reading and its temperature), strength at 20 °C (OIML R 22), LAA, and recovery against the
 * charge and against what the linked ferments were expected to give.
 *
 * A PUT replaces every fraction of the run in ONE transaction, together with the run's charge,
 * and may finish a running run (status done, finished_at, version and sequence bumped, as
 * runs.ts does for a finish).
 */
import { and, asc, eq, inArray, sql } from 'drizzle-orm';
import { z } from 'zod';
import { getDb, type Db } from '../db/client';
import { ferments, runFerments, runOutcomes, runs, stills } from '../db/schema';
import { OUTCOME_FRACTIONS } from '../lib/vocabulary';
import {
  chargedLaa,
  computeFraction,
  expectedLaaFromFeeds,
  expectedLaaFromFerments,
  recoveryRatio,
  sumLaa,
  validateRunRecord,
  EXPECTED_LAA_FORMULA,
  FRACTIONS_BY_RUN_TYPE,
  type Fraction,
  type FractionResult,
} from '../lib/reports';
import { laaToProofGallons } from '../lib/alcohol';
import { runChargeLitres } from '../lib/schedule';
import { audit } from './audit';
import { getForecasts } from './forecasts';
import { HttpError, conflict, notFound } from './http';
import type { Ctx } from './context';
import { typedNumber } from './numbers';
import { getRun, inRetriedTransaction, onRunChanged, runJson } from './runs';
import { operatorName, selectRun, stillCapacityLitres, stillName } from './run-query';

type Reader = Pick<Db, 'select'>;

export const outcomesBodySchema = z.object({
  version: z.number().int().positive(),
  chargeLitres: typedNumber(z.number()).nullable().optional(),
  chargeAbv: typedNumber(z.number(), { grouping: false }).nullable().optional(),
  fractions: z
    .array(
      z.object({
        fraction: z.enum(OUTCOME_FRACTIONS),
        volumeLitres: typedNumber(z.number()),
        alcoholmeterReading: typedNumber(z.number(), { grouping: false }),
        readingTempC: typedNumber(z.number(), { grouping: false }),
        cutNote: z.string().trim().max(200).nullable().optional(),
      }),
    )
    .max(OUTCOME_FRACTIONS.length),
  /** Mark a running run done in the same transaction. */
  finish: z.boolean().optional(),
});
export type OutcomesBody = z.infer<typeof outcomesBodySchema>;

export interface RecordedFraction extends FractionResult {
  id: number;
}

export interface FermentLine {
  fermentId: number;
  code: string;
  litres: number;
  og: number;
  fg: number | null;
  fgSource: 'last reading' | 'predicted' | null;
}

export interface RunRecord {
  run: {
    id: number;
    type: string;
    status: string;
    version: number;
    stillId: number;
    stillName: string;
    stillCapacityLitres: number;
    startsAt: Date;
    endsAt: Date;
    startedAt: Date | null;
    finishedAt: Date | null;
    operatorName: string | null;
    chargeLitres: number | null;
    chargeAbv: number | null;
  };
  allowedFractions: readonly Fraction[];
  fractions: RecordedFraction[];
  ferments: FermentLine[];
  feeds: Array<{ runId: number; litres: number; lowWinesLitres: number | null; expectedLaa: number | null }>;
  totals: {
    collectedLaa: number;
    collectedProofGallons: number;
    chargedLaa: number | null;
    recovery: number | null;
    expectedLaa: number | null;
    recoveryVsExpected: number | null;
  };
  expectedFormula: string;
}

/** The FG a ferment's expected LAA uses: its last reading once it is finished, stalled, soured or emptied, else the predicted FG. */
function fgFor(
  f: { emptiedAt: Date | null },
  fc: { status: string; lastSg: number | null; predictedFg: number | null } | undefined,
): { fg: number | null; source: FermentLine['fgSource'] } {
  if (!fc) return { fg: null, source: null };
  const done = f.emptiedAt !== null || fc.status === 'finished' || fc.status === 'stalled' || fc.status === 'souring';
  if (done && fc.lastSg !== null) return { fg: fc.lastSg, source: 'last reading' };
  if (fc.predictedFg !== null) return { fg: fc.predictedFg, source: 'predicted' };
  if (fc.lastSg !== null) return { fg: fc.lastSg, source: 'last reading' };
  return { fg: null, source: null };
}

/** Ferment lines of stripping runs with the gravity each was expected to finish at. */
export async function fermentLinesFor(ctx: Ctx, runIds: number[], db: Reader = getDb()): Promise<Map<number, FermentLine[]>> {
  const workspaceId = ctx.ws.id;
  const out = new Map<number, FermentLine[]>();
  if (runIds.length === 0) return out;
  const lines = await db
    .select({
      runId: runFerments.runId,
      fermentId: runFerments.fermentId,
      litres: runFerments.litres,
      code: ferments.code,
      og: ferments.og,
      emptiedAt: ferments.emptiedAt,
    })
    .from(runFerments)
    .innerJoin(ferments, and(eq(ferments.id, runFerments.fermentId), eq(ferments.workspaceId, workspaceId)))
    .where(and(eq(runFerments.workspaceId, workspaceId), inArray(runFerments.runId, runIds)));
  const forecasts = lines.length ? await getForecasts(ctx, [...new Set(lines.map((l) => l.fermentId))]) : new Map();
  for (const l of lines) {
    const { fg, source } = fgFor(l, forecasts.get(l.fermentId));
    const list = out.get(l.runId) ?? [];
    list.push({ fermentId: l.fermentId, code: l.code, litres: l.litres, og: l.og, fg, fgSource: source });
    out.set(l.runId, list);
  }
  return out;
}

/** Expected LAA per stripping run from its ferments (null when unknown). */
export function expectedForStripping(lines: FermentLine[] | undefined): number | null {
  return lines?.length ? expectedLaaFromFerments(lines) : null;
}

async function loadFractions(db: Reader, workspaceId: number, runIds: number[]) {
  if (runIds.length === 0) return [];
  return db
    .select()
    .from(runOutcomes)
    .where(and(eq(runOutcomes.workspaceId, workspaceId), inArray(runOutcomes.runId, runIds)))
    .orderBy(asc(runOutcomes.id));
}

const FRACTION_ORDER: Record<Fraction, number> = { low_wines: 0, heads: 1, hearts: 2, tails: 3, feints: 4 };

export async function getRunRecord(ctx: Ctx, runId: number): Promise<RunRecord> {
  const db = getDb();
  const workspaceId = ctx.ws.id;
  const run = await selectRun(db, workspaceId, runId, { stillName, stillCapacityLitres, operatorName, startedAt: runs.startedAt, finishedAt: runs.finishedAt });
  if (!run) throw notFound('No such run in this distillery.');
  const row: RunRecord['run'] = {
    id: run.id,
    type: run.type,
    status: run.status,
    version: run.version,
    stillId: run.stillId,
    stillName: run.stillName,
    stillCapacityLitres: run.stillCapacityLitres,
    startsAt: run.startsAt,
    endsAt: run.endsAt,
    startedAt: run.startedAt,
    finishedAt: run.finishedAt,
    operatorName: run.operatorName,
    chargeLitres: run.chargeLitres,
    chargeAbv: run.chargeAbv,
  };
  const fr = (await loadFractions(db, workspaceId, [runId]))
    .map((o) => ({
      id: o.id,
      fraction: o.fraction,
      volumeLitres: o.volumeLitres,
      alcoholmeterReading: o.alcoholmeterReading,
      readingTempC: o.readingTempC,
      cutNote: o.cutNote,
      abv20: o.abv20,
      laa: o.laa,
      proofGallons: laaToProofGallons(o.laa),
    }))
    .sort((a, b) => FRACTION_ORDER[a.fraction] - FRACTION_ORDER[b.fraction]);
  const feedRows = run.feeds;
  const lineRuns = [runId, ...feedRows.map((f) => f.runId)];
  const lines = await fermentLinesFor(ctx, lineRuns, db);
  const feedLowWines = await loadFractions(
    db,
    workspaceId,
    feedRows.map((f) => f.runId),
  );
  const feeds = feedRows.map((f) => {
    const lw = feedLowWines.filter((o) => o.runId === f.runId && o.fraction === 'low_wines');
    return {
      runId: f.runId,
      litres: f.litres,
      lowWinesLitres: lw.length ? lw.reduce((s, o) => s + o.volumeLitres, 0) : null,
      expectedLaa: expectedForStripping(lines.get(f.runId)),
    };
  });
  const collected = sumLaa(fr);
  const charged = chargedLaa({ litres: runChargeLitres(run), abv: run.chargeAbv });
  const expected = row.type === 'stripping' ? expectedForStripping(lines.get(runId)) : expectedLaaFromFeeds(feeds);
  return {
    run: row,
    allowedFractions: FRACTIONS_BY_RUN_TYPE[run.type],
    fractions: fr,
    ferments: lines.get(runId) ?? [],
    feeds,
    totals: {
      collectedLaa: collected,
      collectedProofGallons: laaToProofGallons(collected),
      chargedLaa: charged,
      recovery: recoveryRatio(collected, charged),
      expectedLaa: expected,
      recoveryVsExpected: fr.length ? recoveryRatio(collected, expected) : null,
    },
    expectedFormula: EXPECTED_LAA_FORMULA,
  };
}

/** Replace the run's fractions (and charge) in one transaction; optionally finish a running run. */
export async function saveRunRecord(ctx: Ctx, runId: number, body: OutcomesBody): Promise<RunRecord> {
  const {
    ws: { id: workspaceId },
    actor: { userId },
  } = ctx;
  await inRetriedTransaction(async (tx) => {
    const [locked] = await tx
      .select({
        id: runs.id,
        type: runs.type,
        status: runs.status,
        version: runs.version,
        chargeLitres: runs.chargeLitres,
        chargeAbv: runs.chargeAbv,
        capacity: stills.capacityLitres,
      })
      .from(runs)
      .innerJoin(stills, eq(stills.id, runs.stillId))
      .where(and(eq(runs.id, runId), eq(runs.workspaceId, workspaceId)))
      .for('update');
    if (!locked) throw notFound('No such run in this distillery.');
    const before = await getRun(ctx, runId, tx);
    if (locked.version !== body.version) {
      throw new HttpError(409, 'stale', 'Someone changed this run since you loaded it.', undefined, { current: runJson(before) });
    }
    if (locked.status !== 'running' && locked.status !== 'done') {
      throw conflict(`A ${locked.status} run has nothing to record yet: start it first.`, { current: runJson(before) });
    }
    if (body.finish && locked.status !== 'running') throw conflict(`A ${locked.status} run cannot be finished.`, { current: runJson(before) });
    const charge = {
      litres: body.chargeLitres !== undefined ? body.chargeLitres : locked.chargeLitres,
      abv: body.chargeAbv !== undefined ? body.chargeAbv : locked.chargeAbv,
    };
    const fields = validateRunRecord({ runType: locked.type, stillCapacityLitres: locked.capacity, charge, fractions: body.fractions });
    if (Object.keys(fields).length) {
      // The message in words; `fields` names the field (forms show each message beside its field).
      const [, message] = Object.entries(fields)[0]!;
      throw new HttpError(400, 'invalid', message, fields);
    }
    const computed = body.fractions.map(computeFraction);
    await tx.delete(runOutcomes).where(and(eq(runOutcomes.workspaceId, workspaceId), eq(runOutcomes.runId, runId)));
    if (computed.length) {
      await tx.insert(runOutcomes).values(
        computed.map((f) => ({
          workspaceId,
          runId,
          fraction: f.fraction,
          volumeLitres: f.volumeLitres,
          alcoholmeterReading: f.alcoholmeterReading,
          readingTempC: f.readingTempC,
          abv20: f.abv20,
          laa: f.laa,
          cutNote: f.cutNote?.length ? f.cutNote : null,
          recordedBy: userId,
        })),
      );
    }
    const finishing = body.finish === true;
    const now = new Date();
    await tx
      .update(runs)
      .set({
        chargeLitres: charge.litres,
        chargeAbv: charge.abv,
        version: sql`${runs.version} + 1` as unknown as number,
        ...(finishing ? { status: 'done' as const, finishedAt: now, sequence: sql`${runs.sequence} + 1` as unknown as number } : {}),
      })
      .where(and(eq(runs.id, runId), eq(runs.workspaceId, workspaceId)));
    if (finishing) {
      // As a finish in runs.ts: the still row is bumped so a concurrent writer on another node conflicts.
      await tx
        .update(stills)
        .set({ updatedAt: sql`GREATEST(CURRENT_TIMESTAMP(3), ${stills.updatedAt} + INTERVAL 1000 MICROSECOND)` })
        .where(and(eq(stills.workspaceId, workspaceId), eq(stills.id, before.stillId)));
    }
    const after = await getRun(ctx, runId, tx);
    await audit(
      {
        workspaceId,
        userId,
        action: 'run.record',
        entityType: 'run',
        entityId: runId,
        details: {
          charge,
          fractions: computed.map((f) => ({
            fraction: f.fraction,
            volumeLitres: f.volumeLitres,
            reading: f.alcoholmeterReading,
            tempC: f.readingTempC,
            laa: Math.round(f.laa * 1000) / 1000,
          })),
          ...(finishing ? { finished: true } : {}),
        },
      },
      tx,
    );
    if (finishing) {
      await audit({ workspaceId, userId, action: 'run.finish', entityType: 'run', entityId: runId, details: { via: 'run record' } }, tx);
      await onRunChanged(tx, { kind: 'finish', workspaceId, before, after, actorId: userId });
    } else {
      await onRunChanged(tx, { kind: 'update', workspaceId, before, after, actorId: userId });
    }
  });
  return getRunRecord(ctx, runId);
}

/** JSON for the API (ISO times). */
export function runRecordJson(r: RunRecord): unknown {
  return JSON.parse(JSON.stringify(r));
}
