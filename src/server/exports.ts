/**
 * Exports. CSVs go through lib/csv toCsv (RFC 4180 quoting, CRLF, formula-injection
 * neutralised: a text cell beginning with = + - @ TAB or CR gets a leading single quote).
 *
 * The manager's full export is ONE JSON document (no zip is available):
 *   { format: "plateau-workspace-export", version: 1, exportedAt, workspace, tables: { <table>: rows[] } }
 * holding every row of every table that belongs to the workspace. Secrets are left out:
 * password hashes, session ids, invitation / e-mail / calendar-feed token hashes, sign-in
 * throttle counters, and mail bodies (they can hold single-use links). Users appear only as
 * members of the workspace (id, e-mail, name, role).
 */
import { and, asc, eq, gte, inArray, isNull, lt } from 'drizzle-orm';
import { getDb } from '../db/client';
import * as t from '../db/schema';
import { toCsv } from '../lib/csv';
import { FRACTION_LABELS, chargedLaa, recoveryRatio, sumLaa, type UtilisationRow } from '../lib/reports';
import { runChargeLitres } from '../lib/schedule';
import type { Ctx } from './context';
import type { ReportFilters } from './reports';
import { operatorName, selectRuns, stillName } from './run-query';

export const CSV_CONTENT_TYPE = 'text/csv; charset=utf-8';

/** A file name built only from our own safe characters: never from user text. */
export function safeFileName(kind: string, filters: Pick<ReportFilters, 'from' | 'to'> | null, ext: 'csv' | 'json', stillId?: number | null): string {
  const clean = (s: string) => s.replace(/[^A-Za-z0-9-]/g, '');
  const parts = ['plateau', clean(kind)];
  if (filters) parts.push(clean(filters.from), 'to', clean(filters.to));
  if (stillId) parts.push(`still${Math.trunc(stillId)}`);
  return `${parts.join('-')}.${ext}`;
}

export function attachment(body: string, fileName: string, contentType: string): Response {
  return new Response(body, {
    status: 200,
    headers: {
      'content-type': contentType,
      'content-disposition': `attachment; filename="${fileName}"`,
      'cache-control': 'no-store',
      'x-content-type-options': 'nosniff',
    },
  });
}

const iso = (d: Date | null) => (d ? d.toISOString() : null);
const round = (n: number | null, dp: number) => (n === null ? null : Math.round(n * 10 ** dp) / 10 ** dp);

export const FERMENT_CSV_COLUMNS = [
  'ferment_code',
  'wash_type',
  'fermenter',
  'volume_litres',
  'pitched_at_utc',
  'og',
  'yeast',
  'ferment_notes',
  'emptied_at_utc',
  'emptied_reason',
  'reading_taken_at_utc',
  'method',
  'raw_value',
  'raw_unit',
  'sample_temp_c',
  'corrected_sg',
  'low_confidence',
  'ferment_temp_c',
  'ph',
  'reading_note',
  'taken_by',
];

/** Ferments pitched in the range, one row per (non-deleted) reading; a ferment without readings gets one row. */
export async function fermentsCsv(ctx: Ctx, filters: ReportFilters): Promise<string> {
  const db = getDb();
  const scope = ctx.ws;
  const fs = await db
    .select({
      id: t.ferments.id,
      code: t.ferments.code,
      washType: t.washTypes.name,
      fermenter: t.fermenters.name,
      volume: t.ferments.volumeLitres,
      pitchedAt: t.ferments.pitchedAt,
      og: t.ferments.og,
      yeast: t.ferments.yeast,
      notes: t.ferments.notes,
      emptiedAt: t.ferments.emptiedAt,
      emptiedReason: t.ferments.emptiedReason,
    })
    .from(t.ferments)
    .innerJoin(t.washTypes, eq(t.washTypes.id, t.ferments.washTypeId))
    .leftJoin(t.fermenters, eq(t.fermenters.id, t.ferments.fermenterId))
    .where(and(eq(t.ferments.workspaceId, scope.id), gte(t.ferments.pitchedAt, filters.range.start), lt(t.ferments.pitchedAt, filters.range.end)))
    .orderBy(asc(t.ferments.pitchedAt), asc(t.ferments.id));
  const rs = fs.length
    ? await db
        .select({
          fermentId: t.readings.fermentId,
          takenAt: t.readings.takenAt,
          method: t.readings.method,
          rawValue: t.readings.rawValue,
          rawUnit: t.readings.rawUnit,
          sampleTempC: t.readings.sampleTempC,
          correctedSg: t.readings.correctedSg,
          lowConfidence: t.readings.lowConfidence,
          fermentTempC: t.readings.fermentTempC,
          ph: t.readings.ph,
          note: t.readings.note,
          takenBy: t.users.name,
        })
        .from(t.readings)
        .leftJoin(t.users, eq(t.users.id, t.readings.takenBy))
        .where(
          and(
            eq(t.readings.workspaceId, scope.id),
            inArray(
              t.readings.fermentId,
              fs.map((f) => f.id),
            ),
            isNull(t.readings.deletedAt),
          ),
        )
        .orderBy(asc(t.readings.takenAt), asc(t.readings.id))
    : [];
  const rows: Array<Record<string, unknown>> = [];
  for (const f of fs) {
    const base = {
      ferment_code: f.code,
      wash_type: f.washType,
      fermenter: f.fermenter,
      volume_litres: f.volume,
      pitched_at_utc: iso(f.pitchedAt),
      og: f.og,
      yeast: f.yeast,
      ferment_notes: f.notes,
      emptied_at_utc: iso(f.emptiedAt),
      emptied_reason: f.emptiedReason,
    };
    const mine = rs.filter((r) => r.fermentId === f.id);
    if (mine.length === 0) rows.push(base);
    for (const r of mine) {
      rows.push({
        ...base,
        reading_taken_at_utc: iso(r.takenAt),
        method: r.method,
        raw_value: r.rawValue,
        raw_unit: r.rawUnit,
        sample_temp_c: r.sampleTempC,
        corrected_sg: r.correctedSg,
        low_confidence: r.lowConfidence,
        ferment_temp_c: r.fermentTempC,
        ph: r.ph,
        reading_note: r.note,
        taken_by: r.takenBy,
      });
    }
  }
  return toCsv(rows, FERMENT_CSV_COLUMNS);
}

export const RUN_CSV_COLUMNS = [
  'run_id',
  'still',
  'type',
  'status',
  'starts_at_utc',
  'ends_at_utc',
  'started_at_utc',
  'finished_at_utc',
  'operator',
  'charge_litres',
  'charge_abv_20c',
  'charged_laa',
  'ferments',
  'fed_by_runs',
  'run_notes',
  'fraction',
  'volume_litres',
  'alcoholmeter_reading',
  'reading_temp_c',
  'abv_20c',
  'laa',
  'cut_note',
  'run_collected_laa',
  'run_recovery',
];

/** Runs starting in the range (optionally one still), one row per recorded fraction; a run without a record gets one row. */
export async function runsCsv(ctx: Ctx, filters: ReportFilters): Promise<string> {
  const db = getDb();
  const scope = ctx.ws;
  const rs = await selectRuns(db, scope.id, {
    extra: { still: stillName, operator: operatorName, startedAt: t.runs.startedAt, finishedAt: t.runs.finishedAt },
    where: and(
      gte(t.runs.startsAt, filters.range.start),
      lt(t.runs.startsAt, filters.range.end),
      filters.stillId ? eq(t.runs.stillId, filters.stillId) : undefined,
    ),
  });
  const ids = rs.map((r) => r.id);
  const fermentIds = [...new Set(rs.flatMap((r) => r.ferments.map((c) => c.fermentId)))];
  const [outcomes, codes] = ids.length
    ? await Promise.all([
        db
          .select()
          .from(t.runOutcomes)
          .where(and(eq(t.runOutcomes.workspaceId, scope.id), inArray(t.runOutcomes.runId, ids)))
          .orderBy(asc(t.runOutcomes.id)),
        fermentIds.length
          ? db
              .select({ id: t.ferments.id, code: t.ferments.code })
              .from(t.ferments)
              .where(and(eq(t.ferments.workspaceId, scope.id), inArray(t.ferments.id, fermentIds)))
          : [],
      ])
    : [[], []];
  const codeOf = new Map(codes.map((f) => [f.id, f.code]));
  const order = { low_wines: 0, heads: 1, hearts: 2, tails: 3, feints: 4 } as const;
  const rows: Array<Record<string, unknown>> = [];
  for (const r of rs) {
    const fr = outcomes.filter((o) => o.runId === r.id).sort((a, b) => order[a.fraction] - order[b.fraction]);
    const chargeLitres = runChargeLitres(r);
    const charged = chargedLaa({ litres: chargeLitres, abv: r.chargeAbv });
    const collected = sumLaa(fr);
    const base = {
      run_id: r.id,
      still: r.still,
      type: r.type,
      status: r.status,
      starts_at_utc: iso(r.startsAt),
      ends_at_utc: iso(r.endsAt),
      started_at_utc: iso(r.startedAt),
      finished_at_utc: iso(r.finishedAt),
      operator: r.operator,
      charge_litres: chargeLitres,
      charge_abv_20c: r.chargeAbv,
      charged_laa: round(charged, 3),
      ferments:
        r.ferments
          .filter((c) => codeOf.has(c.fermentId))
          .map((c) => `${codeOf.get(c.fermentId)} ${c.litres} L`)
          .join('; ') || null,
      fed_by_runs: r.feeds.map((f) => `#${f.runId} ${f.litres} L`).join('; ') || null,
      run_notes: r.notes,
      run_collected_laa: fr.length ? round(collected, 3) : null,
      run_recovery: fr.length ? round(recoveryRatio(collected, charged), 4) : null,
    };
    if (fr.length === 0) rows.push(base);
    for (const o of fr) {
      rows.push({
        ...base,
        fraction: FRACTION_LABELS[o.fraction],
        volume_litres: o.volumeLitres,
        alcoholmeter_reading: o.alcoholmeterReading,
        reading_temp_c: o.readingTempC,
        abv_20c: round(o.abv20, 3),
        laa: round(o.laa, 3),
        cut_note: o.cutNote,
      });
    }
  }
  return toCsv(rows, RUN_CSV_COLUMNS);
}

export const UTILISATION_CSV_COLUMNS = ['still', 'iso_week', 'available_hours', 'booked_hours', 'done_hours', 'idle_waiting_hours', 'utilisation'];

export function utilisationCsv(rows: readonly UtilisationRow[]): string {
  return toCsv(
    rows.map((r) => ({
      still: r.stillName,
      iso_week: r.week,
      available_hours: round(r.availableHours, 2),
      booked_hours: round(r.bookedHours, 2),
      done_hours: round(r.doneHours, 2),
      idle_waiting_hours: round(r.idleWaitingHours, 2),
      utilisation: round(r.utilisation, 4),
    })),
    UTILISATION_CSV_COLUMNS,
  );
}

/** Columns never exported, per table. */
const OMIT: Record<string, readonly string[]> = {
  invitations: ['tokenHash'],
  calendar_feeds: ['tokenHash'],
  mail_outbox: ['textBody', 'htmlBody', 'claimedBy', 'claimUntil'],
};

function strip<T extends Record<string, unknown>>(table: string, rows: T[]): Array<Record<string, unknown>> {
  const omit = OMIT[table] ?? [];
  return rows.map((r) => Object.fromEntries(Object.entries(r).filter(([k]) => !omit.includes(k))));
}

export async function fullExport(ctx: Ctx, now = new Date()): Promise<Record<string, unknown>> {
  const db = getDb();
  const w = ctx.ws.id;
  const [ws] = await db.select().from(t.workspaces).where(eq(t.workspaces.id, w)).limit(1);
  const members = await db
    .select({
      userId: t.users.id,
      email: t.users.email,
      name: t.users.name,
      role: t.memberships.role,
      joinedAt: t.memberships.createdAt,
      disabledAt: t.users.disabledAt,
    })
    .from(t.memberships)
    .innerJoin(t.users, eq(t.users.id, t.memberships.userId))
    .where(eq(t.memberships.workspaceId, w))
    .orderBy(asc(t.users.id));
  // Every table below has a workspace_id column; the rows are read whole, then secrets stripped.
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  const byWs = (table: any, col: any): Promise<Array<Record<string, unknown>>> =>
    db.select().from(table).where(eq(col, w)) as Promise<Array<Record<string, unknown>>>;
  const tables: Record<string, unknown[]> = {
    members,
    stills: await byWs(t.stills, t.stills.workspaceId),
    still_closures: await byWs(t.stillClosures, t.stillClosures.workspaceId),
    fermenters: await byWs(t.fermenters, t.fermenters.workspaceId),
    wash_types: await byWs(t.washTypes, t.washTypes.workspaceId),
    ferments: await byWs(t.ferments, t.ferments.workspaceId),
    ferment_ingredients: await byWs(t.fermentIngredients, t.fermentIngredients.workspaceId),
    readings: await byWs(t.readings, t.readings.workspaceId),
    ferment_forecasts: await byWs(t.fermentForecasts, t.fermentForecasts.workspaceId),
    forecast_history: await byWs(t.forecastHistory, t.forecastHistory.workspaceId),
    runs: await byWs(t.runs, t.runs.workspaceId),
    run_ferments: await byWs(t.runFerments, t.runFerments.workspaceId),
    run_feeds: await byWs(t.runFeeds, t.runFeeds.workspaceId),
    run_outcomes: await byWs(t.runOutcomes, t.runOutcomes.workspaceId),
    calendar_feeds: strip('calendar_feeds', await byWs(t.calendarFeeds, t.calendarFeeds.workspaceId)),
    invitations: strip('invitations', await byWs(t.invitations, t.invitations.workspaceId)),
    mail_outbox: strip('mail_outbox', await byWs(t.mailOutbox, t.mailOutbox.workspaceId)),
    audit_log: await byWs(t.auditLog, t.auditLog.workspaceId),
    job_claims: await byWs(t.jobClaims, t.jobClaims.workspaceId),
  };
  return {
    format: 'plateau-workspace-export',
    version: 1,
    exportedAt: now.toISOString(),
    note: "Every row of this distillery's data. Password hashes, sessions, token hashes, sign-in throttles and mail bodies are not included. Times are UTC.",
    workspace: ws
      ? {
          id: ws.id,
          name: ws.name,
          timeZone: ws.timeZone,
          units: ws.units,
          calibrationTempC: ws.calibrationTempC,
          stableDays: ws.stableDays,
          stableTolerance: ws.stableTolerance,
          wortCorrectionFactor: ws.wortCorrectionFactor,
          createdAt: ws.createdAt,
        }
      : null,
    tables,
  };
}
