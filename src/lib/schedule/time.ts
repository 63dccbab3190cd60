/**
 * Wall-clock helpers in the distillery's IANA time zone.
 *
 * Instants are plain `Date`s (UTC underneath); a wall clock is a local date
 * 'YYYY-MM-DD' plus a local time 'HH:MM'. Offsets come from @date-fns/tz,
 * which reads the runtime's time-zone data, so this works in the browser too.
 */
import { tzOffset } from '@date-fns/tz';
import type { OperatingHours, Still, TimeRange } from './types';

const MINUTE_MS = 60_000;
const DAY_MS = 86_400_000;

export interface WallClock {
  /** Local date 'YYYY-MM-DD'. */
  ymd: string;
  /** Local time 'HH:MM' (seconds dropped). */
  hm: string;
  /** 0 = Sunday … 6 = Saturday. */
  weekday: number;
  /** Minutes since local midnight, with seconds as a fraction. */
  minuteOfDay: number;
}

/** UTC offset of `timeZone` at `date`, in minutes (positive east of Greenwich). */
export function offsetMinutes(timeZone: string, date: Date | number): number {
  const offset = tzOffset(timeZone, new Date(typeof date === 'number' ? date : date.getTime()));
  if (!Number.isFinite(offset)) throw new RangeError(`Unknown time zone "${timeZone}"`);
  return offset;
}

const pad2 = (n: number) => (n < 10 ? `0${n}` : String(n));

/** The wall clock that `date` shows in `timeZone`. */
export function wallClock(date: Date, timeZone: string): WallClock {
  const local = new Date(date.getTime() + offsetMinutes(timeZone, date) * MINUTE_MS);
  const y = local.getUTCFullYear();
  const ymd = `${String(y).padStart(4, '0')}-${pad2(local.getUTCMonth() + 1)}-${pad2(local.getUTCDate())}`;
  const h = local.getUTCHours();
  const m = local.getUTCMinutes();
  return {
    ymd,
    hm: `${pad2(h)}:${pad2(m)}`,
    weekday: local.getUTCDay(),
    minuteOfDay: h * 60 + m + local.getUTCSeconds() / 60 + local.getUTCMilliseconds() / MINUTE_MS,
  };
}

function parseYmd(ymd: string): [number, number, number] {
  const match = /^(\d{4})-(\d{2})-(\d{2})$/.exec(ymd);
  if (!match) throw new RangeError(`Expected a date as YYYY-MM-DD, got "${ymd}"`);
  return [Number(match[1]), Number(match[2]), Number(match[3])];
}

/** 'HH:MM' -> minutes since midnight; accepts '24:00' as 1440. */
export function parseHm(hm: string): number {
  const match = /^(\d{2}):(\d{2})$/.exec(hm);
  if (!match) throw new RangeError(`Expected a time as HH:MM, got "${hm}"`);
  const minutes = Number(match[1]) * 60 + Number(match[2]);
  if (Number(match[2]) > 59 || minutes > 1440) throw new RangeError(`Time out of range: "${hm}"`);
  return minutes;
}

/** Years a date typed into the app may name: wide enough for any plan or record, narrow enough that date maths never leaves four-digit years. */
export const PLANNING_YEARS = { min: 1970, max: 2199 } as const;

/** True for a real calendar date 'YYYY-MM-DD' within PLANNING_YEARS (2026-02-30 and 9999-12-31 are not). */
export function isPlanningDate(value: string | null | undefined): value is string {
  if (!value || !/^\d{4}-\d{2}-\d{2}$/.test(value)) return false;
  const y = Number(value.slice(0, 4));
  if (y < PLANNING_YEARS.min || y > PLANNING_YEARS.max) return false;
  const t = new Date(`${value}T00:00:00Z`);
  return !Number.isNaN(t.getTime()) && t.toISOString().slice(0, 10) === value;
}

/** Add whole calendar days to a 'YYYY-MM-DD' date. */
export function addDaysYmd(ymd: string, days: number): string {
  const [y, m, d] = parseYmd(ymd);
  const t = new Date(Date.UTC(y, m - 1, d) + days * DAY_MS);
  return `${String(t.getUTCFullYear()).padStart(4, '0')}-${pad2(t.getUTCMonth() + 1)}-${pad2(t.getUTCDate())}`;
}

/** Weekday (0 = Sunday) of a calendar date. */
export function weekdayOfYmd(ymd: string): number {
  const [y, m, d] = parseYmd(ymd);
  return new Date(Date.UTC(y, m - 1, d)).getUTCDay();
}

/**
 * The instant at which the wall clock in `timeZone` shows `ymd` `hm`.
 * `hm` may also be given as minutes since midnight (1440 = next day 00:00).
 *
 * Daylight-saving edges, deterministically:
 * - a time skipped by a spring-forward gap moves forward by the gap
 *   (02:30 on a 02:00 -> 03:00 night gives 03:30 new time);
 * - a time that occurs twice on a fall-back night gives the EARLIER instant.
 */
export function zonedDateTime(ymd: string, hm: string | number, timeZone: string): Date {
  const [y, mo, d] = parseYmd(ymd);
  const minutes = typeof hm === 'number' ? hm : parseHm(hm);
  const localMs = Date.UTC(y, mo - 1, d) + minutes * MINUTE_MS;
  const before = offsetMinutes(timeZone, localMs - DAY_MS / 2);
  const after = offsetMinutes(timeZone, localMs + DAY_MS / 2);
  const candidates = [before, after].map((offset) => localMs - offset * MINUTE_MS).filter((t) => localMs - offsetMinutes(timeZone, t) * MINUTE_MS === t);
  if (candidates.length > 0) return new Date(Math.min(...candidates));
  // In a gap: read the wall time with the offset in force before the change.
  return new Date(localMs - before * MINUTE_MS);
}

export type SnapMode = 'nearest' | 'up' | 'down';

/**
 * Snap an instant to the slot grid of `slotMinutes` counted from local
 * midnight in `timeZone` (so a 30-minute grid sits on :00 and :30 of the
 * distillery's clock even in zones with a half-hour offset).
 */
export function snapToSlot(date: Date, slotMinutes: number, timeZone: string, mode: SnapMode = 'nearest'): Date {
  if (!(slotMinutes > 0) || slotMinutes > 1440) throw new RangeError('slotMinutes must be in 1..1440');
  const wall = wallClock(date, timeZone);
  const steps = wall.minuteOfDay / slotMinutes;
  const rounded = mode === 'up' ? Math.ceil(steps) : mode === 'down' ? Math.floor(steps) : Math.round(steps);
  const target = rounded * slotMinutes;
  if (target === wall.minuteOfDay) return new Date(date.getTime());
  const snapped = zonedDateTime(wall.ymd, target, timeZone);
  // Around a daylight-saving change the wall-clock answer can land on the
  // wrong side of `date`; fall back to moving by the elapsed minutes.
  const delta = (target - wall.minuteOfDay) * MINUTE_MS;
  if (mode === 'up' && snapped.getTime() < date.getTime()) return new Date(date.getTime() + delta);
  if (mode === 'down' && snapped.getTime() > date.getTime()) return new Date(date.getTime() + delta);
  return snapped;
}

/** Move a run (or anything with startsAt/endsAt) to `newStart`, keeping its true length in milliseconds. */
export function shiftRun<T extends { startsAt: Date; endsAt: Date }>(run: T, newStart: Date): T {
  const length = run.endsAt.getTime() - run.startsAt.getTime();
  return { ...run, startsAt: new Date(newStart.getTime()), endsAt: new Date(newStart.getTime() + length) };
}

/**
 * Move a run to another local date at the same wall-clock start time in
 * `timeZone` (06:00 stays 06:00 across a daylight-saving change); its true
 * length is kept, so its wall-clock end may move by the change.
 */
export function moveRunPreservingWallClock<T extends { startsAt: Date; endsAt: Date }>(run: T, targetYmd: string, timeZone: string): T {
  const { hm } = wallClock(run.startsAt, timeZone);
  return shiftRun(run, zonedDateTime(targetYmd, hm, timeZone));
}

/** True when the local date `ymd` falls inside one of the still's closures. */
export function isClosedOn(still: Pick<Still, 'closures'>, ymd: string): boolean {
  return still.closures.some((c) => c.startsOn <= ymd && ymd <= c.endsOn);
}

/** Merge overlapping or touching intervals; input need not be sorted. */
export function mergeRanges(ranges: TimeRange[]): TimeRange[] {
  const sorted = ranges.filter((r) => r.end.getTime() > r.start.getTime()).sort((a, b) => a.start.getTime() - b.start.getTime());
  const merged: TimeRange[] = [];
  for (const r of sorted) {
    const last = merged[merged.length - 1];
    if (last && r.start.getTime() <= last.end.getTime()) {
      if (r.end.getTime() > last.end.getTime()) last.end = new Date(r.end.getTime());
    } else {
      merged.push({ start: new Date(r.start.getTime()), end: new Date(r.end.getTime()) });
    }
  }
  return merged;
}

/** Clip intervals to `range`, dropping the empty ones. */
export function clipRanges(ranges: TimeRange[], range: TimeRange): TimeRange[] {
  const out: TimeRange[] = [];
  for (const r of ranges) {
    const start = Math.max(r.start.getTime(), range.start.getTime());
    const end = Math.min(r.end.getTime(), range.end.getTime());
    if (end > start) out.push({ start: new Date(start), end: new Date(end) });
  }
  return out;
}

/** True when the hours close on the next day (an overnight shift): close at or before open, e.g. 22:00–06:00. */
export function closesNextDay(hours: Pick<OperatingHours, 'open' | 'close'>): boolean {
  return parseHm(hours.close) <= parseHm(hours.open);
}

/** The opening that starts on local date `ymd`; an overnight shift (close at or before open) ends on the next day. */
function hoursIntervalForDay(ymd: string, hours: OperatingHours, timeZone: string): TimeRange {
  const open = parseHm(hours.open);
  const close = parseHm(hours.close);
  const start = zonedDateTime(ymd, open, timeZone);
  return { start, end: close > open ? zonedDateTime(ymd, close, timeZone) : zonedDateTime(addDaysYmd(ymd, 1), close, timeZone) };
}

/** `ranges` (merged, sorted) minus `cuts` (merged, sorted). */
function subtractRanges(ranges: TimeRange[], cuts: TimeRange[]): TimeRange[] {
  const out: TimeRange[] = [];
  for (const r of ranges) {
    let start = r.start.getTime();
    const end = r.end.getTime();
    for (const c of cuts) {
      if (c.end.getTime() <= start || c.start.getTime() >= end) continue;
      if (c.start.getTime() > start) out.push({ start: new Date(start), end: c.start });
      start = Math.max(start, c.end.getTime());
    }
    if (end > start) out.push({ start: new Date(start), end: new Date(end) });
  }
  return out;
}

/**
 * The still's open time within `range`, as merged intervals (a Monday
 * 00:00–24:00 followed by Tuesday 00:00–24:00 is one interval). Hours that
 * close at or before they open are an overnight shift into the next day
 * (Friday 22:00–06:00 runs until Saturday 06:00). Closure dates are removed,
 * each a whole local day, unless `includeClosures` is set.
 */
export function openIntervals(
  still: Pick<Still, 'operatingHours' | 'closures'>,
  range: TimeRange,
  timeZone: string,
  options: { includeClosures?: boolean } = {},
): TimeRange[] {
  if (range.end.getTime() <= range.start.getTime()) return [];
  const firstDay = addDaysYmd(wallClock(range.start, timeZone).ymd, -1);
  const lastDay = wallClock(range.end, timeZone).ymd;
  const raw: TimeRange[] = [];
  const closed: TimeRange[] = [];
  for (let ymd = firstDay; ymd <= lastDay; ymd = addDaysYmd(ymd, 1)) {
    const weekday = weekdayOfYmd(ymd);
    for (const hours of still.operatingHours) {
      if (hours.weekday === weekday) raw.push(hoursIntervalForDay(ymd, hours, timeZone));
    }
    if (!options.includeClosures && isClosedOn(still, ymd))
      closed.push({ start: zonedDateTime(ymd, 0, timeZone), end: zonedDateTime(addDaysYmd(ymd, 1), 0, timeZone) });
  }
  // A closed date takes its whole local day, including the morning end of the night before's shift.
  return clipRanges(subtractRanges(mergeRanges(raw), mergeRanges(closed)), range);
}

/** Local dates (YYYY-MM-DD) touched by [start, end). */
export function localDatesTouched(range: TimeRange, timeZone: string): string[] {
  const first = wallClock(range.start, timeZone).ymd;
  const lastInstant = new Date(Math.max(range.start.getTime(), range.end.getTime() - 1));
  const last = wallClock(lastInstant, timeZone).ymd;
  const out: string[] = [];
  for (let ymd = first; ymd <= last; ymd = addDaysYmd(ymd, 1)) out.push(ymd);
  return out;
}

/** Total length of intervals, in hours of elapsed time. */
export function totalHours(ranges: TimeRange[]): number {
  let ms = 0;
  for (const r of ranges) ms += r.end.getTime() - r.start.getTime();
  return ms / 3_600_000;
}
