import { useState } from 'react';
import { wallClock, zonedDateTime } from '../../lib/schedule';

export interface CorrectTimesProps {
  runId: number;
  version: number;
  status: 'running' | 'done';
  timeZone: string;
  /** ISO instants as stored. */
  startedAt: string | null;
  finishedAt: string | null;
}

const toInput = (iso: string | null, tz: string) => {
  if (!iso) return '';
  const w = wallClock(new Date(iso), tz);
  return `${w.ymd}T${w.hm}`;
};
const fromInput = (value: string, tz: string): Date | null => {
  const m = /^(\d{4}-\d{2}-\d{2})T(\d{2}:\d{2})/.exec(value);
  return m ? zonedDateTime(m[1]!, m[2]!, tz) : null;
};

/** A planner's correction of when a run really started or finished, with the reason the audit log keeps. */
export default function CorrectTimes(p: CorrectTimesProps) {
  const [open, setOpen] = useState(false);
  const [started, setStarted] = useState(toInput(p.startedAt, p.timeZone));
  const [finished, setFinished] = useState(toInput(p.finishedAt, p.timeZone));
  const [reason, setReason] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function save(e: React.FormEvent) {
    e.preventDefault();
    const body: Record<string, unknown> = { version: p.version, reason };
    const s = fromInput(started, p.timeZone);
    const f = fromInput(finished, p.timeZone);
    if (s && started !== toInput(p.startedAt, p.timeZone)) body.startedAt = s.toISOString();
    if (p.status === 'done' && f && finished !== toInput(p.finishedAt, p.timeZone)) body.finishedAt = f.toISOString();
    setBusy(true);
    setErrors({});
    setMessage(null);
    try {
      const res = await fetch(`/api/runs/${p.runId}/actual-times`, {
        method: 'PATCH',
        headers: { 'content-type': 'application/json', accept: 'application/json' },
        credentials: 'same-origin',
        body: JSON.stringify(body),
      });
      if (res.ok) {
        window.location.reload();
        return;
      }
      const answer = await res.json().catch(() => null);
      setErrors(answer?.error?.fields ?? {});
      setMessage(
        answer?.error?.code === 'stale' ? 'Someone changed this run meanwhile; reload to see it.' : (answer?.error?.message ?? `Not saved (${res.status}).`),
      );
    } catch {
      setMessage('Could not reach Plateau. Check the connection and try again.');
    }
    setBusy(false);
  }

  if (!open) {
    return (
      <button type="button" className="btn btn-quiet" onClick={() => setOpen(true)}>
        Correct the actual times
      </button>
    );
  }
  return (
    <form onSubmit={save} className="flex flex-col gap-3" aria-labelledby={`correct-${p.runId}`} noValidate>
      <h3 id={`correct-${p.runId}`} className="font-semibold">
        Correct when this run really started{p.status === 'done' ? ' and finished' : ''}
      </h3>
      {message && (
        <p className="field-error" role="alert">
          {message}
        </p>
      )}
      <div className="grid grid-cols-1 gap-3 sm:grid-cols-2">
        <div className="field">
          <label htmlFor={`ct-start-${p.runId}`}>Started ({p.timeZone})</label>
          <input
            id={`ct-start-${p.runId}`}
            className="input"
            type="datetime-local"
            value={started}
            onChange={(e) => setStarted(e.target.value)}
            aria-invalid={errors.startedAt ? true : undefined}
            aria-describedby={errors.startedAt ? `ct-start-err-${p.runId}` : undefined}
          />
          {errors.startedAt && (
            <span id={`ct-start-err-${p.runId}`} className="field-error">
              {errors.startedAt}
            </span>
          )}
        </div>
        {p.status === 'done' && (
          <div className="field">
            <label htmlFor={`ct-finish-${p.runId}`}>Finished ({p.timeZone})</label>
            <input
              id={`ct-finish-${p.runId}`}
              className="input"
              type="datetime-local"
              value={finished}
              onChange={(e) => setFinished(e.target.value)}
              aria-invalid={errors.finishedAt ? true : undefined}
              aria-describedby={errors.finishedAt ? `ct-finish-err-${p.runId}` : undefined}
            />
            {errors.finishedAt && (
              <span id={`ct-finish-err-${p.runId}`} className="field-error">
                {errors.finishedAt}
              </span>
            )}
          </div>
        )}
        <div className="field sm:col-span-2">
          <label htmlFor={`ct-reason-${p.runId}`}>Why (kept in the audit log)</label>
          <input
            id={`ct-reason-${p.runId}`}
            className="input"
            type="text"
            maxLength={500}
            required
            value={reason}
            onChange={(e) => setReason(e.target.value)}
            aria-invalid={errors.reason ? true : undefined}
            aria-describedby={errors.reason ? `ct-reason-err-${p.runId}` : undefined}
          />
          {errors.reason && (
            <span id={`ct-reason-err-${p.runId}`} className="field-error">
              {errors.reason}
            </span>
          )}
        </div>
      </div>
      <div className="flex flex-wrap gap-2">
        <button type="submit" className="btn" disabled={busy}>
          {busy ? 'Saving…' : 'Save the corrected times'}
        </button>
        <button type="button" className="btn btn-quiet" disabled={busy} onClick={() => setOpen(false)}>
          Cancel
        </button>
      </div>
    </form>
  );
}
