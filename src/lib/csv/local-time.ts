import { TZDate, tzOffset } from '@date-fns/tz';

export interface WallClock {
  year: number;
  month: number; // 1-12
  day: number;
  hour: number;
  minute: number;
  second: number;
  millisecond: number;
}

export type LocalTimeResult = { ok: true; instant: Date; ambiguous: boolean } | { ok: false; reason: 'nonexistent' };

/** Throws a RangeError unless timeZone is an IANA zone this runtime knows. */
export function assertTimeZone(timeZone: string): void {
  try {
    new Intl.DateTimeFormat('en-US', { timeZone }).format(0);
  } catch {
    throw new RangeError(`Unknown time zone "${timeZone}".`);
  }
}

const HOUR_MS = 3_600_000;

/**
 * The instant a wall-clock time names in an IANA zone, without ever letting
 * the machine's own zone in. Each offset the zone uses around that day is
 * tried; a candidate counts when the zone (via TZDate) shows that very wall
 * clock at it.
 * No candidate: the time falls in a spring-forward gap and does not exist.
 * Two candidates: the time repeats after a fall-back change; the earlier
 * instant (the first time the clock showed it) is taken.
 */
export function resolveLocalTime(wall: WallClock, timeZone: string): LocalTimeResult {
  const wallAsUtc = Date.UTC(wall.year, wall.month - 1, wall.day, wall.hour, wall.minute, wall.second, wall.millisecond);
  const dayStart = Date.UTC(wall.year, wall.month - 1, wall.day);
  const span = offsetWindow(timeZone, dayStart);
  // Fast path: the zone keeps one offset from 36 h before to 36 h after this
  // day, so the wall time exists exactly once.
  if (span.before === span.after && Number.isFinite(span.before)) {
    return { ok: true, instant: new Date(wallAsUtc - span.before * 60_000), ambiguous: false };
  }
  const offsets = new Set<number>([span.before, span.after]);
  const matches: number[] = [];
  for (const offsetMinutes of offsets) {
    if (!Number.isFinite(offsetMinutes)) continue;
    const candidate = wallAsUtc - offsetMinutes * 60_000;
    const shown = new TZDate(candidate, timeZone);
    if (
      shown.getFullYear() === wall.year &&
      shown.getMonth() === wall.month - 1 &&
      shown.getDate() === wall.day &&
      shown.getHours() === wall.hour &&
      shown.getMinutes() === wall.minute &&
      shown.getSeconds() === wall.second
    ) {
      matches.push(candidate);
    }
  }
  if (matches.length === 0) return { ok: false, reason: 'nonexistent' };
  matches.sort((a, b) => a - b);
  return { ok: true, instant: new Date(matches[0]), ambiguous: matches.length > 1 && matches[0] !== matches[1] };
}

/** UTC offsets (minutes) 36 h before and 36 h after a wall-clock day, memoised per zone and day. */
const windowCache = new Map<string, { before: number; after: number }>();
const WINDOW_CACHE_LIMIT = 5000;

function offsetWindow(timeZone: string, dayStart: number): { before: number; after: number } {
  const key = `${timeZone}|${dayStart}`;
  let span = windowCache.get(key);
  if (!span) {
    span = {
      before: tzOffset(timeZone, new Date(dayStart - 36 * HOUR_MS)),
      after: tzOffset(timeZone, new Date(dayStart + 60 * HOUR_MS)),
    };
    if (windowCache.size >= WINDOW_CACHE_LIMIT) windowCache.clear();
    windowCache.set(key, span);
  }
  return span;
}
