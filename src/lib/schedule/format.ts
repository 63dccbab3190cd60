import { wallClock, type WallClock } from './time';

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];
const WEEKDAYS = ['Sunday', 'Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday'];

/** A moment this close to now (either way) may be named by its weekday alone. */
export const NEAR_DAYS = 6;
const NEAR_MS = NEAR_DAYS * 86_400_000;

export interface MomentOptions {
  /** The clock the distance is measured from; default the real clock. */
  now?: Date;
  /** Always show the date (mail, which is read later), not only when the moment is far. */
  dated?: boolean;
}

/**
 * The one way a moment is named on the distillery's clock: 'Tuesday 06:00' when it lies
 * within six days of now (either way), else with its date: 'Tue 15 Dec 06:00', and the
 * year when it is not now's year: 'Wed 8 Jan 3000, 08:00'. `dated` always gives the date.
 */
export function formatMoment(date: Date, timeZone: string, options: MomentOptions = {}): string {
  const now = options.now ?? new Date();
  const w = wallClock(date, timeZone);
  if (!options.dated && Math.abs(date.getTime() - now.getTime()) <= NEAR_MS) return `${WEEKDAYS[w.weekday]} ${w.hm}`;
  return `${WEEKDAYS[w.weekday]!.slice(0, 3)} ${datedTime(w, now, timeZone)}`;
}

/** '3 Dec 06:00' on the distillery's clock; given `now`, with the year when it is not now's ('8 Jan 3000, 08:00'). */
export function formatWhen(date: Date, timeZone: string, now?: Date): string {
  return datedTime(wallClock(date, timeZone), now, timeZone);
}

/** '3 Dec 06:00', or '8 Jan 3000, 08:00' when `now` is given and lies in another year. */
function datedTime(w: WallClock, now: Date | undefined, timeZone: string): string {
  const [year, month, day] = w.ymd.split('-').map(Number);
  const sameYear = !now || wallClock(now, timeZone).ymd.slice(0, 4) === w.ymd.slice(0, 4);
  return `${day} ${MONTHS[month! - 1]}${sameYear ? ' ' : ` ${year}, `}${w.hm}`;
}

/** '24 Dec' for a local date 'YYYY-MM-DD'. */
export function formatYmd(ymd: string): string {
  const [, month, day] = ymd.split('-').map(Number);
  return `${day} ${MONTHS[month! - 1]}`;
}

/** '1,250 L' (one decimal kept when there is one). */
export function formatLitres(litres: number): string {
  const rounded = Math.round(litres * 10) / 10;
  const [whole, fraction] = Math.abs(rounded).toFixed(1).split('.');
  const grouped = whole.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  return `${rounded < 0 ? '-' : ''}${grouped}${fraction === '0' ? '' : `.${fraction}`} L`;
}

/** 'ready window 3 Dec 06:00 – 4 Dec 18:00', or the single predicted time when there is no window. */
export function formatReadyWindow(f: { readyAt: Date | null; readyP10: Date | null; readyP90: Date | null }, timeZone: string, now?: Date): string | null {
  if (f.readyP10 && f.readyP90) return `ready window ${formatWhen(f.readyP10, timeZone, now)} – ${formatWhen(f.readyP90, timeZone, now)}`;
  if (f.readyAt) return `predicted ready ${formatWhen(f.readyAt, timeZone, now)}`;
  return null;
}
