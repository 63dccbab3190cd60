/**
 * The manager's view: loads the workspace's runs, ferments, forecasts and run records for a
 * date range (and optionally one still) and hands them to the pure aggregations in lib/reports.
 */
import { and, asc, eq, gt, gte, inArray, isNotNull, lt, ne, or } from 'drizzle-orm';
import { z } from 'zod';
import { getDb } from '../db/client';
import { fermentIngredients, ferments, forecastHistory, runOutcomes, runs, stills, users, washTypes } from '../db/schema';
import {
  accuracyByMonth,
  accuracyPoints,
  chargedLaa,
  cycleTimes,
  expectedLaaFromFeeds,
  recoveryRatio,
  sumLaa,
  throughputByWeek,
  troubleRates,
  utilisationByStillWeek,
  weeksIn,
  yieldPerTonne,
  type AccuracyMonth,
  type AccuracyPoint,
  type CycleRow,
  type ThroughputWeek,
  type TroubleRate,
  type UtilisationRow,
  type YieldRow,
} from '../lib/reports';
import {
  addDaysYmd,
  isPlanningDate,
  lineLitres,
  PLANNING_YEARS,
  runChargeLitres,
  wallClock,
  zonedDateTime,
  type FermentState,
  type TimeRange,
} from '../lib/schedule';
import { getForecasts, type ForecastSummary } from './forecasts';
import { invalid } from './http';
import { expectedForStripping, fermentLinesFor } from './outcomes';
import type { Ctx } from './context';
import { selectRuns } from './run-query';
import { listStills, type StillRow } from './stills';

const DAY_MS = 86_400_000;
/** Longest range a report covers (bounds the work of one request). */
export const MAX_REPORT_DAYS = 731;
/** How far before the range the runs are read, so a still's previous run is known for idle-waiting. */
const LOOKBACK_DAYS = 21;
/** Ferments pitched up to this long before the range can finish inside it. */
const FERMENT_LOOKBACK_DAYS = 60;

const ymd = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Use a date as YYYY-MM-DD.')
  .refine(isPlanningDate, `Use a real date between ${PLANNING_YEARS.min} and ${PLANNING_YEARS.max}.`);
export const reportQuerySchema = z.object({
  from: ymd.optional(),
  to: ymd.optional(),
  still: z
    .string()
    .regex(/^\d{1,15}$/, 'Pick a still from the list.')
    .optional()
    .or(z.literal('')),
});
export type ReportQuery = z.infer<typeof reportQuerySchema>;

export interface ReportFilters {
  from: string;
  to: string;
  stillId: number | null;
  range: TimeRange;
}

function validYmd(s: string): boolean {
  const d = new Date(`${s}T00:00:00Z`);
  return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s;
}

/** Filters from the query: default = eight ISO weeks, the last six done and the next two booked. */
export function resolveFilters(q: ReportQuery | undefined, timeZone: string, now = new Date()): ReportFilters {
  const today = wallClock(now, timeZone).ymd;
  const weekday = (new Date(`${today}T00:00:00Z`).getUTCDay() + 6) % 7; // Monday = 0
  const sunday = addDaysYmd(today, 6 - weekday);
  const to = q?.to ?? addDaysYmd(sunday, 14);
  const from = q?.from ?? addDaysYmd(to, -55);
  if (!validYmd(from)) throw invalid('from', 'That is not a calendar date.');
  if (!validYmd(to)) throw invalid('to', 'That is not a calendar date.');
  if (from > to) throw invalid('to', 'The end date is before the start date.');
  const range = { start: zonedDateTime(from, 0, timeZone), end: zonedDateTime(addDaysYmd(to, 1), 0, timeZone) };
  if ((range.end.getTime() - range.start.getTime()) / DAY_MS > MAX_REPORT_DAYS + 1) throw invalid('from', `A report covers at most ${MAX_REPORT_DAYS} days.`);
  const stillId = q?.still ? Number(q.still) : null;
  return { from, to, stillId, range };
}

export interface RunRecovery {
  runId: number;
  stillName: string;
  type: string;
  finishedAt: Date;
  chargedLaa: number | null;
  collectedLaa: number;
  heartsLaa: number;
  recovery: number | null;
  expectedLaa: number | null;
  recoveryVsExpected: number | null;
}

export interface Report {
  filters: ReportFilters;
  stills: Array<Pick<StillRow, 'id' | 'name'>>;
  utilisation: UtilisationRow[];
  cycle: CycleRow[];
  trouble: TroubleRate[];
  accuracy: { points: AccuracyPoint[]; months: AccuracyMonth[] };
  throughput: ThroughputWeek[];
  yields: YieldRow[];
  recoveries: RunRecovery[];
}

function loadRunsAround(workspaceId: number, range: TimeRange, stillId: number | null) {
  const from = new Date(range.start.getTime() - LOOKBACK_DAYS * DAY_MS);
  return selectRuns(getDb(), workspaceId, {
    extra: { finishedAt: runs.finishedAt },
    where: and(
      ne(runs.status, 'cancelled'),
      stillId ? eq(runs.stillId, stillId) : undefined,
      or(
        and(lt(runs.startsAt, range.end), gt(runs.endsAt, from)),
        and(isNotNull(runs.finishedAt), gte(runs.finishedAt, range.start), lt(runs.finishedAt, range.end)),
      ),
    ),
  });
}

function toState(
  f: { id: number; code: string; volumeLitres: number; pitchedAt: Date; emptiedAt: Date | null },
  fc: ForecastSummary | undefined,
): FermentState {
  return {
    id: f.id,
    code: f.code,
    volumeLitres: f.volumeLitres,
    pitchedAt: f.pitchedAt,
    emptiedAt: f.emptiedAt,
    status: fc?.status ?? 'insufficient_data',
    readyAt: fc?.readyAt ?? null,
    readyP10: fc?.readyP10 ?? null,
    readyP90: fc?.readyP90 ?? null,
    confirmedAt: fc?.ruleMetAt ?? null,
  };
}

export async function getReport(ctx: Ctx, filters: ReportFilters, now = new Date()): Promise<Report> {
  const db = getDb();
  const { range } = filters;
  const scope = ctx.ws;
  const tz = scope.timeZone;
  const allStills = await listStills(ctx, { includeInactive: true });
  if (filters.stillId !== null && !allStills.some((s) => s.id === filters.stillId)) throw invalid('still', 'That still is not in this distillery.');
  const theStills = allStills.filter((s) => (filters.stillId === null ? s.active : s.id === filters.stillId));
  const runRows = await loadRunsAround(scope.id, range, filters.stillId);

  // Ferments: those charged into the runs, and those pitched in time to finish inside the range.
  const fermentStart = new Date(range.start.getTime() - FERMENT_LOOKBACK_DAYS * DAY_MS);
  const chargedIds = [...new Set(runRows.flatMap((r) => r.ferments.map((f) => f.fermentId)))];
  const fermentRows = await db
    .select({
      id: ferments.id,
      code: ferments.code,
      volumeLitres: ferments.volumeLitres,
      pitchedAt: ferments.pitchedAt,
      emptiedAt: ferments.emptiedAt,
      washType: washTypes.name,
    })
    .from(ferments)
    .innerJoin(washTypes, eq(washTypes.id, ferments.washTypeId))
    .where(
      and(
        eq(ferments.workspaceId, scope.id),
        or(and(gte(ferments.pitchedAt, fermentStart), lt(ferments.pitchedAt, range.end)), chargedIds.length ? inArray(ferments.id, chargedIds) : undefined),
      ),
    );
  const forecasts = await getForecasts(
    ctx,
    fermentRows.map((f) => f.id),
    now,
  );
  const states = new Map(fermentRows.map((f) => [f.id, toState(f, forecasts.get(f.id))]));

  // Utilisation per still and week.
  const utilisation = utilisationByStillWeek(theStills, runRows, states, range, tz);

  // Cycle time: ferments confirmed finished inside the range.
  const inRange = (d: Date | null) => d !== null && d.getTime() >= range.start.getTime() && d.getTime() < range.end.getTime();
  const finishedInRange = fermentRows.filter((f) => inRange(forecasts.get(f.id)?.ruleMetAt ?? null));
  const cycle = cycleTimes(
    finishedInRange.map((f) => ({ washType: f.washType, pitchedAt: f.pitchedAt, ruleMetAt: forecasts.get(f.id)!.ruleMetAt })),
    tz,
  );

  // Stall / souring: ferments pitched inside the range, every status their forecast has shown.
  const pitchedInRange = fermentRows.filter((f) => inRange(f.pitchedAt));
  const historyIds = [...new Set([...pitchedInRange, ...finishedInRange].map((f) => f.id))];
  const history = historyIds.length
    ? await db
        .select({
          fermentId: forecastHistory.fermentId,
          asOf: forecastHistory.asOf,
          status: forecastHistory.status,
          readyAt: forecastHistory.readyAt,
          readyP10: forecastHistory.readyP10,
          readyP90: forecastHistory.readyP90,
        })
        .from(forecastHistory)
        .where(and(eq(forecastHistory.workspaceId, scope.id), inArray(forecastHistory.fermentId, historyIds)))
        .orderBy(asc(forecastHistory.asOf))
    : [];
  const historyOf = (id: number) => history.filter((h) => h.fermentId === id);
  const trouble = troubleRates(
    pitchedInRange.map((f) => ({
      washType: f.washType,
      statuses: [...historyOf(f.id).map((h) => h.status), forecasts.get(f.id)?.status ?? 'insufficient_data'],
    })),
  );

  // Forecast accuracy three days ahead.
  const points = accuracyPoints(
    finishedInRange.map((f) => ({ fermentId: f.id, code: f.code, ruleMetAt: forecasts.get(f.id)!.ruleMetAt!, history: historyOf(f.id) })),
  );
  const accuracy = { points, months: accuracyByMonth(points, tz) };

  // Done runs finished inside the range: throughput, recovery, yield.
  const doneRuns = runRows.filter((r) => r.status === 'done' && inRange(r.finishedAt ?? r.endsAt));
  const doneIds = doneRuns.map((r) => r.id);
  const feedIds = [...new Set(doneRuns.flatMap((r) => r.feeds.map((f) => f.runId)))];
  const outcomeRows =
    doneIds.length || feedIds.length
      ? await db
          .select({ runId: runOutcomes.runId, fraction: runOutcomes.fraction, volumeLitres: runOutcomes.volumeLitres, laa: runOutcomes.laa })
          .from(runOutcomes)
          .where(and(eq(runOutcomes.workspaceId, scope.id), inArray(runOutcomes.runId, [...new Set([...doneIds, ...feedIds])])))
      : [];
  const fractionsOf = (id: number) => outcomeRows.filter((o) => o.runId === id);
  const washLitres = (r: (typeof doneRuns)[number]) => runChargeLitres(r) ?? 0;
  const throughput = throughputByWeek(
    doneRuns.map((r) => ({
      type: r.type,
      finishedAt: r.finishedAt ?? r.endsAt,
      startsAt: r.startsAt,
      endsAt: r.endsAt,
      startedAt: r.startedAt ?? null,
      washLitres: washLitres(r),
      fractions: fractionsOf(r.id),
    })),
    weeksIn(range, tz).map((w) => w.week),
    tz,
  );

  const lines = await fermentLinesFor(ctx, [...new Set([...doneIds, ...feedIds])]);
  const stillName = new Map(allStills.map((s) => [s.id, s.name]));
  const recoveries: RunRecovery[] = doneRuns
    .filter((r) => r.type === 'stripping' || r.type === 'spirit' || r.type === 'redistillation')
    .map((r) => {
      const fr = fractionsOf(r.id);
      const collected = sumLaa(fr);
      const charged = chargedLaa({ litres: runChargeLitres(r), abv: r.chargeAbv });
      const expected =
        r.type === 'stripping'
          ? expectedForStripping(lines.get(r.id))
          : expectedLaaFromFeeds(
              r.feeds.map((f) => {
                const lw = fractionsOf(f.runId).filter((o) => o.fraction === 'low_wines');
                return {
                  litres: f.litres,
                  lowWinesLitres: lw.length ? lw.reduce((s, o) => s + o.volumeLitres, 0) : null,
                  expectedLaa: expectedForStripping(lines.get(f.runId)),
                };
              }),
            );
      return {
        runId: r.id,
        stillName: stillName.get(r.stillId) ?? '',
        type: r.type,
        finishedAt: r.finishedAt ?? r.endsAt,
        chargedLaa: charged,
        collectedLaa: collected,
        heartsLaa: sumLaa(fr.filter((o) => o.fraction === 'hearts')),
        recovery: fr.length ? recoveryRatio(collected, charged) : null,
        expectedLaa: expected,
        recoveryVsExpected: fr.length ? recoveryRatio(collected, expected) : null,
      };
    })
    .sort((a, b) => b.finishedAt.getTime() - a.finishedAt.getTime());

  // Yield per tonne: ferments with a recipe, charged into stripping runs done in the range.
  const stripping = doneRuns.filter((r) => r.type === 'stripping' && r.ferments.length > 0);
  const yFermentIds = [...new Set(stripping.flatMap((r) => r.ferments.map((f) => f.fermentId)))];
  const ingredients = yFermentIds.length
    ? await db
        .select({ fermentId: fermentIngredients.fermentId, kg: fermentIngredients.quantityKg })
        .from(fermentIngredients)
        .where(and(eq(fermentIngredients.workspaceId, scope.id), inArray(fermentIngredients.fermentId, yFermentIds)))
    : [];
  const fermentById = new Map(fermentRows.map((f) => [f.id, f]));
  const yields = yieldPerTonne(
    yFermentIds.map((id) => ({
      fermentId: id,
      code: fermentById.get(id)?.code ?? `#${id}`,
      washType: fermentById.get(id)?.washType ?? '',
      ingredientsKg: ingredients.filter((i) => i.fermentId === id).reduce((s, i) => s + i.kg, 0),
      runs: stripping
        .filter((r) => r.ferments.some((f) => f.fermentId === id) && fractionsOf(r.id).some((o) => o.fraction === 'low_wines'))
        .map((r) => ({
          lowWinesLaa: sumLaa(fractionsOf(r.id).filter((o) => o.fraction === 'low_wines')),
          totalLitres: lineLitres(r.ferments),
          litres: r.ferments.find((f) => f.fermentId === id)!.litres,
        })),
    })),
  );

  return {
    filters,
    stills: allStills.filter((s) => s.active || s.id === filters.stillId).map((s) => ({ id: s.id, name: s.name })),
    utilisation,
    cycle,
    trouble,
    accuracy,
    throughput,
    yields,
    recoveries,
  };
}

/** JSON for the API (ISO times). */
export function reportJson(r: Report): unknown {
  return JSON.parse(JSON.stringify(r));
}

/** Runs of one local day for the printable run sheet, with still, operator and charge lines. */
export async function runSheet(ctx: Ctx, day: string) {
  if (!validYmd(day)) throw invalid('date', 'That is not a calendar date.');
  const db = getDb();
  const scope = ctx.ws;
  const start = zonedDateTime(day, 0, scope.timeZone);
  const end = zonedDateTime(addDaysYmd(day, 1), 0, scope.timeZone);
  const withLines = await selectRuns(db, scope.id, { window: { from: start, to: end }, where: ne(runs.status, 'cancelled') });
  const stillRows = await db
    .select({ id: stills.id, name: stills.name, capacityLitres: stills.capacityLitres, position: stills.position })
    .from(stills)
    .where(eq(stills.workspaceId, scope.id))
    .orderBy(asc(stills.position), asc(stills.id));
  const opIds = [...new Set(withLines.map((r) => r.operatorId).filter((x): x is number => x !== null))];
  const ops = opIds.length ? await db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, opIds)) : [];
  const fIds = [...new Set(withLines.flatMap((r) => r.ferments.map((f) => f.fermentId)))];
  const fs = fIds.length
    ? await db
        .select({ id: ferments.id, code: ferments.code })
        .from(ferments)
        .where(and(eq(ferments.workspaceId, scope.id), inArray(ferments.id, fIds)))
    : [];
  const fCode = new Map(fs.map((f) => [f.id, f.code]));
  const opName = new Map(ops.map((o) => [o.id, o.name]));
  return {
    day,
    stills: stillRows
      .map((s) => ({
        ...s,
        runs: withLines
          .filter((r) => r.stillId === s.id)
          .map((r) => ({
            ...r,
            operatorName: r.operatorId ? (opName.get(r.operatorId) ?? null) : null,
            fermentCodes: r.ferments.map((f) => ({ code: fCode.get(f.fermentId) ?? `#${f.fermentId}`, litres: f.litres })),
          })),
      }))
      .filter((s) => s.runs.length > 0),
  };
}
