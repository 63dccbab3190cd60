import { describe, expect, it } from 'vitest';
import { buildFeed, buildFeedAsync, EventCache, eventKey, uidForRun, type FeedEvent } from '../../src/lib/calendar';
import { utc } from '../helpers/time';

const now = utc('2026-12-01T08:00:00');

function event(i: number, patch: Partial<FeedEvent> = {}): FeedEvent {
  const start = new Date(utc('2026-12-03T06:00').getTime() + i * 6 * 3_600_000);
  return {
    uid: uidForRun(i + 1, 7),
    start,
    end: new Date(start.getTime() + 5 * 3_600_000),
    title: `Stripping run · Still ${(i % 3) + 1}`,
    description: `Wash F-${i} at 21 °C, café côté; charge 1,200 L`,
    location: 'Still house',
    url: `https://plateau.example/runs/${i + 1}`,
    status: i % 2 ? 'CONFIRMED' : 'TENTATIVE',
    sequence: 0,
    lastModified: utc('2026-11-30T12:00'),
    ...patch,
  };
}

const events = Array.from({ length: 12 }, (_, i) => event(i));

describe('VEVENT cache', () => {
  it('gives the same text from a warm cache as from a cold one', () => {
    const cache = new EventCache();
    const cold = buildFeed({ name: 'All runs', events, now }, cache);
    expect(cache.misses).toBe(12);
    const warm = buildFeed({ name: 'All runs', events, now }, cache);
    expect(cache.hits).toBe(12);
    expect(warm).toBe(cold);
    expect(buildFeed({ name: 'All runs', events, now }, new EventCache())).toBe(cold);
  });

  it('rebuilds only the events that changed', () => {
    const cache = new EventCache();
    buildFeed({ name: 'All runs', events, now }, cache);
    const moved = events.map((e, i) => (i === 4 ? event(4, { start: utc('2026-12-10T06:00'), end: utc('2026-12-10T11:00'), sequence: 1 }) : e));
    cache.hits = 0;
    cache.misses = 0;
    const text = buildFeed({ name: 'All runs', events: moved, now }, cache);
    expect(cache.misses).toBe(1);
    expect(cache.hits).toBe(11);
    const unfolded = text.replace(/\r\n[ \t]/g, '');
    expect(unfolded).toContain('DTSTART:20261210T060000Z');
    expect(unfolded).toContain('SEQUENCE:1');
    expect(text).toBe(buildFeed({ name: 'All runs', events: moved, now }, new EventCache()));
  });

  it.each([
    ['title', { title: 'Spirit run · Still 1' }],
    ['description', { description: 'Wash F-0 at 22 °C' }],
    ['status', { status: 'CONFIRMED' as const }],
    ['sequence', { sequence: 2 }],
    ['start', { start: utc('2026-12-03T05:00') }],
    ['end', { end: utc('2026-12-03T12:00') }],
    ['location', { location: 'Bay 3' }],
    ['url', { url: 'https://plateau.example/runs/99' }],
    ['last revision', { lastModified: utc('2026-12-01T07:00') }],
  ])('keys an event by its %s', (_what, patch) => {
    const a = event(0);
    expect(eventKey(a, now)).toBe(eventKey(event(0), now));
    expect(eventKey({ ...a, ...patch }, now)).not.toBe(eventKey(a, now));
  });

  it('stays within its bound, dropping the least recently used', () => {
    const cache = new EventCache(5);
    buildFeed({ name: 'x', events, now }, cache);
    expect(cache.size).toBe(5);
    cache.hits = 0;
    cache.misses = 0;
    // The last five built are kept; the first seven were dropped.
    buildFeed({ name: 'x', events: events.slice(7), now }, cache);
    expect(cache.hits).toBe(5);
    buildFeed({ name: 'x', events: events.slice(0, 1), now }, cache);
    expect(cache.misses).toBe(1);
    expect(() => new EventCache(0)).toThrow(RangeError);
  });

  it('builds the same feed in slices without holding the event loop', async () => {
    const expected = buildFeed({ name: 'All runs', events, now }, new EventCache());
    const cache = new EventCache();
    expect(await buildFeedAsync({ name: 'All runs', events, now }, cache, 5)).toBe(expected);
    expect(cache.size).toBe(12);
  });
});
