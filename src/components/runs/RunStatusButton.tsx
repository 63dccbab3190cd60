import { useState } from 'react';
import { wallClock } from '../../lib/schedule';
import { ConfirmRunAction } from './ConfirmRunAction';
import { actionExplained } from './run-action';

export interface RunStatusButtonProps {
  runId: number;
  version: number;
  status: 'planned' | 'confirmed' | 'running' | 'done' | 'cancelled';
  label: string;
  /** The distillery's time zone, for "recorded as 14:05". */
  timeZone: string;
  /** The booking in words ("08:00 to 12:00"), kept beside the actual times. */
  booked: string;
  /** Where to go after a finish (the run's record form), for those who may record; without it the page reloads with the new status. */
  recordHref?: string;
}

/**
 * Start or finish a run from the floor. A confirmation says what will happen first; when the
 * server asks (a start well before the booking, a wash not confirmed stable, a finish minutes after
 * the start) it shows the questions and sends again only once they are accepted. After a finish it
 * opens the record form when given, else reloads the page with the server's answer.
 */
export default function RunStatusButton(p: RunStatusButtonProps) {
  const [open, setOpen] = useState(false);
  const action = p.status === 'planned' || p.status === 'confirmed' ? 'start' : p.status === 'running' ? 'finish' : null;
  if (!action) return null;
  return (
    <span className="inline-flex flex-col gap-1">
      <button type="button" className={action === 'start' ? 'btn' : 'btn btn-quiet'} onClick={() => setOpen(true)}>
        {action === 'start' ? `Start ${p.label}` : `Finish ${p.label}`}
      </button>
      {open && (
        <ConfirmRunAction
          runId={p.runId}
          version={p.version}
          action={action}
          label={p.label}
          explanation={actionExplained(action, p.label, wallClock(new Date(), p.timeZone).hm, p.booked)}
          onClose={() => setOpen(false)}
          onDone={() => {
            if (action === 'finish' && p.recordHref) window.location.assign(p.recordHref);
            else window.location.reload();
          }}
        />
      )}
    </span>
  );
}
