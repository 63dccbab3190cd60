/**
 * Where things sit on the drawn board, in pixels: the fixed row and column sizes, the closed
 * hours and ready windows on a still's row, a run block's box and texts, a vessel's bar, and
 * the labels of the time axis. Pure: the island draws what these return.
 */
import { actualSpan, hasActualTimes, occupiedRange, openIntervals, timingWords } from '../schedule';
import { formatVolume, type UnitSystem } from '../units';
import { windowPlacement, type VesselBar, type WindowPlacement } from './planning';
import { hourMarks, xOf, type BoardDay, type BoardWindow, type MoveTarget, type Zoom, type ZoomSpec } from './timeline';
import type { Board, BoardFerment, BoardRun, BoardStill } from './types';
import { dayAndTime, shortDate } from './words';

/** Width of the still names column. */
export const LABEL_WIDTH = 150;
/** Height of a still's row: a keyboard step down or up moves a run by this much. */
export const ROW_HEIGHT = 66;
export const VESSEL_ROW_HEIGHT = 28;
export const HEADER_HEIGHT = 46;

const HOUR_MS = 3_600_000;

export interface Span {
  x: number;
  w: number;
}
export interface ReadyWindowSpan {
  key: string;
  x: number;
  w: number;
  mid: number | null;
  code: string;
}

/** The drawn width of a window, whole pixels. */
export const canvasWidth = (win: Pick<BoardWindow, 'start' | 'end'>, pxPerHour: number): number => Math.round(xOf(win.end, win.start, pxPerHour));

/** One snapping slot and one day, in pixels: what the arrow keys and shift + arrow move a run by. */
export const slotWidth = (spec: Pick<ZoomSpec, 'slotMinutes' | 'pxPerHour'>): number => (spec.slotMinutes / 60) * spec.pxPerHour;
export const dayWidth = (spec: Pick<ZoomSpec, 'pxPerHour'>): number => 24 * spec.pxPerHour;

/** Up to three capitals of a name, for operators on narrow blocks. */
export const initials = (name: string): string =>
  name
    .split(/\s+/)
    .map((w) => w[0])
    .join('')
    .slice(0, 3)
    .toUpperCase();

/** The runs each still shows in the window (a started or done run where it really ran, or where it was booked), cancelled runs left out; every still has a list. */
export function runsByStill(
  stills: readonly Pick<BoardStill, 'id'>[],
  runs: readonly BoardRun[],
  win: Pick<BoardWindow, 'start' | 'end'>,
  now?: Date,
): Map<number, BoardRun[]> {
  const m = new Map<number, BoardRun[]>();
  for (const s of stills) m.set(s.id, []);
  for (const r of runs) {
    if (r.status === 'cancelled') continue;
    const span = actualSpan(r, now);
    const end = Math.max(span.end.getTime(), r.endsAt.getTime());
    const start = Math.min(span.start.getTime(), r.startsAt.getTime());
    if (end <= win.start.getTime() || start >= win.end.getTime()) continue;
    m.get(r.stillId)?.push(r);
  }
  return m;
}

/** The stretches of a window in which each still is closed (outside its operating hours or shut). */
export function closedSpans(stills: readonly BoardStill[], win: Pick<BoardWindow, 'start' | 'end'>, timeZone: string, pxPerHour: number): Map<number, Span[]> {
  const m = new Map<number, Span[]>();
  for (const s of stills) {
    const open = openIntervals(s, { start: win.start, end: win.end }, timeZone);
    const out: Span[] = [];
    let cursor = win.start;
    for (const o of [...open, { start: win.end, end: win.end }]) {
      if (o.start > cursor) out.push({ x: xOf(cursor, win.start, pxPerHour), w: xOf(o.start, cursor, pxPerHour) });
      cursor = o.end;
    }
    m.set(s.id, out);
  }
  return m;
}

/** The ready windows of the washes booked on each still's runs (each wash once per row, emptied ones left out). */
export function readyWindowSpans(
  runs: ReadonlyMap<number, readonly BoardRun[]>,
  fermentById: ReadonlyMap<number, BoardFerment>,
  windowStart: Date,
  pxPerHour: number,
): Map<number, ReadyWindowSpan[]> {
  const m = new Map<number, ReadyWindowSpan[]>();
  for (const [stillId, list] of runs) {
    const seen = new Set<number>();
    const out: ReadyWindowSpan[] = [];
    for (const r of list) {
      for (const c of r.ferments) {
        const f = fermentById.get(c.fermentId);
        if (!f || seen.has(f.id) || f.emptiedAt) continue;
        seen.add(f.id);
        const early = f.readyP10 ?? f.readyAt;
        const late = f.readyP90 ?? f.readyAt;
        if (!early || !late) continue;
        const x = xOf(early, windowStart, pxPerHour);
        out.push({ key: `${r.id}-${f.id}`, x, w: xOf(late, early, pxPerHour), mid: f.readyAt ? xOf(f.readyAt, early, pxPerHour) : null, code: f.code });
      }
    }
    m.set(stillId, out);
  }
  return m;
}

export interface RunBlockLayout {
  /** The block: where the run really ran once started (a running run until now or its booked end, whichever is later), else its booking. */
  x: number;
  width: number;
  cleaningWidth: number;
  /** The booking drawn faintly beside a started or done run, for comparison; null before a start. */
  booked: Span | null;
  fermentCodes: string;
  chargeText: string;
  operatorText: string;
  timeText: string;
  /** "started 40 min late, finished 1 h 5 min early"; empty before a start. */
  timingText: string;
  placement: WindowPlacement;
}

export interface RunBlockContext {
  stillById: ReadonlyMap<number, BoardStill>;
  fermentById: ReadonlyMap<number, BoardFerment>;
  personById: ReadonlyMap<number, Board['people'][number]>;
  windowStart: Date;
  pxPerHour: number;
  timeZone: string;
  zoom: Zoom;
  units: UnitSystem;
  /** The board's clock: a running run is drawn at least until now. */
  now?: Date;
}

/** A run block's box and texts: its worst window placement over the washes it takes, its charge, its operator. */
export function runBlockLayout(r: BoardRun, c: RunBlockContext): RunBlockLayout {
  const still = c.stillById.get(r.stillId);
  const actual = hasActualTimes(r) || r.status === 'done';
  const span = actualSpan(r, c.now);
  const occupied = occupiedRange({ ...r, startsAt: span.start, endsAt: span.end }, still);
  const codes = r.ferments.map((x) => c.fermentById.get(x.fermentId)?.code ?? '?').join(' + ');
  const worst = r.ferments
    .map((x) => c.fermentById.get(x.fermentId))
    .filter((f) => f && !f.emptiedAt)
    .map((f) => windowPlacement(span.start, f!));
  const placement = worst.includes('before') ? 'before' : worst.includes('inside') ? 'inside' : worst.includes('after') ? 'after' : 'unknown';
  const charge = r.chargeLitres ?? (r.ferments.length ? r.ferments.reduce((s, x) => s + x.litres, 0) : null);
  const op = r.operatorId ? (c.personById.get(r.operatorId)?.name ?? '') : '';
  const booking = `${dayAndTime(r.startsAt, c.timeZone)} to ${dayAndTime(r.endsAt, c.timeZone)}`;
  const timeText = !actual
    ? booking
    : r.status === 'running'
      ? `running since ${dayAndTime(span.start, c.timeZone)} (booked ${booking})`
      : `ran ${dayAndTime(span.start, c.timeZone)} to ${dayAndTime(span.end, c.timeZone)} (booked ${booking})`;
  return {
    x: xOf(span.start, c.windowStart, c.pxPerHour),
    width: xOf(span.end, span.start, c.pxPerHour),
    cleaningWidth: xOf(occupied.end, span.end, c.pxPerHour),
    booked: actual ? { x: xOf(r.startsAt, c.windowStart, c.pxPerHour), w: xOf(r.endsAt, r.startsAt, c.pxPerHour) } : null,
    fermentCodes: codes,
    chargeText: charge ? formatVolume(charge, c.units) : '',
    operatorText: op ? (c.zoom === 'day' ? op : initials(op)) : '',
    timeText,
    timingText: timingWords(r),
    placement,
  };
}

export interface VesselBarLayout {
  x: number;
  width: number;
  /** The hatched ready window, relative to the bar. */
  window: Span | null;
  label: string;
}

/** A fermenter's bar for one wash: pitched, ready window, then waiting until the run that empties it; null when outside the window. */
export function vesselBarLayout(b: VesselBar, win: Pick<BoardWindow, 'start' | 'end'>, pxPerHour: number, timeZone: string): VesselBarLayout | null {
  const endAt = b.freeAt ?? b.readyP90 ?? win.end;
  if (endAt <= win.start || b.pitchedAt >= win.end) return null;
  const x0 = xOf(b.pitchedAt, win.start, pxPerHour);
  const x1 = xOf(endAt, win.start, pxPerHour);
  const p10 = b.readyP10 ? xOf(b.readyP10, win.start, pxPerHour) : null;
  const p90 = b.readyP90 ? xOf(b.readyP90, win.start, pxPerHour) : null;
  const label = `${b.code}: pitched ${dayAndTime(b.pitchedAt, timeZone)}${b.readyP10 && b.readyP90 ? `, ready window ${dayAndTime(b.readyP10, timeZone)} to ${dayAndTime(b.readyP90, timeZone)}` : ''}, ${b.freeAt ? `${b.freedBy === 'emptied' ? 'emptied' : 'taken by a run'} ${dayAndTime(b.freeAt, timeZone)}` : 'no run booked yet'}`;
  return {
    x: x0,
    width: Math.max(4, x1 - x0),
    window: p10 !== null && p90 !== null ? { x: p10 - x0, w: Math.max(2, p90 - p10) } : null,
    label,
  };
}

/** The box of the drop preview on the canvas, for a target on the given row. */
export function dropGhostBox(target: Pick<MoveTarget, 'startsAt' | 'endsAt'>, row: number, windowStart: Date, pxPerHour: number) {
  return {
    left: LABEL_WIDTH + xOf(target.startsAt, windowStart, pxPerHour),
    top: HEADER_HEIGHT + row * ROW_HEIGHT + 4,
    width: Math.max(8, xOf(target.endsAt, target.startsAt, pxPerHour)),
    height: ROW_HEIGHT - 10,
  };
}

/** The heading of the shown range: one day, or first – last day. */
export function rangeLabel(win: Pick<BoardWindow, 'zoom' | 'days'>): string {
  const first = win.days[0]!;
  const last = win.days[win.days.length - 1]!;
  return win.zoom === 'day' ? shortDate(first.ymd, first.weekday) : `${shortDate(first.ymd, first.weekday)} – ${shortDate(last.ymd, last.weekday)}`;
}

/** The name a zoom gives one page of the board, for the previous / next buttons. */
export const pageName = (zoom: Zoom): string => (zoom === 'day' ? 'day' : zoom === 'week' ? 'week' : 'six weeks');

/** A day's label on the axis: the six-week view drops the weekday. */
export const axisDayLabel = (d: Pick<BoardDay, 'ymd' | 'weekday'>, zoom: Zoom): string =>
  zoom === 'six-weeks' ? `${shortDate(d.ymd, d.weekday).split(' ').slice(1).join(' ')}` : shortDate(d.ymd, d.weekday);

/** The hour ticks on a day of the axis (every hour by day, every six by week, none over six weeks), midnight left out. */
export function axisTicks(d: BoardDay, zoom: Zoom, timeZone: string, pxPerHour: number): Array<{ label: string; x: number }> {
  const every = zoom === 'day' ? 1 : zoom === 'week' ? 6 : 0;
  if (every === 0) return [];
  return hourMarks(d, every, timeZone)
    .filter((m) => m.label !== '00:00')
    .map((m) => ({ label: zoom === 'day' ? m.label : m.label.slice(0, 2), x: xOf(m.at, d.start, pxPerHour) }));
}

/**
 * Where the timeline starts scrolled: the day view at 05:00, the current week with today at the
 * left edge (so the coming days are in view at 7 am), anything else at its start.
 */
export function initialScrollLeft(win: Pick<BoardWindow, 'zoom' | 'start' | 'end' | 'days'>, now: Date, pxPerHour: number): number {
  if (win.zoom === 'day') return Math.max(0, xOf(new Date(win.start.getTime() + 5 * HOUR_MS), win.start, pxPerHour));
  if (win.zoom === 'week' && now > win.start && now < win.end) {
    const todayStart = win.days.find((d) => now >= d.start && now < d.end)?.start ?? win.start;
    return Math.max(0, xOf(todayStart, win.start, pxPerHour) - 20);
  }
  return 0;
}
