/**
 * A published iCalendar feed (RFC 5545 with RFC 7986 calendar properties):
 * VERSION and PRODID once, no METHOD, NAME / X-WR-CALNAME and
 * REFRESH-INTERVAL, UTC times, TEXT escaped, CRLF line ends, lines folded at
 * 75 octets without splitting a UTF-8 sequence.
 *
 * Every VEVENT is written by the ics package. ics validates each event with a
 * schema library and folds by grapheme, which costs a few milliseconds per
 * event, so each finished VEVENT block is kept in a bounded LRU keyed by the
 * event's content (UID, SEQUENCE, STATUS, times and a hash of its text): a
 * feed refresh rebuilds only the events that changed. ics's output is then
 * adjusted where RFC 5545 / 7986 ask for more: METHOD removed (a published
 * feed has none), NAME, an escaped X-WR-CALNAME and REFRESH-INTERVAL added,
 * and every line refolded at 75 octets (ics folds at 75 characters, with a
 * tab).
 */
import { createEvents, type EventAttributes } from 'ics';
import { escapeText, foldLine, formatDurationMinutes, normaliseText, unfold } from './text';

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
  /** When the event's information last changed; also its DTSTAMP (RFC 5545 §3.8.7.2, feed without METHOD). */
  lastModified?: Date;
}

export interface FeedInput {
  name: string;
  prodId?: string;
  events: readonly FeedEvent[];
  /** DTSTAMP of events that carry no lastModified: when the feed was generated. */
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

/** cyrb53: a fast 53-bit string hash (not cryptographic; collisions also need equal UID, times, status and sequence). */
function hash53(text: string, seed = 0): string {
  let h1 = 0xdeadbeef ^ seed;
  let h2 = 0x41c6ce57 ^ seed;
  for (let i = 0; i < text.length; i++) {
    const ch = text.charCodeAt(i);
    h1 = Math.imul(h1 ^ ch, 2654435761);
    h2 = Math.imul(h2 ^ ch, 1597334677);
  }
  h1 = Math.imul(h1 ^ (h1 >>> 16), 2246822507) ^ Math.imul(h2 ^ (h2 >>> 13), 3266489909);
  h2 = Math.imul(h2 ^ (h2 >>> 16), 2246822507) ^ Math.imul(h1 ^ (h1 >>> 13), 3266489909);
  return (4294967296 * (2097151 & h2) + (h1 >>> 0)).toString(36);
}

/** The cache key of an event's VEVENT block: everything that is written into it. */
export function eventKey(event: FeedEvent, dtstamp: Date): string {
  const text = `${event.title}\u0000${event.description}\u0000${event.location ?? ''}\u0000${event.url ?? ''}`;
  return [
    event.uid,
    event.sequence,
    event.status,
    event.start.getTime(),
    event.end.getTime(),
    dtstamp.getTime(),
    event.lastModified?.getTime() ?? '',
    text.length,
    hash53(text),
  ].join('|');
}

/** A bounded least-recently-used cache of built VEVENT blocks. */
export class EventCache {
  private readonly map = new Map<string, string>();
  hits = 0;
  misses = 0;
  constructor(readonly maxEntries = 10_000) {
    if (!Number.isInteger(maxEntries) || maxEntries < 1) throw new RangeError('maxEntries must be a whole number from 1');
  }
  get size(): number {
    return this.map.size;
  }
  get(key: string): string | undefined {
    const value = this.map.get(key);
    if (value === undefined) return undefined;
    // Refresh its place: a Map iterates in insertion order, oldest first.
    this.map.delete(key);
    this.map.set(key, value);
    return value;
  }
  set(key: string, value: string): void {
    this.map.delete(key);
    this.map.set(key, value);
    while (this.map.size > this.maxEntries) {
      const oldest = this.map.keys().next().value as string;
      this.map.delete(oldest);
    }
  }
  clear(): void {
    this.map.clear();
    this.hits = 0;
    this.misses = 0;
  }
}

/** The process-wide cache feeds share (the same run appears in the distillery's, its still's and its operator's feed). */
export const sharedEventCache = new EventCache();

function validate(event: FeedEvent): void {
  if (!(event.end.getTime() >= event.start.getTime())) throw new RangeError(`Event ${event.uid} ends before it starts`);
  if (!Number.isInteger(event.sequence) || event.sequence < 0) throw new RangeError(`Event ${event.uid}: SEQUENCE must be a whole number from 0`);
  if (!STATUSES.has(event.status)) throw new RangeError(`Event ${event.uid}: unknown STATUS ${event.status}`);
  if (event.uid.trim() === '') throw new RangeError('Event UID must not be empty');
  if (/[\r\n]/.test(event.uid)) throw new RangeError('Event UID must be one line');
  if (event.url !== undefined && event.url !== '' && !URI.test(event.url)) throw new RangeError(`Event ${event.uid}: not a URI: ${event.url}`);
  formatUtcDateTime(event.start);
  formatUtcDateTime(event.end);
  if (event.lastModified) formatUtcDateTime(event.lastModified);
}

function icsAttributes(event: FeedEvent, dtstamp: Date): EventAttributes {
  const description = normaliseText(event.description);
  const location = event.location ? normaliseText(event.location) : undefined;
  return {
    uid: event.uid,
    start: event.start.getTime(),
    startInputType: 'utc',
    startOutputType: 'utc',
    end: event.end.getTime(),
    endInputType: 'utc',
    endOutputType: 'utc',
    title: normaliseText(event.title),
    ...(description !== '' ? { description } : {}),
    ...(location ? { location } : {}),
    ...(event.url ? { url: event.url } : {}),
    status: event.status,
    sequence: event.sequence,
    timestamp: dtstamp.getTime(),
    ...(event.lastModified ? { lastModified: event.lastModified.getTime() } : {}),
  } as EventAttributes;
}

/** ics text -> logical lines (unfolded; ics folds with CRLF + TAB). */
const logicalLines = (text: string) => unfold(text).split('\r\n');

/** Split the VEVENT blocks out of a VCALENDAR ics wrote, each refolded at 75 octets and CRLF-terminated. */
function veventBlocks(calendar: string): string[] {
  const blocks: string[] = [];
  let current: string[] | null = null;
  for (const line of logicalLines(calendar)) {
    if (line === 'BEGIN:VEVENT') current = [line];
    else if (current) {
      current.push(line);
      if (line === 'END:VEVENT') {
        blocks.push(current.map((l) => `${foldLine(l)}\r\n`).join(''));
        current = null;
      }
    }
  }
  return blocks;
}

/** Build VEVENT blocks with ics, many at once (ics validates its header once per call). */
function buildBlocks(items: ReadonlyArray<{ event: FeedEvent; dtstamp: Date }>): string[] {
  if (items.length === 0) return [];
  const { error, value } = createEvents(items.map((i) => icsAttributes(i.event, i.dtstamp)));
  if (!error && value) {
    const blocks = veventBlocks(value);
    if (blocks.length === items.length) return blocks;
  }
  if (items.length === 1) {
    throw new RangeError(`Event ${items[0]!.event.uid} cannot be written: ${error?.message ?? 'unexpected output'}`);
  }
  // Name the event ics refused.
  return items.flatMap((i) => buildBlocks([i]));
}

const dtstampOf = (event: FeedEvent, now: Date) => event.lastModified ?? now;

/** The cache key of every event of a feed, in order (what buildFeed looks up in the cache). */
export function feedEventKeys(input: Pick<FeedInput, 'events' | 'now'>): string[] {
  return input.events.map((event) => eventKey(event, dtstampOf(event, input.now)));
}

const headers = new Map<string, string>();

/** The VCALENDAR header, from ics, then adjusted for a published feed (memoised: feeds have few names). */
function header(input: FeedInput): string {
  const key = `${input.name}\u0000${input.prodId ?? ''}\u0000${input.refreshMinutes ?? ''}`;
  let text = headers.get(key);
  if (text === undefined) {
    text = buildHeader(input);
    if (headers.size >= 200) headers.clear();
    headers.set(key, text);
  }
  return text;
}

function buildHeader(input: FeedInput): string {
  const refresh = formatDurationMinutes(input.refreshMinutes ?? 60);
  const name = escapeText(normaliseText(input.name));
  const { error, value } = createEvents([], { productId: normaliseText(input.prodId ?? DEFAULT_PRODID) });
  if (error || !value) throw new RangeError(`Calendar header cannot be written: ${error?.message ?? 'no output'}`);
  const lines = logicalLines(value).filter(
    (l) => l !== '' && l !== 'END:VCALENDAR' && !l.startsWith('METHOD:') && !l.startsWith('X-WR-CALNAME:') && !l.startsWith('X-PUBLISHED-TTL:'),
  );
  lines.push(`NAME:${name}`, `X-WR-CALNAME:${name}`, `REFRESH-INTERVAL;VALUE=DURATION:${refresh}`, `X-PUBLISHED-TTL:${refresh}`);
  return lines.map((l) => `${foldLine(l)}\r\n`).join('');
}

const FOOTER = 'END:VCALENDAR\r\n';

/** Build the feed text. Throws RangeError on an event the standard cannot carry. */
export function buildFeed(input: FeedInput, cache: EventCache = sharedEventCache): string {
  const parts: string[] = [header(input)];
  const keys: string[] = [];
  const missing: Array<{ index: number; event: FeedEvent; dtstamp: Date; key: string }> = [];
  input.events.forEach((event, index) => {
    validate(event);
    const dtstamp = dtstampOf(event, input.now);
    const key = eventKey(event, dtstamp);
    keys.push(key);
    const hit = cache.get(key);
    if (hit !== undefined) {
      cache.hits++;
      parts.push(hit);
    } else {
      cache.misses++;
      parts.push('');
      missing.push({ index, event, dtstamp, key });
    }
  });
  const built = buildBlocks(missing);
  missing.forEach((m, i) => {
    parts[m.index + 1] = built[i]!;
    cache.set(m.key, built[i]!);
  });
  parts.push(FOOTER);
  return parts.join('');
}

const yieldToLoop = () => new Promise<void>((resolve) => setTimeout(resolve, 0));

/**
 * The same feed as buildFeed, but events missing from the cache are built in
 * small batches with a pause between them, so a cold build (thousands of
 * events after a restart) does not hold up every other request.
 */
export async function buildFeedAsync(input: FeedInput, cache: EventCache = sharedEventCache, batch = 50): Promise<string> {
  const pending: Array<{ event: FeedEvent; dtstamp: Date; key: string }> = [];
  for (const event of input.events) {
    validate(event);
    const dtstamp = dtstampOf(event, input.now);
    const key = eventKey(event, dtstamp);
    if (cache.get(key) === undefined) pending.push({ event, dtstamp, key });
  }
  for (let i = 0; i < pending.length; i += batch) {
    const slice = pending.slice(i, i + batch);
    const built = buildBlocks(slice);
    slice.forEach((p, j) => cache.set(p.key, built[j]!));
    if (i + batch < pending.length) await yieldToLoop();
  }
  // A very small cache may already have dropped some of them: buildFeed rebuilds whatever is missing.
  return buildFeed(input, cache);
}
