/** The board's words: run names, announcements for screen readers, what changed after a conflict. */
import { formatMoment } from '../schedule';
import type { Run, RunType } from '../schedule';
import { RUN_STATUS_LABELS, RUN_TYPE_LABELS } from '../vocabulary';

/** The board speaks the product's vocabulary (declared once in lib/vocabulary). */
export { RUN_STATUS_LABELS, RUN_TYPE_LABELS };

export const WEEKDAY_NAMES = ['Sunday', 'Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday'];
const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/**
 * 'Tuesday 06:00' on the distillery's clock within six days of `now` (either way), else
 * dated: 'Tue 15 Dec 06:00', 'Wed 8 Jan 3000, 08:00' (the one rule, `formatMoment`).
 */
export function dayAndTime(date: Date, timeZone: string, now?: Date): string {
  return formatMoment(date, timeZone, { now });
}

/** 'Tue 3 Dec' for a local date. */
export function shortDate(ymd: string, weekday: number): string {
  const [, m, d] = ymd.split('-').map(Number);
  return `${WEEKDAY_NAMES[weekday]!.slice(0, 3)} ${d} ${MONTHS[m! - 1]}`;
}

/** 'Stripping run moved to Wash Still 2, Tuesday 06:00'. */
export function movedMessage(type: RunType, stillName: string, startsAt: Date, timeZone: string, now?: Date): string {
  return `${RUN_TYPE_LABELS[type]} moved to ${stillName}, ${dayAndTime(startsAt, timeZone, now)}`;
}

/** While dragging: 'Stripping run over Wash Still 2, Tuesday 06:00'. */
export function overMessage(type: RunType, stillName: string, startsAt: Date, timeZone: string, now?: Date): string {
  return `${RUN_TYPE_LABELS[type]} over ${stillName}, ${dayAndTime(startsAt, timeZone, now)}`;
}

export function pickedUpMessage(type: RunType, stillName: string, startsAt: Date, timeZone: string, now?: Date): string {
  return `Picked up ${RUN_TYPE_LABELS[type].toLowerCase()} on ${stillName}, ${dayAndTime(startsAt, timeZone, now)}. Arrow keys move it by a slot or a still; space or enter drops it; escape puts it back.`;
}

export function cancelledDragMessage(type: RunType, stillName: string, startsAt: Date, timeZone: string, now?: Date): string {
  return `Move cancelled. ${RUN_TYPE_LABELS[type]} stays on ${stillName}, ${dayAndTime(startsAt, timeZone, now)}`;
}

/** The fields of a run a person notices changing. */
export type ComparableRun = Pick<Run, 'stillId' | 'type' | 'status' | 'startsAt' | 'endsAt' | 'operatorId' | 'chargeLitres'> & { notes: string | null };

/**
 * What another person changed, in words, comparing the run the island held
 * with the one the server now has (after a stale-version refusal).
 */
export function describeChanges(
  mine: ComparableRun,
  theirs: ComparableRun,
  names: { still: (id: number) => string; person: (id: number | null) => string },
  timeZone: string,
  now?: Date,
): string[] {
  const out: string[] = [];
  if (mine.stillId !== theirs.stillId) out.push(`still is now ${names.still(theirs.stillId)}`);
  if (mine.startsAt.getTime() !== theirs.startsAt.getTime()) out.push(`starts ${dayAndTime(theirs.startsAt, timeZone, now)}`);
  if (mine.endsAt.getTime() !== theirs.endsAt.getTime()) out.push(`ends ${dayAndTime(theirs.endsAt, timeZone, now)}`);
  if (mine.status !== theirs.status) out.push(`status is now ${RUN_STATUS_LABELS[theirs.status].toLowerCase()}`);
  if (mine.type !== theirs.type) out.push(`now a ${RUN_TYPE_LABELS[theirs.type].toLowerCase()}`);
  if (mine.operatorId !== theirs.operatorId) out.push(`operator is now ${names.person(theirs.operatorId)}`);
  if (mine.chargeLitres !== theirs.chargeLitres) out.push(`charge is now ${theirs.chargeLitres ?? 'not set'} L`);
  if ((mine.notes ?? '') !== (theirs.notes ?? '')) out.push('notes changed');
  return out;
}
