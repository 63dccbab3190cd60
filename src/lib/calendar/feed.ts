/**
 * A published iCalendar feed (RFC 5545 with RFC 7986 calendar properties):
 * VERSION and PRODID once, no METHOD, NAME / X-WR-CALNAME and
 * REFRESH-INTERVAL, UTC times, TEXT escaped, CRLF line ends, lines folded at
 * 75 octets without splitting a UTF-8 sequence.
 *
 * The lines are written here rather than by the ics package: ics validates
 * each event with a schema library and folds by grapheme (quadratic on long
 * lines), about 0.3–0.8 ms per event, far over the budget for a 2,000-event
 * feed, and its output would need rewriting anyway (METHOD, folding, header
 * escaping). The unit tests compare every event line with what ics writes
 * for the same event.
 */
import { escapeText, foldLine, formatDurationMinutes } from './text';

export type EventStatus = 'TENTATIVE' | 'CONFIRMED' | 'CANCELLED';

export interface FeedEvent {
  uid: string;
  start: Date;
  /** Exclusive end (DTEND). */
  end: Date;
  title: string;
  description: string;
  location?: string;
  url?: string;
  status: EventStatus;
  /** 0 for a new event, raised on every significant change (times, status). */
  sequence: number;
  lastModified?: Date;
}

export interface FeedInput {
  name: string;
  prodId?: string;
  events: readonly FeedEvent[];
  /** DTSTAMP of every event: when the feed was generated. */
  now: Date;
  /** How often clients should refresh; default 60 minutes. */
  refreshMinutes?: number;
}

export const DEFAULT_PRODID = '-//Plateau//Still board//EN';

const STATUSES: ReadonlySet<string> = new Set(['TENTATIVE', 'CONFIRMED', 'CANCELLED']);
const URI = /^[A-Za-z][A-Za-z0-9+.-]*:[^\s"<>\\^`{|}]+$/;

const pad2 = (n: number) => (n < 10 ? `0${n}` : `${n}`);

/** A DATE-TIME in UTC form, e.g. 20261203T060000Z (seconds kept, milliseconds dropped). */
export function formatUtcDateTime(date: Date): string {
  const t = date.getTime();
  if (!Number.isFinite(t)) throw new RangeError('Invalid date');
  const y = date.getUTCFullYear();
  if (y < 0 || y > 9999) throw new RangeError('Year out of range for iCalendar');
  return `${String(y).padStart(4, '0')}${pad2(date.getUTCMonth() + 1)}${pad2(date.getUTCDate())}T${pad2(date.getUTCHours())}${pad2(date.getUTCMinutes())}${pad2(date.getUTCSeconds())}Z`;
}

function eventLines(event: FeedEvent, dtstamp: string, out: string[]): void {
  if (!(event.end.getTime() >= event.start.getTime())) throw new RangeError(`Event ${event.uid} ends before it starts`);
  if (!Number.isInteger(event.sequence) || event.sequence < 0) throw new RangeError(`Event ${event.uid}: SEQUENCE must be a whole number from 0`);
  if (!STATUSES.has(event.status)) throw new RangeError(`Event ${event.uid}: unknown STATUS ${event.status}`);
  if (event.uid.trim() === '') throw new RangeError('Event UID must not be empty');
  if (event.url !== undefined && event.url !== '' && !URI.test(event.url)) throw new RangeError(`Event ${event.uid}: not a URI: ${event.url}`);
  out.push('BEGIN:VEVENT', `UID:${escapeText(event.uid)}`, `DTSTAMP:${dtstamp}`, `DTSTART:${formatUtcDateTime(event.start)}`, `DTEND:${formatUtcDateTime(event.end)}`);
  out.push(`SUMMARY:${escapeText(event.title)}`);
  const description = escapeText(event.description);
  if (description !== '') out.push(`DESCRIPTION:${description}`);
  if (event.location) out.push(`LOCATION:${escapeText(event.location)}`);
  if (event.url) out.push(`URL:${event.url}`);
  out.push(`STATUS:${event.status}`, `SEQUENCE:${event.sequence}`);
  if (event.lastModified) out.push(`LAST-MODIFIED:${formatUtcDateTime(event.lastModified)}`);
  out.push('END:VEVENT');
}

/** Build the feed text. Throws RangeError on an event the standard cannot carry. */
export function buildFeed(input: FeedInput): string {
  const refresh = formatDurationMinutes(input.refreshMinutes ?? 60);
  const dtstamp = formatUtcDateTime(input.now);
  const lines: string[] = [
    'BEGIN:VCALENDAR',
    'VERSION:2.0',
    `PRODID:${escapeText(input.prodId ?? DEFAULT_PRODID)}`,
    'CALSCALE:GREGORIAN',
    `NAME:${escapeText(input.name)}`,
    `X-WR-CALNAME:${escapeText(input.name)}`,
    `REFRESH-INTERVAL;VALUE=DURATION:${refresh}`,
    `X-PUBLISHED-TTL:${refresh}`,
  ];
  for (const event of input.events) eventLines(event, dtstamp, lines);
  lines.push('END:VCALENDAR', '');
  for (let i = 0; i < lines.length; i++) lines[i] = foldLine(lines[i]);
  return lines.join('\r\n');
}
