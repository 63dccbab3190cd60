/**
 * A run's actual times beside its booking: where a started or done run is drawn and counted,
 * the words for how far it strayed from its booking ("started 40 min late"), and the questions
 * asked before a start or finish that looks wrong. Pure: the server checks with these and the
 * board and pages say the same words.
 */
import { formatReadyWindow, formatWhen } from './format';
import { wallClock } from './time';
import type { FermentState, RunStatus, TimeRange } from './types';

const MINUTE_MS = 60_000;
const HOUR_MS = 3_600_000;
const DAY_MS = 86_400_000;

/**
 * A Finish this soon after Start is questioned: no distillation run heats up, runs and is shut
 * down in under ten minutes, so it is most likely a mis-tap (common practice: even a small pot
 * still's heat-up alone takes far longer). Cleaning and maintenance slots are asked the same.
 */
export const MIN_RUN_MINUTES = 10;

/** How far an actual time may be corrected away from the booking it belongs to. */
export const MAX_CORRECTION_DAYS = 7;

/** Clock skew allowed between a phone or a browser and the server when a time is said to be "now". */
export const CLOCK_SKEW_MS = 2 * MINUTE_MS;

/** A deviation smaller than this reads "on time". */
const ON_TIME_MS = MINUTE_MS;

/** What the actual-time rules need of a run. */
export interface TimedRun {
  status: RunStatus;
  startsAt: Date;
  endsAt: Date;
  startedAt?: Date | null;
  finishedAt?: Date | null;
}

/** Whether a run has actual times to show (it was started). */
export const hasActualTimes = (r: TimedRun): boolean => (r.status === 'running' || r.status === 'done') && !!r.startedAt;

/**
 * Where a run is drawn and counted: a done run from its start to its finish, a running run from
 * its start to now or its booked end (whichever is later; without `now`, its booked end), any
 * other run at its booking. A run done without a stamped start (finished from its record) keeps
 * its booked start. The end is never before the start.
 */
export function actualSpan(r: TimedRun, now?: Date): TimeRange {
  if (r.status === 'done') {
    const start = r.startedAt ?? r.startsAt;
    const end = r.finishedAt ?? r.endsAt;
    return { start, end: end.getTime() < start.getTime() ? start : end };
  }
  if (r.status === 'running' && r.startedAt) {
    const until = Math.max(r.endsAt.getTime(), now?.getTime() ?? 0, r.startedAt.getTime());
    return { start: r.startedAt, end: new Date(until) };
  }
  return { start: r.startsAt, end: r.endsAt };
}

/**
 * A length of time in words: "40 s" under a minute, else rounded to the minute: "40 min",
 * "2 h 10 min", "1 h", "3 d 2 h" from a day up (minutes dropped there).
 */
export function durationWords(ms: number): string {
  const abs = Math.abs(ms);
  if (abs < MINUTE_MS) return `${Math.round(abs / 1000)} s`;
  const minutes = Math.round(abs / MINUTE_MS);
  if (minutes < 60) return `${minutes} min`;
  if (minutes < 24 * 60) {
    const h = Math.floor(minutes / 60);
    const m = minutes % 60;
    return m ? `${h} h ${m} min` : `${h} h`;
  }
  const d = Math.floor(minutes / (24 * 60));
  const h = Math.floor((minutes % (24 * 60)) / 60);
  return h ? `${d} d ${h} h` : `${d} d`;
}

/** "40 min late", "1 h 5 min early" or "on time" for an actual moment against its booked one. */
export function deviationWords(actual: Date, booked: Date): string {
  const diff = actual.getTime() - booked.getTime();
  if (Math.abs(diff) < ON_TIME_MS) return 'on time';
  return `${durationWords(diff)} ${diff > 0 ? 'late' : 'early'}`;
}

/** "started 40 min late, finished 1 h 5 min early"; empty when the run has not started. */
export function timingWords(r: TimedRun): string {
  const parts: string[] = [];
  if (r.startedAt && (r.status === 'running' || r.status === 'done')) parts.push(`started ${deviationWords(r.startedAt, r.startsAt)}`);
  if (r.finishedAt && r.status === 'done') parts.push(`finished ${deviationWords(r.finishedAt, r.endsAt)}`);
  return parts.join(', ');
}

/** Actual hours minus booked hours of one run (positive: it took longer than booked); null before it is done. */
export function overrunHours(r: TimedRun): number | null {
  if (r.status !== 'done') return null;
  const span = actualSpan(r);
  return (span.end.getTime() - span.start.getTime() - (r.endsAt.getTime() - r.startsAt.getTime())) / HOUR_MS;
}

/** A moment on the distillery's clock: "08:00" on the same local day as `now`, else "3 Dec 08:00". */
function clockWords(at: Date, now: Date, timeZone: string): string {
  const w = wallClock(at, timeZone);
  return w.ymd === wallClock(now, timeZone).ymd ? w.hm : formatWhen(at, timeZone);
}

type ChargedWash = Pick<FermentState, 'code' | 'status' | 'confirmedAt' | 'emptiedAt' | 'readyAt' | 'readyP10' | 'readyP90'>;

export interface StartCheckInput {
  run: Pick<TimedRun, 'startsAt'> & { ferments: ReadonlyArray<{ fermentId: number }>; feeds: ReadonlyArray<{ runId: number }> };
  now: Date;
  /** How long before its booked start a run may start without a question (workspace setting). */
  marginMinutes: number;
  /** The washes charging the run, by ferment id. */
  ferments: ReadonlyMap<number, ChargedWash>;
  /** The stripping runs feeding a spirit run, by run id. */
  feeders: ReadonlyMap<number, { status: RunStatus; startsAt: Date; stillName: string }>;
  timeZone: string;
}

/** Why a wash is not confirmed stable, in words. */
function notStableWhy(f: ChargedWash, timeZone: string): string {
  if (f.status === 'stalled') return 'it has stalled, its gravity holding above the finishing range';
  if (f.status === 'souring') return 'it shows signs of souring; check it before it goes to the still';
  if (f.status === 'finished') return 'the stability rule is not met yet';
  const window = formatReadyWindow(f, timeZone);
  if (window) return window;
  return 'it has no forecast yet (too few readings)';
}

/**
 * The sentences a distiller must read and accept before starting a run now: a start more than
 * the margin before the booking, a charged wash not confirmed stable (or already emptied), a
 * feeding stripping run not finished. Empty when nothing needs asking.
 */
export function startQuestions(input: StartCheckInput): string[] {
  const { run, now, timeZone } = input;
  const out: string[] = [];
  const early = run.startsAt.getTime() - now.getTime();
  if (early > input.marginMinutes * MINUTE_MS) {
    out.push(`This is ${durationWords(early)} before the booked start (${clockWords(run.startsAt, now, timeZone)}).`);
  }
  for (const c of run.ferments) {
    const f = input.ferments.get(c.fermentId);
    if (!f) continue;
    if (f.emptiedAt) {
      out.push(`Wash ${f.code} was already marked emptied (${formatWhen(f.emptiedAt, timeZone)}): check what is going into the still.`);
      continue;
    }
    if (f.status === 'finished' && f.confirmedAt && f.confirmedAt.getTime() <= now.getTime()) continue;
    out.push(`Wash ${f.code} is not confirmed stable yet: ${notStableWhy(f, timeZone)}.`);
  }
  for (const l of run.feeds) {
    const feeder = input.feeders.get(l.runId);
    if (!feeder || feeder.status === 'done') continue;
    out.push(
      `The stripping run on ${feeder.stillName} booked ${formatWhen(feeder.startsAt, timeZone)} that feeds this run is not finished yet (${feeder.status}).`,
    );
  }
  return out;
}

/** The question before a finish this soon after the start, or null. */
export function finishQuestion(startedAt: Date | null | undefined, now: Date, minMinutes = MIN_RUN_MINUTES): string | null {
  if (!startedAt) return null;
  const ran = now.getTime() - startedAt.getTime();
  if (ran >= minMinutes * MINUTE_MS) return null;
  return `Finished ${durationWords(Math.max(0, ran))} after it started — is that right?`;
}

export interface CorrectionInput {
  status: RunStatus;
  startsAt: Date;
  endsAt: Date;
  /** The actual times after the correction (the stored ones where not corrected). */
  startedAt: Date | null;
  finishedAt: Date | null;
  /** Which of the two the person corrected: only those are checked against now and the booking. */
  changed: ReadonlyArray<'startedAt' | 'finishedAt'>;
  now: Date;
  timeZone: string;
}

/**
 * Problems with corrected actual times, as { field: words }: a time in the future (beyond clock
 * skew), a time more than a week from the booking it belongs to, a finish not after its start
 * (named on the finish when it was corrected, else on the start).
 */
export function correctionProblems(c: CorrectionInput): Record<string, string> {
  const out: Record<string, string> = {};
  const future = c.now.getTime() + CLOCK_SKEW_MS;
  const far = MAX_CORRECTION_DAYS * DAY_MS;
  if (c.changed.includes('startedAt') && c.startedAt) {
    if (c.startedAt.getTime() > future) out.startedAt = 'A run cannot have started in the future.';
    else if (Math.abs(c.startedAt.getTime() - c.startsAt.getTime()) > far)
      out.startedAt = `The start must be within ${MAX_CORRECTION_DAYS} days of the booked start (${formatWhen(c.startsAt, c.timeZone)}); check the date.`;
  }
  if (c.changed.includes('finishedAt') && c.finishedAt) {
    if (c.finishedAt.getTime() > future) out.finishedAt = 'A run cannot have finished in the future.';
    else if (Math.abs(c.finishedAt.getTime() - c.endsAt.getTime()) > far)
      out.finishedAt = `The finish must be within ${MAX_CORRECTION_DAYS} days of the booked end (${formatWhen(c.endsAt, c.timeZone)}); check the date.`;
  }
  if (Object.keys(out).length === 0 && c.startedAt && c.finishedAt && c.finishedAt.getTime() <= c.startedAt.getTime()) {
    if (c.changed.includes('finishedAt')) out.finishedAt = `The finish must come after the start (${formatWhen(c.startedAt, c.timeZone)}).`;
    else out.startedAt = `The start must come before the finish (${formatWhen(c.finishedAt, c.timeZone)}).`;
  }
  return out;
}
