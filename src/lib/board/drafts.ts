/**
 * Runs that do not exist yet: the stripping run a wash dropped on a still would become (its
 * warnings are previewed while it is dragged), and where the booking dialog opens for a wash,
 * a click on an empty row or the Book a run button.
 */
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
 * Where booking a wash starts: the first still that takes all of it (else the first still), on
 * the hour, not before the end of its ready window nor before now. Null without stills.
 */
export function fermentBooking(
  f: Pick<BoardFerment, 'id' | 'volumeLitres' | 'readyP90' | 'readyAt'>,
  stills: readonly BoardStill[],
  now: Date,
  windowStart: Date,
  pxPerHour: number,
  timeZone: string,
): { stillId: number; startsAt: Date; ferments: Array<{ fermentId: number; litres: number }> } | null {
  if (stills.length === 0) return null;
  const still = stills.find((s) => s.capacityLitres >= f.volumeLitres) ?? stills[0]!;
  const after = new Date(Math.max(now.getTime(), (f.readyP90 ?? f.readyAt ?? now).getTime()));
  const startsAt = slotAtX(xOf(after, windowStart, pxPerHour), windowStart, pxPerHour, 60, timeZone);
  return {
    stillId: still.id,
    startsAt: new Date(Math.max(startsAt.getTime(), after.getTime())),
    ferments: [{ fermentId: f.id, litres: Math.min(f.volumeLitres, still.capacityLitres) }],
  };
}
