import { wallClock } from './time';

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/** '3 Dec 06:00' on the distillery's clock. */
export function formatWhen(date: Date, timeZone: string): string {
  const w = wallClock(date, timeZone);
  const [, month, day] = w.ymd.split('-').map(Number);
  return `${day} ${MONTHS[month - 1]} ${w.hm}`;
}

/** '24 Dec' for a local date 'YYYY-MM-DD'. */
export function formatYmd(ymd: string): string {
  const [, month, day] = ymd.split('-').map(Number);
  return `${day} ${MONTHS[month - 1]}`;
}

/** '1,250 L' (one decimal kept when there is one). */
export function formatLitres(litres: number): string {
  const rounded = Math.round(litres * 10) / 10;
  const [whole, fraction] = Math.abs(rounded).toFixed(1).split('.');
  const grouped = whole.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  return `${rounded < 0 ? '-' : ''}${grouped}${fraction === '0' ? '' : `.${fraction}`} L`;
}

/** 'ready window 3 Dec 06:00 – 4 Dec 18:00', or the single predicted time when there is no window. */
export function formatReadyWindow(f: { readyAt: Date | null; readyP10: Date | null; readyP90: Date | null }, timeZone: string): string | null {
  if (f.readyP10 && f.readyP90) return `ready window ${formatWhen(f.readyP10, timeZone)} – ${formatWhen(f.readyP90, timeZone)}`;
  if (f.readyAt) return `predicted ready ${formatWhen(f.readyAt, timeZone)}`;
  return null;
}
