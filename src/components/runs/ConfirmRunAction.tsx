import { useEffect, useRef, useState } from 'react';
import { sendRunAction, type RunAction } from './run-action';

export interface ConfirmRunActionProps {
  runId: number;
  version: number;
  action: RunAction;
  /** "stripping run" */
  label: string;
  /** What will happen, said before anything is sent. */
  explanation: string;
  onDone: (run: { id: number; version: number; status: string }) => void;
  onClose: () => void;
}

/**
 * The confirmation before a run is started or finished: says what will happen, sends it, and when
 * the server asks (a start well before the booking, a wash not confirmed stable, a finish minutes
 * after the start) shows its questions in words and sends again only when the person accepts them.
 */
export function ConfirmRunAction(p: ConfirmRunActionProps) {
  const ref = useRef<HTMLDialogElement>(null);
  const [warnings, setWarnings] = useState<string[] | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const verb = p.action === 'start' ? 'Start' : 'Finish';

  useEffect(() => {
    const d = ref.current;
    if (d && !d.open) d.showModal();
  }, []);

  async function go() {
    setBusy(true);
    setError(null);
    const answer = await sendRunAction(p.runId, p.action, p.version, warnings !== null);
    setBusy(false);
    if (answer.kind === 'done') p.onDone(answer.run);
    else if (answer.kind === 'confirm') setWarnings(answer.warnings);
    else setError(answer.message);
  }

  const titleId = `confirm-run-${p.runId}-${p.action}`;
  return (
    <dialog
      ref={ref}
      className="m-auto max-h-[92vh] w-[min(34rem,94vw)] overflow-auto rounded-lg border border-line bg-panel p-4 text-ink backdrop:bg-slate-deep/45"
      aria-labelledby={titleId}
      onCancel={(e) => {
        e.preventDefault();
        p.onClose();
      }}
    >
      <div className="flex flex-col gap-3">
        <h2 id={titleId}>
          {verb} the {p.label}?
        </h2>
        <p>{p.explanation}</p>
        {warnings && (
          <div role="alert" className="flex flex-col gap-1">
            <p className="font-semibold">Please read before you {p.action}:</p>
            <ul className="flex flex-col gap-1" aria-label="What to check first">
              {warnings.map((w) => (
                <li key={w} className="rounded bg-barley-soft px-2 py-1 text-sm text-[#5e3d00]">
                  {w}
                </li>
              ))}
            </ul>
          </div>
        )}
        {error && (
          <p className="field-error" role="alert">
            {error}
          </p>
        )}
        <div className="flex flex-wrap gap-2">
          <button type="button" className="btn" disabled={busy} onClick={go}>
            {busy ? 'Saving…' : warnings ? `${verb} anyway` : `${verb} now`}
          </button>
          <button type="button" className="btn btn-quiet" disabled={busy} onClick={p.onClose}>
            Back
          </button>
        </div>
      </div>
    </dialog>
  );
}
