/**
 * Runs that do not exist yet: the stripping run a wash dropped on a still would become (its
 * warnings are previewed while it is dragged), and where the booking dialog opens for a wash,
 * a click on an empty row or the Book a run button.
 */
import { earliestStartNotAtRisk, washBookingSlot } from '../schedule';
import { defaultRunMinutes, toScheduleRun, toScheduleStill } from './planning';
import { slotAtX, xOf } from './timeline';
import type { BoardFerment, BoardRun, BoardStill } from './types';

/** The stripping run a wash would become on a still: as much as the still takes, its typical length (at least an hour). */
export function fermentDraftRun(
  f: Pick<BoardFerment, 'id' | 'volumeLitres'>,
  still: Pick<BoardStill, 'id' | 'capacityLitres' | 'typicalMinutes'>,
  startsAt: Date,
): BoardRun {
  const litres = Math.min(f.volumeLitres, still.capacityLitres);
  const minutes = Math.max(60, still.typicalMinutes.stripping);
  return {
    id: -1,
    stillId: still.id,
    type: 'stripping',
    status: 'planned',
    startsAt,
    endsAt: new Date(startsAt.getTime() + minutes * 60000),
    operatorId: null,
    chargeLitres: litres,
    chargeAbv: null,
    ferments: [{ fermentId: f.id, litres }],
    feeds: [],
    lowWinesLitres: null,
    version: 0,
    sequence: 0,
    notes: null,
  };
}

/** The first whole hour on the board from now (or from the window's start, when it lies ahead). */
export function firstBookableHour(now: Date, windowStart: Date, pxPerHour: number, timeZone: string): Date {
  const start = new Date(Math.max(now.getTime(), windowStart.getTime()));
  return slotAtX(xOf(start, windowStart, pxPerHour), windowStart, pxPerHour, 60, timeZone);
}

/**
 * Where booking a wash starts: the earliest slot inside a still's operating hours, with room
 * for the run and its cleaning before closing, not on a closure and clear of `runs`, from when
 * the wash is no longer at risk (the at-risk threshold quantile of its ready time; a fresh
 * stable period for a stalled or souring wash) and not before now; on the hour, on the stills
 * that take all of it (else any). Without such a slot, the first still that takes it, on the
 * hour from that moment. Null without stills.
 */
export function fermentBooking(
  f: Pick<BoardFerment, 'id' | 'volumeLitres' | 'status' | 'emptiedAt' | 'confirmedAt' | 'readyP10' | 'readyP90' | 'readyAt'>,
  stills: readonly BoardStill[],
  now: Date,
  windowStart: Date,
  pxPerHour: number,
  timeZone: string,
  opts: { runs?: readonly BoardRun[]; atRiskThreshold?: number; stableDays?: number } = {},
): { stillId: number; startsAt: Date; ferments: Array<{ fermentId: number; litres: number }> } | null {
  if (stills.length === 0) return null;
  const after = earliestStartNotAtRisk({ ferments: [{ fermentId: f.id, litres: f.volumeLitres }] }, [f], now, opts.stableDays ?? 3, opts.atRiskThreshold);
  const slot = washBookingSlot({
    litres: f.volumeLitres,
    stills: stills.map(toScheduleStill),
    runs: (opts.runs ?? []).map(toScheduleRun),
    timeZone,
    notBefore: after,
    durationMinutes: (still, litres) => defaultRunMinutes(still, 'stripping', litres),
  });
  if (slot) return { stillId: slot.stillId, startsAt: slot.startsAt, ferments: [{ fermentId: f.id, litres: slot.litres }] };
  const still = stills.find((s) => s.capacityLitres >= f.volumeLitres) ?? stills[0]!;
  const startsAt = slotAtX(xOf(after, windowStart, pxPerHour), windowStart, pxPerHour, 60, timeZone);
  return {
    stillId: still.id,
    startsAt: new Date(Math.max(startsAt.getTime(), after.getTime())),
    ferments: [{ fermentId: f.id, litres: Math.min(f.volumeLitres, still.capacityLitres) }],
  };
}
