/** Shared test fixtures for time: a still open round the clock, and the London wall-clock text people read in mail and feeds. */

/** A UTC instant from wall-clock text without a zone: utc('2026-12-01T06:00') is 06:00 Z. */
export const utc = (iso: string): Date => new Date(`${iso}Z`);

export const HOUR = 3_600_000;
export const DAY = 24 * HOUR;

/** Operating hours of a still that may run at any hour on any day. */
export const ALL_WEEK = [0, 1, 2, 3, 4, 5, 6].map((weekday) => ({ weekday, open: '00:00', close: '24:00' }));

/** 'Tue 3 Dec 06:00' in Europe/London, from the platform's Intl (not our formatter). */
export function londonWhen(date: Date): string {
  const parts = Object.fromEntries(
    new Intl.DateTimeFormat('en-GB', {
      weekday: 'short',
      day: 'numeric',
      month: 'short',
      hour: '2-digit',
      minute: '2-digit',
      hourCycle: 'h23',
      timeZone: 'Europe/London',
    })
      .formatToParts(date)
      .map((p) => [p.type, p.value]),
  );
  return `${parts.weekday} ${parts.day} ${String(parts.month).slice(0, 3)} ${parts.hour}:${parts.minute}`;
}
