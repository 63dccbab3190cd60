/**
 * The board's time axis: which local days a zoom level shows, how wide an
 * hour is, and how a drag distance turns into a snapped time on a still.
 * The axis is linear in elapsed time, so a day with a daylight-saving change
 * is drawn 23 or 25 hours wide and every run keeps its true length.
 */
import { addDaysYmd, snapToSlot, wallClock, weekdayOfYmd, zonedDateTime } from '../schedule';

export type Zoom = 'day' | 'week' | 'six-weeks';

export interface ZoomSpec {
  days: number;
  /** Snapping grid for drags and new runs. */
  slotMinutes: number;
  /** Horizontal scale. */
  pxPerHour: number;
  label: string;
}

export const ZOOMS: Record<Zoom, ZoomSpec> = {
  day: { days: 1, slotMinutes: 30, pxPerHour: 56, label: 'Day' },
  week: { days: 7, slotMinutes: 60, pxPerHour: 12, label: 'Week' },
  'six-weeks': { days: 42, slotMinutes: 360, pxPerHour: 1.6, label: 'Six weeks' },
};

export const isZoom = (value: unknown): value is Zoom => value === 'day' || value === 'week' || value === 'six-weeks';

export interface BoardDay {
  ymd: string;
  weekday: number;
  start: Date;
  end: Date;
}

export interface BoardWindow {
  zoom: Zoom;
  start: Date;
  end: Date;
  days: BoardDay[];
}

const HOUR_MS = 3_600_000;
const MINUTE_MS = 60_000;

/** The Monday on or before a local date. */
export function mondayOf(ymd: string): string {
  const weekday = weekdayOfYmd(ymd);
  return addDaysYmd(ymd, -((weekday + 6) % 7));
}

/** The days a zoom shows around `anchorYmd`: that day, or weeks starting on its Monday. */
export function boardWindow(anchorYmd: string, zoom: Zoom, timeZone: string): BoardWindow {
  const first = zoom === 'day' ? anchorYmd : mondayOf(anchorYmd);
  const days: BoardDay[] = [];
  for (let i = 0; i < ZOOMS[zoom].days; i++) {
    const ymd = addDaysYmd(first, i);
    days.push({ ymd, weekday: weekdayOfYmd(ymd), start: zonedDateTime(ymd, 0, timeZone), end: zonedDateTime(addDaysYmd(ymd, 1), 0, timeZone) });
  }
  return { zoom, start: days[0]!.start, end: days[days.length - 1]!.end, days };
}

/** The anchor of the previous / next page of the board. */
export function shiftAnchor(anchorYmd: string, zoom: Zoom, direction: -1 | 1): string {
  return addDaysYmd(anchorYmd, direction * ZOOMS[zoom].days);
}

export function xOf(date: Date, windowStart: Date, pxPerHour: number): number {
  return ((date.getTime() - windowStart.getTime()) / HOUR_MS) * pxPerHour;
}

export function timeAtX(x: number, windowStart: Date, pxPerHour: number): Date {
  return new Date(windowStart.getTime() + (x / pxPerHour) * HOUR_MS);
}

export interface MoveInput {
  run: { stillId: number; startsAt: Date; endsAt: Date };
  /** Pixels moved sideways and down since the drag began. */
  deltaX: number;
  deltaY: number;
  rowHeight: number;
  /** Still ids in board order (top to bottom). */
  stillIds: readonly number[];
  pxPerHour: number;
  slotMinutes: number;
  timeZone: string;
}

export interface MoveTarget {
  stillId: number;
  startsAt: Date;
  endsAt: Date;
}

/**
 * Where a dragged run lands: the row it was dragged to (clamped to the
 * board's rows) and its start moved by the drag and snapped to the slot grid
 * on the distillery's clock; its true length is kept.
 */
export function moveTarget(input: MoveInput): MoveTarget {
  const { run, stillIds } = input;
  const from = stillIds.indexOf(run.stillId);
  const rows = Math.round(input.deltaY / input.rowHeight);
  const index = from < 0 ? -1 : Math.min(stillIds.length - 1, Math.max(0, from + rows));
  const stillId = index < 0 ? run.stillId : stillIds[index]!;
  const moved = new Date(run.startsAt.getTime() + (input.deltaX / input.pxPerHour) * HOUR_MS);
  const startsAt = snapToSlot(moved, input.slotMinutes, input.timeZone, 'nearest');
  const length = run.endsAt.getTime() - run.startsAt.getTime();
  return { stillId, startsAt, endsAt: new Date(startsAt.getTime() + length) };
}

/**
 * A new end for a run being resized by `deltaX` pixels, snapped to the grid
 * and never shorter than one slot.
 */
export function resizeTarget(run: { startsAt: Date; endsAt: Date }, deltaX: number, pxPerHour: number, slotMinutes: number, timeZone: string): Date {
  const moved = new Date(run.endsAt.getTime() + (deltaX / pxPerHour) * HOUR_MS);
  const snapped = snapToSlot(moved, slotMinutes, timeZone, 'nearest');
  const minEnd = run.startsAt.getTime() + slotMinutes * MINUTE_MS;
  return new Date(Math.max(minEnd, snapped.getTime()));
}

/** The slot under a point on a still row: where a click or a dropped ferment starts a run. */
export function slotAtX(x: number, windowStart: Date, pxPerHour: number, slotMinutes: number, timeZone: string): Date {
  return snapToSlot(timeAtX(x, windowStart, pxPerHour), slotMinutes, timeZone, 'down');
}

/** Hour marks to label on the axis for a day: every `everyHours` local hours. */
export function hourMarks(day: BoardDay, everyHours: number, timeZone: string): Array<{ at: Date; label: string }> {
  const marks: Array<{ at: Date; label: string }> = [];
  for (let t = day.start.getTime(); t < day.end.getTime(); t += HOUR_MS) {
    const wall = wallClock(new Date(t), timeZone);
    if (Math.round(wall.minuteOfDay) % (everyHours * 60) === 0) marks.push({ at: new Date(t), label: wall.hm });
  }
  return marks;
}
