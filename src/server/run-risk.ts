/**
 * Risk at booking: whether a run was at risk (the one test in src/lib/schedule/risk.ts) when it
 * was booked or last moved, kept on the run (runs.booked_at_risk). A run at risk now that was
 * not at risk then has a late wash; one that was is simply booked early.
 */
import { and, eq, inArray } from 'drizzle-orm';
import { ferments, runFerments, runs } from '../db/schema';
import { isAtRisk, runRisk, type FermentState } from '../lib/schedule';
import type { Ctx } from './context';
import { getForecasts } from './forecasts';
import type { Tx } from './tx';

/**
 * The linked washes' forecast state, as the board sees it: getForecasts computes a missing or
 * out-of-date forecast (on its own connection; it writes only the forecast cache, which this
 * transaction does not touch), so a run booked before its wash ever had a forecast read is
 * judged on the forecast, not as "no forecast". Whether a wash is emptied is read inside `tx`.
 */
async function fermentStates(tx: Tx, ctx: Ctx, ids: number[]): Promise<Map<number, RiskState>> {
  if (!ids.length) return new Map();
  const [rows, forecasts] = await Promise.all([
    tx
      .select({ id: ferments.id, emptiedAt: ferments.emptiedAt })
      .from(ferments)
      .where(and(eq(ferments.workspaceId, ctx.ws.id), inArray(ferments.id, ids))),
    getForecasts(ctx, ids),
  ]);
  return new Map(
    rows.map((r) => {
      const f = forecasts.get(r.id);
      const state: RiskState = {
        id: r.id,
        emptiedAt: r.emptiedAt,
        status: f?.status ?? 'insufficient_data',
        confirmedAt: f?.status === 'finished' ? (f.ruleMetAt ?? null) : null,
        readyAt: f?.readyAt ?? null,
        readyP10: f?.readyP10 ?? null,
        readyP90: f?.readyP90 ?? null,
      };
      return [r.id, state];
    }),
  );
}

type RiskState = Pick<FermentState, 'id' | 'status' | 'emptiedAt' | 'confirmedAt' | 'readyAt' | 'readyP10' | 'readyP90'>;

/**
 * Compute and store whether run `runId` is at risk as it now stands (its start, its washes),
 * by the distillery's threshold. Called in the transaction of a booking, and of a change of
 * its time, still or washes.
 */
export async function recordRiskAtBooking(tx: Tx, ctx: Ctx, runId: number): Promise<boolean> {
  const workspaceId = ctx.ws.id;
  const [run] = await tx
    .select({ startsAt: runs.startsAt })
    .from(runs)
    .where(and(eq(runs.id, runId), eq(runs.workspaceId, workspaceId)))
    .limit(1);
  if (!run) return false;
  const lines = await tx
    .select({ fermentId: runFerments.fermentId, litres: runFerments.litres })
    .from(runFerments)
    .where(and(eq(runFerments.workspaceId, workspaceId), eq(runFerments.runId, runId)));
  const states = await fermentStates(
    tx,
    ctx,
    lines.map((l) => l.fermentId),
  );
  const atRisk = isAtRisk(runRisk({ startsAt: run.startsAt, ferments: lines }, states, ctx.ws.atRiskThreshold));
  await tx
    .update(runs)
    .set({ bookedAtRisk: atRisk })
    .where(and(eq(runs.id, runId), eq(runs.workspaceId, workspaceId)));
  return atRisk;
}
