import type { Run, RunType, Still, TimeRange } from './types';

const MINUTE_MS = 60_000;

/** Run types after which a still needs its cleaning slot (cleaning and maintenance do not). */
export function needsCleaningAfter(type: RunType): boolean {
  return type === 'stripping' || type === 'spirit' || type === 'redistillation';
}

export type OverlapCandidate = Pick<Run, 'stillId' | 'startsAt' | 'endsAt'> & Partial<Pick<Run, 'id' | 'type' | 'status'>>;

/**
 * The time a run keeps its still busy: [startsAt, endsAt + cleaning slot).
 * A candidate with no `type` is treated as a distillation run.
 */
export function occupiedRange(run: OverlapCandidate, still?: Pick<Still, 'cleaningAfterRunMinutes'> | null): TimeRange {
  const cleaning = still && (run.type === undefined || needsCleaningAfter(run.type)) ? still.cleaningAfterRunMinutes : 0;
  return { start: run.startsAt, end: new Date(run.endsAt.getTime() + Math.max(0, cleaning) * MINUTE_MS) };
}

/**
 * The first (by start time) non-cancelled run on the candidate's still whose
 * busy time overlaps the candidate's, or null. Busy time is [start, end) plus
 * the still's cleaning slot after each distillation run — the candidate's own
 * slot included, so a run may not start inside the cleaning after another,
 * nor end so late that its cleaning runs into the next one. Touching
 * intervals do not overlap. The candidate's own id is skipped.
 */
export function findOverlap<R extends OverlapCandidate>(
  candidate: OverlapCandidate,
  runs: readonly R[],
  still?: Pick<Still, 'cleaningAfterRunMinutes'> | null,
): R | null {
  if (candidate.status === 'cancelled') return null;
  const mine = occupiedRange(candidate, still);
  let first: R | null = null;
  for (const other of runs) {
    if (other.stillId !== candidate.stillId) continue;
    if (other.status === 'cancelled') continue;
    if (candidate.id !== undefined && other.id === candidate.id) continue;
    const theirs = occupiedRange(other, still);
    const overlaps = mine.start.getTime() < theirs.end.getTime() && theirs.start.getTime() < mine.end.getTime();
    if (overlaps && (first === null || other.startsAt.getTime() < first.startsAt.getTime())) first = other;
  }
  return first;
}
