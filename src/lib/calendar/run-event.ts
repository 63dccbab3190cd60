/** Calendar events for still runs: status from the forecast, description, stable UID. */
import { formatLitres, formatReadyWindow, formatWhen } from '../schedule/format';
import type { FermentState, RunStatus, RunType, Warning } from '../schedule/types';
import type { EventStatus } from './feed';
import { FORECAST_STATUS_LABELS, RUN_TYPE_LABELS } from '../vocabulary';

export interface RunEventStatusInput {
  runType: RunType;
  runStatus: RunStatus;
  /** The ferments charging the run. */
  ferments: ReadonlyArray<Pick<FermentState, 'status' | 'confirmedAt'>>;
  /** For spirit runs: the stripping runs feeding it, with their own event status when known. */
  feeds: ReadonlyArray<{ runStatus: RunStatus; eventStatus?: EventStatus }>;
}

const isConfirmedFinished = (f: Pick<FermentState, 'status' | 'confirmedAt'>) => f.status === 'finished' && f.confirmedAt !== null;

function feedIsSettled(feed: { runStatus: RunStatus; eventStatus?: EventStatus }): boolean {
  if (feed.runStatus === 'cancelled') return false;
  if (feed.runStatus === 'done') return true;
  if (feed.eventStatus !== undefined) return feed.eventStatus === 'CONFIRMED';
  return feed.runStatus === 'running';
}

/**
 * STATUS of a run's calendar event:
 * - a cancelled run is CANCELLED;
 * - cleaning and maintenance, and runs already running or done, are CONFIRMED;
 * - a run charged from ferments is TENTATIVE until every one of them is
 *   finished and confirmed stable, then CONFIRMED;
 * - a spirit run follows its feeding runs: CONFIRMED once each is done or
 *   itself CONFIRMED (a running feed counts as settled when its event status
 *   is not given), TENTATIVE while any is not, or was cancelled;
 * - a stripping run with no ferment linked is TENTATIVE (its wash is not known);
 *   other runs with nothing to wait for are CONFIRMED.
 */
export function runEventStatus(input: RunEventStatusInput): EventStatus {
  if (input.runStatus === 'cancelled') return 'CANCELLED';
  if (input.runType === 'cleaning' || input.runType === 'maintenance') return 'CONFIRMED';
  if (input.runStatus === 'running' || input.runStatus === 'done') return 'CONFIRMED';
  if (input.ferments.length > 0) return input.ferments.every(isConfirmedFinished) ? 'CONFIRMED' : 'TENTATIVE';
  if (input.runType === 'spirit' && input.feeds.length > 0) return input.feeds.every(feedIsSettled) ? 'CONFIRMED' : 'TENTATIVE';
  if (input.runType === 'stripping') return 'TENTATIVE';
  return 'CONFIRMED';
}

const SEVERITY_LABELS: Record<Warning['severity'], string> = { danger: 'Danger', warning: 'Warning', info: 'Note' };

/** Summary line of a run's event, e.g. "Stripping run · Still 1". */
export function runEventTitle(runType: RunType, stillName: string): string {
  return `${RUN_TYPE_LABELS[runType]} · ${stillName}`;
}

export interface RunEventDescriptionInput {
  runType: RunType;
  stillName: string;
  ferments: ReadonlyArray<
    Pick<FermentState, 'code' | 'status' | 'readyAt' | 'readyP10' | 'readyP90' | 'confirmedAt'> & { litres?: number | null; emptiedAt?: Date | null }
  >;
  chargeLitres: number | null;
  operatorName: string | null;
  warnings: ReadonlyArray<Pick<Warning, 'severity' | 'message'>>;
  /** Link to the run on the board. */
  url?: string;
  timeZone: string;
  /** For a started or done run: how its actual times compare with the booking kept beside them. */
  actual?: { words: string; bookedStart: Date; bookedEnd: Date };
}

/** Plain-text DESCRIPTION of a run's event (escaped later by the feed builder). */
export function describeRunEvent(input: RunEventDescriptionInput): string {
  const lines: string[] = [`${RUN_TYPE_LABELS[input.runType]} on ${input.stillName}`];
  if (input.actual) {
    const w = input.actual.words;
    lines.push(
      `${w.charAt(0).toUpperCase()}${w.slice(1)} (booked ${formatWhen(input.actual.bookedStart, input.timeZone)} – ${formatWhen(input.actual.bookedEnd, input.timeZone)})`,
    );
  }
  if (input.chargeLitres !== null) lines.push(`Charge: ${formatLitres(input.chargeLitres)}`);
  for (const f of input.ferments) {
    const amount = f.litres !== null && f.litres !== undefined ? ` (${formatLitres(f.litres)})` : '';
    let state = FORECAST_STATUS_LABELS[f.status].toLowerCase();
    if (f.emptiedAt) {
      // Its fermenter has been emptied (into this or another still): the forecast is history.
      state = `fermenter emptied ${formatWhen(f.emptiedAt, input.timeZone)}`;
    } else if (f.status === 'finished' && f.confirmedAt) {
      state += `, confirmed stable ${formatWhen(f.confirmedAt, input.timeZone)}`;
    } else if (f.status !== 'stalled' && f.status !== 'souring') {
      const window = formatReadyWindow(f, input.timeZone);
      state += window ? `, not yet confirmed stable, ${window}` : ', not yet confirmed stable';
    }
    lines.push(`Wash ${f.code}${amount}: ${state}`);
  }
  lines.push(`Operator: ${input.operatorName ?? 'not assigned'}`);
  if (input.warnings.length > 0) {
    lines.push('Warnings:');
    for (const w of input.warnings) lines.push(`- ${SEVERITY_LABELS[w.severity]}: ${w.message}`);
  }
  if (input.runType !== 'cleaning' && input.runType !== 'maintenance') {
    lines.push('Never leave a running still unattended.');
  }
  if (input.url) lines.push(`On the board: ${input.url}`);
  return lines.join('\n');
}

const HOST = /^(?=.{1,253}$)[A-Za-z0-9](?:[A-Za-z0-9-]{0,61}[A-Za-z0-9])?(?:\.[A-Za-z0-9](?:[A-Za-z0-9-]{0,61}[A-Za-z0-9])?)*$/;

/**
 * Stable UID of a run's event: `run-<workspace>-<run>@<host>`. It carries
 * only ids, never names or e-mail addresses, and stays the same when the
 * run moves, so calendar clients update the event instead of adding one.
 */
export function uidForRun(runId: number, workspaceId: number, domain = 'plateau.invalid'): string {
  if (!Number.isSafeInteger(runId) || runId < 0) throw new RangeError('runId must be a whole number');
  if (!Number.isSafeInteger(workspaceId) || workspaceId < 0) throw new RangeError('workspaceId must be a whole number');
  if (!HOST.test(domain)) throw new RangeError(`Not a host name: "${domain}"`);
  return `run-${workspaceId}-${runId}@${domain.toLowerCase()}`;
}
