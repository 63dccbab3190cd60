/** Display helpers shared by the ferment pages (server) and islands (browser). No server imports. */
import { READING_UNIT_SYMBOLS } from '../../lib/vocabulary';

export function statusTagClass(status: string | null | undefined): string {
  switch (status) {
    case 'finished':
      return 'tag tag-settled text-[#17604a]';
    case 'stalled':
      return 'tag tag-stalled';
    case 'souring':
      return 'tag tag-souring';
    case 'active':
    case 'slowing':
    case 'lag':
      return 'tag tag-working';
    default:
      return 'tag tag-quiet';
  }
}

export const fmtSg = (sg: number | null | undefined, decimals = 3): string => (sg == null || !Number.isFinite(sg) ? '–' : sg.toFixed(decimals));

/** "Tue 4 Nov, 14:05" in the distillery's time zone. */
export function fmtDateTime(d: Date | string | null | undefined, timeZone: string): string {
  if (!d) return '–';
  const date = typeof d === 'string' ? new Date(d) : d;
  return new Intl.DateTimeFormat('en-GB', {
    timeZone,
    weekday: 'short',
    day: 'numeric',
    month: 'short',
    hour: '2-digit',
    minute: '2-digit',
    hour12: false,
  }).format(date);
}

export function fmtDate(d: Date | string | null | undefined, timeZone: string): string {
  if (!d) return '–';
  const date = typeof d === 'string' ? new Date(d) : d;
  return new Intl.DateTimeFormat('en-GB', { timeZone, weekday: 'short', day: 'numeric', month: 'short' }).format(date);
}

/** Wall-clock "YYYY-MM-DDTHH:MM" of an instant in a zone, for datetime-local inputs. */
export function toLocalInput(d: Date, timeZone: string): string {
  const parts = Object.fromEntries(
    new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', hour12: false })
      .formatToParts(d)
      .map((p) => [p.type, p.value]),
  );
  const hour = parts.hour === '24' ? '00' : parts.hour;
  return `${parts.year}-${parts.month}-${parts.day}T${hour}:${parts.minute}`;
}

/** "3 h ago", "2 d ago". */
export function fmtAge(ms: number): string {
  if (ms < 0) return 'just now';
  const h = ms / 3_600_000;
  if (h < 1) return `${Math.max(1, Math.round(ms / 60_000))} min ago`;
  if (h < 48) return `${Math.round(h)} h ago`;
  return `${Math.round(h / 24)} d ago`;
}

export function fmtWindow(p10: Date | string | null | undefined, p90: Date | string | null | undefined, timeZone: string): string {
  if (!p10 || !p90) return '–';
  const a = fmtDate(p10, timeZone);
  const b = fmtDate(p90, timeZone);
  return a === b ? a : `${a} – ${b}`;
}

export function fmtRaw(value: number, unit: string): string {
  return unit === 'sg' ? value.toFixed(3) : `${value.toFixed(1)} ${(READING_UNIT_SYMBOLS as Record<string, string>)[unit] ?? unit}`;
}
