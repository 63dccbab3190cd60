import { useState } from 'react';

export interface RunStatusButtonProps {
  runId: number;
  version: number;
  status: 'planned' | 'confirmed' | 'running' | 'done' | 'cancelled';
  label: string;
  /** Where to go after a finish (the run's record form), for those who may record; without it the page reloads with the new status. */
  recordHref?: string;
}

/** Start or finish a run from the floor; after a finish opens the record form when given, else reloads the page with the server's answer. */
export default function RunStatusButton(p: RunStatusButtonProps) {
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const action = p.status === 'planned' || p.status === 'confirmed' ? 'start' : p.status === 'running' ? 'finish' : null;
  if (!action) return null;
  async function go() {
    setBusy(true);
    setError(null);
    try {
      const res = await fetch(`/api/runs/${p.runId}/${action}`, {
        method: 'POST',
        headers: { 'content-type': 'application/json', accept: 'application/json' },
        body: JSON.stringify({ version: p.version }),
      });
      if (res.ok) {
        if (action === 'finish' && p.recordHref) window.location.assign(p.recordHref);
        else window.location.reload();
        return;
      }
      const body = await res.json().catch(() => null);
      setError(
        res.status === 409 && body?.current ? 'Someone changed this run meanwhile; reload to see it.' : (body?.error?.message ?? `Not saved (${res.status}).`),
      );
    } catch {
      setError('Could not reach Plateau. Check the connection and try again.');
    }
    setBusy(false);
  }
  return (
    <span className="inline-flex flex-col gap-1">
      <button type="button" className={action === 'start' ? 'btn' : 'btn btn-quiet'} disabled={busy} onClick={go}>
        {busy ? 'Saving…' : action === 'start' ? `Start ${p.label}` : `Finish ${p.label}`}
      </button>
      {error && (
        <span className="field-error" role="alert">
          {error}
        </span>
      )}
    </span>
  );
}
