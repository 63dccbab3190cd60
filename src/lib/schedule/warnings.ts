/**
 * Warnings for one run on the board. The same function runs on the server
 * and in the board island while a run is dragged.
 */
import { runChargeLitres } from './charge';
import { formatLitres, formatReadyWindow, formatWhen, formatYmd } from './format';
import { DEFAULT_AT_RISK_THRESHOLD, fermentRisk } from './risk';
import { isClosedOn, localDatesTouched, openIntervals, totalHours } from './time';
import type { FermentState, Run, RunType, Still, Warning } from './types';

export type FermentLookup = ReadonlyMap<number, FermentState> | Readonly<Record<number, FermentState>>;

export interface WarningContext {
  /** The still the run is booked on. */
  still: Still;
  /** All runs in the workspace window, other stills included; the run itself may be in it (its stored version is replaced by `run`). */
  runs: readonly Run[];
  ferments: FermentLookup;
  timeZone: string;
  now: Date;
  /** The distillery's at-risk threshold (0–1); default 0.8. */
  atRiskThreshold?: number;
}

const LITRE_EPSILON = 1e-6;

const RUN_LABELS: Record<RunType, string> = {
  stripping: 'stripping run',
  spirit: 'spirit run',
  redistillation: 'redistillation run',
  cleaning: 'cleaning',
  maintenance: 'maintenance',
};

export function lookupFerment(ferments: FermentLookup, id: number): FermentState | undefined {
  if (ferments instanceof Map) return ferments.get(id);
  return (ferments as Readonly<Record<number, FermentState>>)[id];
}

const overlaps = (a: Pick<Run, 'startsAt' | 'endsAt'>, b: Pick<Run, 'startsAt' | 'endsAt'>) =>
  a.startsAt.getTime() < b.endsAt.getTime() && b.startsAt.getTime() < a.endsAt.getTime();

/** Whether a run is still ahead, so forecasts and feeds can still make it go wrong. */
function isAhead(run: Run, now: Date): boolean {
  return (run.status === 'planned' || run.status === 'confirmed') && run.endsAt.getTime() > now.getTime();
}

/**
 * Readiness of one linked ferment, for a run not yet started, by the one at-risk test
 * (`fermentRisk`: the run is at risk when it starts before the threshold quantile of the
 * wash's ready time, early when before P10):
 * - early: `booked_before_ready`, danger — the wash will very likely still be fermenting;
 * - at risk: `booked_before_ready`, warning;
 * - not at risk but not yet confirmed: `booked_before_stable`, info (the calendar shows the
 *   run TENTATIVE until the readings settle);
 * - no forecast yet: `booked_before_stable`, warning;
 * - finished, but the run starts before the stability rule was met:
 *   `booked_before_stable`, warning.
 * An early or at-risk run reads "booked before its wash is likely ready", unless it was not
 * at risk when booked (`bookedAtRisk` false): then its wash is late.
 * Stalled and souring washes get their own danger codes instead.
 */
function readinessWarnings(run: Run, f: FermentState, timeZone: string, now: Date, threshold: number): Warning[] {
  const start = run.startsAt.getTime();
  const name = `Wash ${f.code}`;
  const window = formatReadyWindow(f, timeZone, now);
  const base = { fermentId: f.id };

  if (f.status === 'stalled') {
    return [
      {
        ...base,
        code: 'ferment_stalled',
        severity: 'danger',
        message: `${name} has stalled: its gravity holds above the finishing range, so it is not ready for the still`,
      },
    ];
  }
  if (f.status === 'souring') {
    return [{ ...base, code: 'ferment_souring', severity: 'danger', message: `${name} shows signs of souring: check it before it goes to the still` }];
  }
  if (f.status === 'finished' && f.confirmedAt) {
    if (start < f.confirmedAt.getTime()) {
      return [
        {
          ...base,
          code: 'booked_before_stable',
          severity: 'warning',
          message: `${name} was confirmed stable only at ${formatWhen(f.confirmedAt, timeZone, now)}, after this run starts`,
        },
      ];
    }
    return [];
  }
  const risk = fermentRisk(run.startsAt, f, threshold);
  const lead = `${run.bookedAtRisk === false ? 'Wash late' : 'Booked before its wash is likely ready'}: wash ${f.code}`;
  if (risk === 'early') {
    return [
      { ...base, code: 'booked_before_ready', severity: 'danger', message: `${lead} will very likely still be fermenting when this run starts (${window})` },
    ];
  }
  if (risk === 'at_risk') {
    const pct = Math.round(threshold * 100);
    return [
      {
        ...base,
        code: 'booked_before_ready',
        severity: 'warning',
        message: `${lead} is less than ${pct} % likely to be confirmed stable by the start (${window})`,
      },
    ];
  }
  if (risk === 'ok' && window) {
    return [
      { ...base, code: 'booked_before_stable', severity: 'info', message: `${name} should be finished by then (${window}) but is not confirmed stable yet` },
    ];
  }
  return [{ ...base, code: 'booked_before_stable', severity: 'warning', message: `${name} has no forecast yet and is not confirmed stable` }];
}

/**
 * Every warning for `run`. Cancelled runs get none and count for nothing in
 * the others' rules. Rules about the future (ferment readiness, pitching,
 * emptying, feeding runs) apply only to runs that are planned or confirmed
 * and not yet over at `now`; rules about the booking itself (capacity,
 * allocation, hours, closures, operator) apply to every live run.
 *
 * Severities: danger for what makes the run impossible or unsafe (no wash,
 * a stalled or souring wash, over capacity, over-allocated wash, a closed
 * distillery, an operator on two stills at once, a spirit run before its low
 * wines exist); warning for outside operating hours and low wines booked
 * beyond a stripping run's expected output (an estimate); readiness as above.
 */
export function computeRunWarnings(run: Run, ctx: WarningContext): Warning[] {
  if (run.status === 'cancelled') return [];
  const { still, timeZone, now } = ctx;
  const live = [...ctx.runs.filter((r) => r.id !== run.id && r.status !== 'cancelled'), run];
  const warnings: Warning[] = [];
  const ahead = isAhead(run, now);

  // Linked ferments: pitching, emptying, readiness.
  const fermentIds = [...new Set(run.ferments.map((f) => f.fermentId))];
  if (ahead) {
    for (const id of fermentIds) {
      const f = lookupFerment(ctx.ferments, id);
      if (!f) continue;
      if (f.pitchedAt === null || f.pitchedAt.getTime() > run.startsAt.getTime()) {
        warnings.push({
          code: 'ferment_not_pitched',
          severity: 'danger',
          fermentId: f.id,
          message:
            f.pitchedAt === null
              ? `Wash ${f.code} is not pitched yet`
              : `Wash ${f.code} is pitched only at ${formatWhen(f.pitchedAt, timeZone, now)}, after this run starts`,
        });
        continue;
      }
      if (f.emptiedAt !== null && f.emptiedAt.getTime() < run.startsAt.getTime()) {
        warnings.push({
          code: 'ferment_emptied',
          severity: 'danger',
          fermentId: f.id,
          message: `Wash ${f.code} was emptied from its fermenter at ${formatWhen(f.emptiedAt, timeZone, now)}, before this run starts`,
        });
        continue;
      }
      warnings.push(...readinessWarnings(run, f, timeZone, now, ctx.atRiskThreshold ?? DEFAULT_AT_RISK_THRESHOLD));
    }
  }

  // Capacity.
  const charge = runChargeLitres(run);
  if (charge !== null && charge > still.capacityLitres + LITRE_EPSILON) {
    warnings.push({
      code: 'over_capacity',
      severity: 'danger',
      message: `A charge of ${formatLitres(charge)} is above the ${formatLitres(still.capacityLitres)} working capacity of ${still.name}`,
    });
  }

  // A ferment booked beyond its volume across live runs.
  for (const id of fermentIds) {
    const f = lookupFerment(ctx.ferments, id);
    if (!f) continue;
    let booked = 0;
    for (const r of live) for (const c of r.ferments) if (c.fermentId === id) booked += c.litres;
    if (booked > f.volumeLitres + LITRE_EPSILON) {
      warnings.push({
        code: 'ferment_overallocated',
        severity: 'danger',
        fermentId: id,
        message: `Wash ${f.code} holds ${formatLitres(f.volumeLitres)}, but ${formatLitres(booked)} of it is booked into runs`,
      });
    }
  }

  // Operating hours (closures reported separately) and closures.
  const runMs = run.endsAt.getTime() - run.startsAt.getTime();
  if (runMs > 0) {
    const open = openIntervals(still, { start: run.startsAt, end: run.endsAt }, timeZone, { includeClosures: true });
    if (totalHours(open) * 3_600_000 < runMs - 1) {
      // Open intervals are merged, so only the first can start at the run's start.
      const first = open[0];
      const firstOutside = first && first.start.getTime() <= run.startsAt.getTime() ? first.end : run.startsAt;
      warnings.push({
        code: 'outside_hours',
        severity: 'warning',
        message: `Part of this run, from ${formatWhen(firstOutside, timeZone, now)}, falls outside the operating hours of ${still.name}`,
      });
    }
  }
  for (const ymd of localDatesTouched({ start: run.startsAt, end: run.endsAt }, timeZone)) {
    if (!isClosedOn(still, ymd)) continue;
    const closure = still.closures.find((c) => c.startsOn <= ymd && ymd <= c.endsOn);
    warnings.push({
      code: 'on_closure',
      severity: 'danger',
      message: `${still.name} is closed on ${formatYmd(ymd)}${closure?.reason ? ` (${closure.reason})` : ''}`,
    });
    break;
  }

  // Operator on two runs at once.
  if (run.operatorId !== null) {
    for (const other of live) {
      if (other.id === run.id || other.operatorId !== run.operatorId || !overlaps(run, other)) continue;
      warnings.push({
        code: 'operator_double_booked',
        severity: 'danger',
        runId: other.id,
        message: `The operator is also booked on a ${RUN_LABELS[other.type]} from ${formatWhen(other.startsAt, timeZone, now)} to ${formatWhen(other.endsAt, timeZone, now)}`,
      });
    }
  }

  // Spirit runs and the stripping runs that feed them.
  if (run.type === 'spirit' && ahead) {
    const seen = new Set<number>();
    for (const feed of run.feeds) {
      if (seen.has(feed.runId)) continue;
      seen.add(feed.runId);
      const feeder = ctx.runs.find((r) => r.id === feed.runId);
      if (!feeder) continue;
      const when = formatWhen(feeder.startsAt, timeZone, now);
      if (feeder.status === 'cancelled') {
        warnings.push({
          code: 'spirit_over_feed',
          severity: 'warning',
          runId: feeder.id,
          message: `The ${RUN_LABELS[feeder.type]} of ${when} feeding this run is cancelled: its low wines will not be there`,
        });
        continue;
      }
      if (run.startsAt.getTime() < feeder.endsAt.getTime()) {
        warnings.push({
          code: 'spirit_before_feed',
          severity: 'danger',
          runId: feeder.id,
          message: `This spirit run starts before the ${RUN_LABELS[feeder.type]} feeding it ends (${formatWhen(feeder.endsAt, timeZone, now)})`,
        });
      }
      if (feeder.lowWinesLitres !== null && feeder.lowWinesLitres !== undefined) {
        let taken = 0;
        for (const r of live) for (const f of r.feeds) if (f.runId === feeder.id) taken += f.litres;
        if (taken > feeder.lowWinesLitres + LITRE_EPSILON) {
          warnings.push({
            code: 'spirit_over_feed',
            severity: 'warning',
            runId: feeder.id,
            message: `The ${RUN_LABELS[feeder.type]} of ${when} gives about ${formatLitres(feeder.lowWinesLitres)} of low wines, but ${formatLitres(taken)} is booked into spirit runs`,
          });
        }
      }
    }
  }

  return warnings;
}
