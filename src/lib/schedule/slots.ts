/** Earliest feasible slots for a run: the board's "find me a slot" answer when a ferment stalls or runs late. */
import { needsCleaningAfter, occupiedRange } from './overlap';
import { openIntervals, snapToSlot } from './time';
import type { Run, RunType, Still } from './types';

const MINUTE_MS = 60_000;
const DAY_MS = 86_400_000;

export interface SlotRequest {
  durationMinutes: number;
  chargeLitres: number;
  notBefore: Date;
  /** Candidate stills, in the order to prefer them on equal start times. */
  stills: readonly Still[];
  runs: readonly Run[];
  timeZone: string;
  /** The run being moved, so it does not block itself. */
  excludeRunId?: number;
  /** Type of the run to place; decides whether it needs a cleaning slot after it. Default 'stripping'. */
  type?: RunType;
  /** Default 3. */
  limit?: number;
  /** Default 21. */
  horizonDays?: number;
  /** Default 30. */
  slotMinutes?: number;
}

export interface Slot {
  stillId: number;
  startsAt: Date;
  endsAt: Date;
}

/**
 * The earliest feasible slots, ordered by start time, then by the order of
 * `stills`. A slot is feasible when:
 * - the still's capacity takes `chargeLitres`;
 * - it starts on the slot grid (local clock, from `notBefore` onwards);
 * - the run starts and ends inside ONE open interval of the still (operating
 *   hours merged across midnight, overnight shifts included, closure dates
 *   removed), so a run may span midnight only where the still is open through
 *   it, and the still's cleaning slot after it also fits before closing;
 * - its busy time (run plus the still's cleaning slot) overlaps no live run
 *   on that still, nor their cleaning slots.
 * Suggestions on one still do not overlap each other: after a slot is found,
 * the search on that still carries on from the slot's end, so each answer is
 * a genuinely different choice. The search stops `horizonDays` after `notBefore`.
 */
export function findEarliestSlots(request: SlotRequest): Slot[] {
  const limit = request.limit ?? 3;
  const horizonDays = request.horizonDays ?? 21;
  const slotMinutes = request.slotMinutes ?? 30;
  const type = request.type ?? 'stripping';
  const durationMs = request.durationMinutes * MINUTE_MS;
  if (!(request.durationMinutes > 0)) throw new RangeError('durationMinutes must be above zero');
  if (limit <= 0) return [];

  const horizon = { start: request.notBefore, end: new Date(request.notBefore.getTime() + horizonDays * DAY_MS) };
  const found: Array<Slot & { order: number }> = [];

  request.stills.forEach((still, order) => {
    if (still.capacityLitres + 1e-6 < request.chargeLitres) return;
    const busy = request.runs
      .filter((r) => r.stillId === still.id && r.status !== 'cancelled' && r.id !== request.excludeRunId)
      .map((r) => occupiedRange(r, still))
      .sort((a, b) => a.start.getTime() - b.start.getTime());
    const cleaningMs = needsCleaningAfter(type) ? Math.max(0, still.cleaningAfterRunMinutes) * MINUTE_MS : 0;

    let perStill = 0;
    for (const interval of openIntervals(still, horizon, request.timeZone)) {
      let start = snapToSlot(interval.start, slotMinutes, request.timeZone, 'up');
      while (perStill < limit && start.getTime() + durationMs + cleaningMs <= interval.end.getTime()) {
        const end = start.getTime() + durationMs;
        const clash = busy.find((b) => start.getTime() < b.end.getTime() && b.start.getTime() < end + cleaningMs);
        if (!clash) {
          found.push({ stillId: still.id, startsAt: start, endsAt: new Date(end), order });
          perStill++;
          start = snapToSlot(new Date(end), slotMinutes, request.timeZone, 'up');
        } else {
          // Jump past the clash; no start before its end can work.
          const next = snapToSlot(clash.end, slotMinutes, request.timeZone, 'up');
          start = next.getTime() > start.getTime() ? next : new Date(start.getTime() + slotMinutes * MINUTE_MS);
        }
      }
      if (perStill >= limit) break;
    }
  });

  found.sort((a, b) => a.startsAt.getTime() - b.startsAt.getTime() || a.order - b.order);
  return found.slice(0, limit).map(({ stillId, startsAt, endsAt }) => ({ stillId, startsAt, endsAt }));
}

export interface WashSlotRequest {
  /** Litres of wash to book. */
  litres: number;
  /** Candidate stills in board order; the ones that take all of the wash are preferred. */
  stills: readonly Still[];
  runs: readonly Run[];
  timeZone: string;
  /** Not before this (now, or when the wash stops being at risk). */
  notBefore: Date;
  /** The run's length on a still (the booking dialog's default for that still and charge). */
  durationMinutes: (still: Still, litres: number) => number;
  /** Default 60: bookings start on the hour. */
  slotMinutes?: number;
  /** Default 42. */
  horizonDays?: number;
}

/**
 * Where booking a wash starts: the earliest feasible slot (inside operating hours with room
 * for the run and its cleaning, not on a closure, clear of other runs) on the stills that
 * take all of the wash, else on any still with as much as it takes. Earlier start wins,
 * then board order. Null when no still has such a slot within the horizon.
 */
export function washBookingSlot(request: WashSlotRequest): (Slot & { litres: number }) | null {
  const takesAll = request.stills.filter((s) => s.capacityLitres + 1e-6 >= request.litres);
  const candidates = takesAll.length ? takesAll : request.stills;
  let best: (Slot & { litres: number }) | null = null;
  for (const still of candidates) {
    const litres = Math.min(request.litres, still.capacityLitres);
    const durationMinutes = Math.max(1, Math.round(request.durationMinutes(still, litres)));
    const [slot] = findEarliestSlots({
      durationMinutes,
      chargeLitres: litres,
      notBefore: request.notBefore,
      stills: [still],
      runs: request.runs,
      timeZone: request.timeZone,
      type: 'stripping',
      limit: 1,
      horizonDays: request.horizonDays ?? 42,
      slotMinutes: request.slotMinutes ?? 60,
    });
    if (slot && (!best || slot.startsAt.getTime() < best.startsAt.getTime())) best = { ...slot, litres };
  }
  return best;
}
