/** The line the day view, the run page and the run sheet show under a started or done run's booking. */
import { deviationWords, timingWords, type TimedRun } from '../../lib/schedule';

/**
 * "Ran 08:40–13:05: started 40 min late, finished 1 h 5 min late" for a done run,
 * "Started 08:40 (40 min late), still running" for a running one, null before a start.
 * `when` writes a moment on the distillery's clock.
 */
export function actualLine(r: TimedRun, when: (d: Date) => string): string | null {
  if (!r.startedAt || (r.status !== 'running' && r.status !== 'done')) {
    // Finished from its record without a stamped start: only the finish is known.
    if (r.status === 'done' && r.finishedAt) return `Finished ${when(r.finishedAt)} (${deviationWords(r.finishedAt, r.endsAt)})`;
    return null;
  }
  if (r.status === 'running') return `Started ${when(r.startedAt)} (${deviationWords(r.startedAt, r.startsAt)}), still running`;
  const end = r.finishedAt ?? r.endsAt;
  return `Ran ${when(r.startedAt)}–${when(end)}: ${timingWords(r)}`;
}
