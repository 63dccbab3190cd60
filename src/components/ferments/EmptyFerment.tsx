import { useEffect, useId, useRef, useState, useSyncExternalStore, type FormEvent } from 'react';
import type { EmptiedReason } from '../../lib/vocabulary';

export interface EmptyFermentProps {
  fermentId: number;
  /** The ferment's code and fermenter, for the confirmation ("Mark F-0412 emptied? This frees FV3 …"). */
  code?: string;
  fermenterName?: string | null;
  /** Now, as a datetime-local value in the distillery's zone. */
  defaultAt: string;
  /** The page a plain form post returns to (the ferment page by default). */
  back?: string;
  /** A message the server sent back after a plain form post (?emptyError=…). */
  serverError?: string | null;
}

const NOTE_MAX = 200;
const noSubscription = () => () => {};

/** False in the server's HTML and while hydrating, true once the island runs in the browser. */
function useHydrated(): boolean {
  return useSyncExternalStore(
    noSubscription,
    () => true,
    () => false,
  );
}

/**
 * Mark the fermenter emptied: where the wash went (to the still, or dumped with a note saying
 * why), when, and a confirm step. A real form (method="post", action = the API route), so it
 * works before the island hydrates and without JavaScript (the browser enforces the confirm
 * box, the server answers 303 back to the page); once hydrated, the confirm box gives way to a
 * confirm step and the form posts JSON.
 */
export default function EmptyFerment(p: EmptyFermentProps) {
  const uid = useId();
  const enhanced = useHydrated();
  const [reason, setReason] = useState<EmptiedReason>('distilled');
  const [note, setNote] = useState('');
  const [at, setAt] = useState(p.defaultAt);
  const [step, setStep] = useState<'edit' | 'confirm'>('edit');
  const [error, setError] = useState(p.serverError ?? '');
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const [busy, setBusy] = useState(false);
  const confirmRef = useRef<HTMLHeadingElement>(null);
  const noteRef = useRef<HTMLInputElement>(null);
  const vessel = p.fermenterName ?? 'the fermenter';
  const what = p.code ?? 'this ferment';

  useEffect(() => {
    if (step === 'confirm') confirmRef.current?.focus();
  }, [step]);

  function review(e: FormEvent) {
    e.preventDefault();
    setError('');
    if (reason === 'dumped' && note.trim() === '') {
      setFieldErrors({ note: 'Why was it dumped? Say in a few words (e.g. soured, infected, spilled).' });
      noteRef.current?.focus();
      return;
    }
    setFieldErrors({});
    setStep('confirm');
  }

  async function send() {
    setBusy(true);
    setError('');
    const res = await fetch(`/api/ferments/${p.fermentId}/empty`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', accept: 'application/json' },
      body: JSON.stringify({ reason, at, ...(note.trim() ? { note: note.trim() } : {}) }),
    }).catch(() => null);
    if (res?.ok) {
      window.location.assign(`/ferments/${p.fermentId}?emptied=${p.fermentId}`);
      return;
    }
    setBusy(false);
    const data = await res?.json().catch(() => null);
    setFieldErrors(data?.error?.fields ?? {});
    setError(data?.error?.message ?? 'Could not mark it emptied. Check the connection and try again.');
    setStep('edit');
  }

  const noteLabel = reason === 'dumped' ? 'Why was it dumped?' : 'Note (optional)';
  return (
    <form method="post" action={`/api/ferments/${p.fermentId}/empty`} onSubmit={review} className="mt-3 flex flex-col gap-3" data-testid="empty-form">
      <input type="hidden" name="back" value={p.back ?? `/ferments/${p.fermentId}`} />
      <fieldset className="flex flex-wrap gap-x-4" disabled={step === 'confirm'}>
        <legend className="label">Where did the wash go?</legend>
        <label className="flex min-h-11 items-center gap-2">
          <input type="radio" name="reason" value="distilled" checked={reason === 'distilled'} onChange={() => setReason('distilled')} /> To the still
        </label>
        <label className="flex min-h-11 items-center gap-2">
          <input type="radio" name="reason" value="dumped" checked={reason === 'dumped'} onChange={() => setReason('dumped')} /> Dumped
        </label>
      </fieldset>
      <div className="flex flex-wrap items-start gap-3">
        <div className="field min-w-0 flex-1 basis-64">
          <label htmlFor={`${uid}-note`}>{enhanced ? noteLabel : 'Note (needed when dumped: why was it dumped?)'}</label>
          <input
            ref={noteRef}
            id={`${uid}-note`}
            name="note"
            className="input w-full"
            maxLength={NOTE_MAX}
            value={note}
            onChange={(e) => setNote(e.target.value)}
            readOnly={step === 'confirm'}
            aria-invalid={fieldErrors.note ? true : undefined}
            aria-describedby={fieldErrors.note ? `${uid}-note-error` : undefined}
          />
          {fieldErrors.note && (
            <p id={`${uid}-note-error`} className="field-error">
              {fieldErrors.note}
            </p>
          )}
        </div>
        <div className="field">
          <label htmlFor={`${uid}-at`}>Emptied at</label>
          <input
            id={`${uid}-at`}
            name="at"
            type="datetime-local"
            className="input"
            value={at}
            onChange={(e) => setAt(e.target.value)}
            readOnly={step === 'confirm'}
            aria-invalid={fieldErrors.at ? true : undefined}
            aria-describedby={fieldErrors.at ? `${uid}-at-error` : undefined}
          />
          {fieldErrors.at && (
            <p id={`${uid}-at-error`} className="field-error">
              {fieldErrors.at}
            </p>
          )}
        </div>
      </div>
      {!enhanced && (
        <label className="flex min-h-11 items-center gap-2">
          <input type="checkbox" name="confirm" value="yes" required /> Yes, {vessel} is empty
        </label>
      )}
      {step === 'edit' ? (
        <p>
          <button className="btn" type="submit">
            Mark emptied
          </button>
        </p>
      ) : (
        <div className="caution" role="group" aria-labelledby={`${uid}-confirm`} data-testid="empty-confirm">
          <h3 id={`${uid}-confirm`} ref={confirmRef} tabIndex={-1} className="text-base font-semibold">
            Mark {what} emptied ({reason === 'dumped' ? 'dumped' : 'to the still'})?
          </h3>
          <p className="mt-1 text-sm">This frees {vessel} for the next ferment and stops the forecast. Readings can no longer be logged on it.</p>
          <p className="mt-2 flex flex-wrap gap-2">
            <button className="btn" type="button" onClick={send} disabled={busy}>
              {busy ? 'Saving…' : `Yes, ${vessel} is empty`}
            </button>
            <button className="btn btn-quiet" type="button" onClick={() => setStep('edit')} disabled={busy}>
              Go back
            </button>
          </p>
        </div>
      )}
      <p role="status" aria-live="polite" className="field-error">
        {error}
      </p>
    </form>
  );
}
