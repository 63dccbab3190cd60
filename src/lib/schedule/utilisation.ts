/**
 * Still utilisation figures for reports. All figures are hours of elapsed
 * time (a 00:00–24:00 day is 23 or 25 hours on a daylight-saving change).
 */
import { actualSpan, type TimedRun } from './actual-times';
import { lookupFerment, type FermentLookup } from './warnings';
import { occupiedRange } from './overlap';
import { clipRanges, mergeRanges, openIntervals, totalHours } from './time';
import type { Run, Still, TimeRange } from './types';

/** Operating hours of the still within `range`, closure dates removed. */
export function availableHours(still: Pick<Still, 'operatingHours' | 'closures'>, range: TimeRange, timeZone: string): number {
  return totalHours(openIntervals(still, range, timeZone));
}

function intersect(a: TimeRange[], b: TimeRange[]): TimeRange[] {
  const out: TimeRange[] = [];
  for (const x of a) out.push(...clipRanges(b, x));
  return mergeRanges(out);
}

/**
 * Hours of live (non-cancelled) runs of any type on the still that fall inside
 * its available hours within `range`. Run time outside operating hours or on
 * closures is not counted (it shows as a warning on the board instead), so
 * bookedHours / availableHours is a utilisation between 0 and 1. Cleaning
 * slots are not booked time unless booked as cleaning runs.
 */
export function bookedHours(runs: readonly Run[], still: Pick<Still, 'id' | 'operatingHours' | 'closures'>, range: TimeRange, timeZone: string): number {
  const booked = mergeRanges(runs.filter((r) => r.stillId === still.id && r.status !== 'cancelled').map((r) => ({ start: r.startsAt, end: r.endsAt })));
  return totalHours(intersect(booked, openIntervals(still, range, timeZone)));
}

/**
 * Like bookedHours, but a started or done run counts at its actual times (actualSpan: start to
 * finish, a running run to its booked end) and the rest at their bookings: the hours the still
 * was really in use, inside its available hours within `range`.
 */
export function actualHours(
  runs: ReadonlyArray<Run & Partial<Pick<TimedRun, 'startedAt' | 'finishedAt'>>>,
  still: Pick<Still, 'id' | 'operatingHours' | 'closures'>,
  range: TimeRange,
  timeZone: string,
): number {
  const used = mergeRanges(runs.filter((r) => r.stillId === still.id && r.status !== 'cancelled').map((r) => actualSpan(r)));
  return totalHours(intersect(used, openIntervals(still, range, timeZone)));
}

/**
 * Hours the still stood free while waiting for a wash. For each live run R on
 * the still that is charged from ferments, let P be the still's previous live
 * run (the latest one ending at or before R starts) and `free` the moment P
 * and its cleaning slot are over (the start of `range` when there is no P).
 * Let `confirmed` be the latest confirmedAt among R's ferments; if one of them
 * has no confirmedAt the run is skipped (nothing to measure yet). The still
 * was waiting for that wash over [free, min(confirmed, R.startsAt)); those
 * hours count when they fall in the still's available hours within `range`.
 * A wash confirmed before the still came free adds nothing.
 */
export function idleWaitingHours(runs: readonly Run[], still: Still, ferments: FermentLookup, range: TimeRange, timeZone: string): number {
  const live = runs.filter((r) => r.stillId === still.id && r.status !== 'cancelled').sort((a, b) => a.startsAt.getTime() - b.startsAt.getTime());
  const waiting: TimeRange[] = [];
  for (const run of live) {
    if (run.ferments.length === 0) continue;
    let confirmed = -Infinity;
    let known = true;
    for (const charge of run.ferments) {
      const at = lookupFerment(ferments, charge.fermentId)?.confirmedAt;
      if (!at) {
        known = false;
        break;
      }
      confirmed = Math.max(confirmed, at.getTime());
    }
    if (!known) continue;
    let free = range.start.getTime();
    for (const prev of live) {
      if (prev === run || prev.endsAt.getTime() > run.startsAt.getTime()) continue;
      free = Math.max(free, occupiedRange(prev, still).end.getTime());
    }
    const until = Math.min(confirmed, run.startsAt.getTime());
    if (until > free) waiting.push({ start: new Date(free), end: new Date(until) });
  }
  return totalHours(intersect(mergeRanges(waiting), openIntervals(still, range, timeZone)));
}
