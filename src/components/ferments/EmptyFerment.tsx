import { useState, type FormEvent } from 'react';
import type { EmptiedReason } from '../../lib/vocabulary';

export default function EmptyFerment({ fermentId, defaultAt }: { fermentId: number; defaultAt: string }) {
  const [reason, setReason] = useState<EmptiedReason>('distilled');
  const [at, setAt] = useState(defaultAt);
  const [error, setError] = useState('');
  const [busy, setBusy] = useState(false);
  async function submit(e: FormEvent) {
    e.preventDefault();
    setBusy(true);
    setError('');
    const res = await fetch(`/api/ferments/${fermentId}/empty`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ reason, at }),
    }).catch(() => null);
    setBusy(false);
    if (res?.ok) {
      window.location.assign(`/ferments/${fermentId}`);
      return;
    }
    const data = await res?.json().catch(() => null);
    setError(data?.error?.message ?? 'Could not mark it emptied. Try again.');
  }
  return (
    <form onSubmit={submit} className="mt-3 flex flex-wrap items-end gap-3">
      <fieldset className="flex gap-3">
        <legend className="label">Where did the wash go?</legend>
        <label className="flex min-h-11 items-center gap-2">
          <input type="radio" name="reason" checked={reason === 'distilled'} onChange={() => setReason('distilled')} /> To the still
        </label>
        <label className="flex min-h-11 items-center gap-2">
          <input type="radio" name="reason" checked={reason === 'dumped'} onChange={() => setReason('dumped')} /> Dumped
        </label>
      </fieldset>
      <div className="field">
        <label htmlFor="emptied-at">Emptied at</label>
        <input id="emptied-at" type="datetime-local" className="input" value={at} onChange={(e) => setAt(e.target.value)} />
      </div>
      <button className="btn" type="submit" disabled={busy}>
        Mark emptied
      </button>
      <p role="status" aria-live="polite" className="field-error">
        {error}
      </p>
    </form>
  );
}
