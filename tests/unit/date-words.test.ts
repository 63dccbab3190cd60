import { describe, expect, it } from 'vitest';
import { dayAndTime, movedMessage } from '../../src/lib/board';
import { formatMoment, formatReadyWindow, formatWhen } from '../../src/lib/schedule';
import { utc } from '../helpers/time';

// Europe/London in winter is GMT, so wall clock = UTC. Fixed "now": Saturday 5 Dec 2026, 12:00.
const TZ = 'Europe/London';
const now = utc('2026-12-05T12:00');
const MINUTE = 60_000;
const DAY = 86_400_000;
const plus = (ms: number) => new Date(now.getTime() + ms);

/** The platform's own calendar (Intl), not our formatter: 'Fri 11 Dec' for the same wall clock. */
const intlDay = (d: Date, timeZone = TZ) =>
  new Intl.DateTimeFormat('en-GB', { weekday: 'short', day: 'numeric', month: 'short', timeZone }).format(d).replace(',', '');

describe('formatMoment: the weekday alone within six days of now, the date beyond', () => {
  it.each([
    ['now', 0, 'Saturday 12:00'],
    ['exactly six days ahead', 6 * DAY, 'Friday 12:00'],
    ['six days and a minute ahead', 6 * DAY + MINUTE, 'Fri 11 Dec 12:01'],
    ['exactly six days back', -6 * DAY, 'Sunday 12:00'],
    ['six days and a minute back', -6 * DAY - MINUTE, 'Sun 29 Nov 11:59'],
    ['a month ahead, in the next year', 31 * DAY, 'Tue 5 Jan 2027, 12:00'],
  ])('%s reads "%s"', (_what, offset, expected) => {
    expect(formatMoment(plus(offset), TZ, { now })).toBe(expected);
    expect(dayAndTime(plus(offset), TZ, now)).toBe(expected);
  });

  it('names its weekday as the calendar does (checked against Intl)', () => {
    for (const offset of [6 * DAY + MINUTE, -6 * DAY - MINUTE, 40 * DAY]) {
      const text = formatMoment(plus(offset), TZ, { now });
      expect(text.startsWith(intlDay(plus(offset)))).toBe(true);
    }
  });

  it('shows a run in the year 3000 with its date and year, not "Wednesday 08:00"', () => {
    const far = utc('3000-01-08T08:00');
    // 8 Jan 3000 is a Wednesday (Intl: "Wed, 8 Jan 3000").
    expect(intlDay(far)).toBe('Wed 8 Jan');
    expect(formatMoment(far, TZ, { now })).toBe('Wed 8 Jan 3000, 08:00');
    expect(movedMessage('stripping', 'Wash Still 1', far, TZ, now)).toBe('Stripping run moved to Wash Still 1, Wed 8 Jan 3000, 08:00');
  });

  it('always dates a moment for mail, which is read later', () => {
    expect(formatMoment(plus(DAY), TZ, { now, dated: true })).toBe('Sun 6 Dec 12:00');
  });

  it("reads the distillery's clock: 06:00 BST on 2 June is 05:00 UTC", () => {
    const june = utc('2026-06-02T05:00');
    expect(formatMoment(june, TZ, { now })).toBe('Tue 2 Jun 06:00');
    expect(formatMoment(june, TZ, { now: utc('2026-06-01T00:00') })).toBe('Tuesday 06:00');
    // Measured in elapsed time, not calendar days: 6 days ahead in New York is still near.
    expect(formatMoment(plus(6 * DAY), 'America/New_York', { now })).toBe('Friday 07:00');
  });
});

describe('formatWhen and the ready window', () => {
  it('keep their short date, with the year when it is not the year of now', () => {
    expect(formatWhen(utc('2026-12-24T06:00'), TZ, now)).toBe('24 Dec 06:00');
    expect(formatWhen(utc('3000-01-08T08:00'), TZ, now)).toBe('8 Jan 3000, 08:00');
    expect(formatReadyWindow({ readyAt: null, readyP10: utc('2026-12-30T06:00'), readyP90: utc('2027-01-02T18:00') }, TZ, now)).toBe(
      'ready window 30 Dec 06:00 – 2 Jan 2027, 18:00',
    );
  });
});
