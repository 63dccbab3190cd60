/**
 * ISO weeks and calendar months in the distillery's time zone. A week runs
 * Monday 00:00 to the next Monday 00:00 local time (ISO 8601), so a week
 * holding a daylight-saving change is 167 or 169 hours long.
 */
import { addDaysYmd, wallClock, weekdayOfYmd, zonedDateTime, type TimeRange } from '../schedule';

const DAY_MS = 86_400_000;

function ymdToUtcMs(ymd: string): number {
  const [y, m, d] = ymd.split('-').map(Number) as [number, number, number];
  return Date.UTC(y, m - 1, d);
}

/** ISO 8601 week label of a calendar date, e.g. '2025-W03' (the week's Thursday decides the year). */
export function isoWeekOfYmd(ymd: string): string {
  const weekday = weekdayOfYmd(ymd) || 7; // Monday = 1 … Sunday = 7
  const thursday = addDaysYmd(ymd, 4 - weekday);
  const year = Number(thursday.slice(0, 4));
  const jan1 = Date.UTC(year, 0, 1);
  const week = Math.floor((ymdToUtcMs(thursday) - jan1) / DAY_MS / 7) + 1;
  return `${year}-W${String(week).padStart(2, '0')}`;
}

/** Monday of the ISO week holding `ymd`. */
export function mondayOf(ymd: string): string {
  const weekday = weekdayOfYmd(ymd) || 7;
  return addDaysYmd(ymd, 1 - weekday);
}

export interface WeekSlice {
  /** ISO week label. */
  week: string;
  /** Local date of the week's Monday. */
  monday: string;
  /** The part of the week inside the requested range. */
  range: TimeRange;
}

/** The ISO weeks touched by `range`, each clipped to it. */
export function weeksIn(range: TimeRange, timeZone: string): WeekSlice[] {
  if (range.end.getTime() <= range.start.getTime()) return [];
  const out: WeekSlice[] = [];
  let monday = mondayOf(wallClock(range.start, timeZone).ymd);
  for (let guard = 0; guard < 600; guard++) {
    const start = zonedDateTime(monday, 0, timeZone);
    if (start.getTime() >= range.end.getTime()) break;
    const next = addDaysYmd(monday, 7);
    const end = zonedDateTime(next, 0, timeZone);
    const s = Math.max(start.getTime(), range.start.getTime());
    const e = Math.min(end.getTime(), range.end.getTime());
    if (e > s) out.push({ week: isoWeekOfYmd(monday), monday, range: { start: new Date(s), end: new Date(e) } });
    monday = next;
  }
  return out;
}

/** ISO week label of an instant, in `timeZone`. */
export function isoWeekOf(date: Date, timeZone: string): string {
  return isoWeekOfYmd(wallClock(date, timeZone).ymd);
}

/** Calendar month 'YYYY-MM' of an instant, in `timeZone`. */
export function monthOf(date: Date, timeZone: string): string {
  return wallClock(date, timeZone).ymd.slice(0, 7);
}
