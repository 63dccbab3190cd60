/** Times sent by people and loggers, read in the distillery's time zone. */
import { resolveLocalTime } from '../lib/csv';
import { invalid } from './http';

/** Clocks on phones and loggers drift: times up to this far ahead of the server are accepted. */
export const CLOCK_SKEW_MS = 5 * 60_000;

const LOCAL_TIME = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2}))?$/;

/**
 * A time from a form or API body: ISO 8601 with a zone is taken as written; a wall-clock
 * time without a zone ("2026-11-04T08:30", as a datetime-local input sends) is read in the
 * distillery's time zone.
 */
export function parseWorkspaceTime(text: string, timeZone: string, field: string): Date {
  const m = LOCAL_TIME.exec(text.trim());
  if (m) {
    const r = resolveLocalTime({ year: +m[1]!, month: +m[2]!, day: +m[3]!, hour: +m[4]!, minute: +m[5]!, second: m[6] ? +m[6] : 0, millisecond: 0 }, timeZone);
    if (!r.ok) throw invalid(field, `${text} does not exist in ${timeZone} (the clocks went forward).`);
    return r.instant;
  }
  const d = new Date(text);
  if (!/^\d{4}-\d{2}-\d{2}T/.test(text) || Number.isNaN(d.getTime())) throw invalid(field, 'Give a date and time, e.g. 2026-11-04T08:30.');
  return d;
}
