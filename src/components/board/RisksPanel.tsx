/** Runs at risk: booked runs waiting on a late, stalled or souring wash, each with its earliest free slots one step away. */
import { dayAndTime, shortDate, RUN_TYPE_LABELS, type BoardFerment, type BoardRun, type MoveTarget, type RunAtRisk } from '../../lib/board';
import { formatReadyWindow, wallClock } from '../../lib/schedule';
import type { SlotSuggestions } from './hooks/useSlotSuggestions';

const why = (reason: RunAtRisk['reasons'][number], f: BoardFerment | undefined, timeZone: string) =>
  reason.why === 'stalled' ? 'has stalled' : reason.why === 'souring' ? 'may be souring' : `is late (${f ? formatReadyWindow(f, timeZone) : ''})`;

export function RisksPanel(p: {
  atRisk: RunAtRisk[];
  suggestions: Record<number, SlotSuggestions>;
  fermentById: ReadonlyMap<number, BoardFerment>;
  stillName: (id: number) => string;
  stableDays: number;
  timeZone: string;
  canMove: boolean;
  onOpen: (runId: number) => void;
  onFindSlots: (runId: number) => void;
  onMoveHere: (run: BoardRun, slot: MoveTarget) => void;
}) {
  const tz = p.timeZone;
  return (
    <section className="side-card" aria-labelledby="risk-h">
      <h3 id="risk-h">
        Runs at risk <span className="count">{p.atRisk.length}</span>
      </h3>
      {p.atRisk.length === 0 && <p className="text-sm text-ink-soft">No booked run is waiting on a late, stalled or souring wash.</p>}
      <ul className="risk-list">
        {p.atRisk.map(({ run, reasons }) => {
          const sug = p.suggestions[run.id];
          return (
            <li key={run.id} className="risk-item" data-testid={`risk-${run.id}`}>
              <button type="button" className="risk-title" onClick={() => p.onOpen(run.id)}>
                {RUN_TYPE_LABELS[run.type]} · {p.stillName(run.stillId)} · {dayAndTime(run.startsAt, tz)}
              </button>
              <p className="text-sm">
                {reasons.map((x) => (
                  <span key={x.fermentId} className="block">
                    Wash {x.code} {why(x, p.fermentById.get(x.fermentId), tz)}
                  </span>
                ))}
              </p>
              {p.canMove && !sug && (
                <button type="button" className="btn btn-quiet" onClick={() => p.onFindSlots(run.id)}>
                  Find earliest slots
                </button>
              )}
              {sug?.loading && <p className="text-sm">Looking for slots…</p>}
              {sug?.error && <p className="field-error">{sug.error}</p>}
              {sug && !sug.loading && !sug.error && (
                <div>
                  {sug.notBefore && (
                    <p className="text-xs text-ink-soft">
                      Not before {dayAndTime(new Date(sug.notBefore), tz)}
                      {reasons.some((x) => x.why !== 'late') ? ` (a fresh ${p.stableDays}-day stable period)` : ' (after the ready window)'}
                    </p>
                  )}
                  {sug.slots.length === 0 && <p className="text-sm">No free slot in the next four weeks on a still that takes this charge.</p>}
                  <ul className="slot-list">
                    {sug.slots.map((s) => (
                      <li key={`${s.stillId}-${s.startsAt.getTime()}`}>
                        <span>
                          {p.stillName(s.stillId)}, {dayAndTime(s.startsAt, tz)}{' '}
                          <span className="text-ink-soft">({shortDate(wallClock(s.startsAt, tz).ymd, wallClock(s.startsAt, tz).weekday)})</span>
                        </span>
                        <button type="button" className="btn" onClick={() => p.onMoveHere(run, { stillId: s.stillId, startsAt: s.startsAt, endsAt: s.endsAt })}>
                          Move here
                        </button>
                      </li>
                    ))}
                  </ul>
                </div>
              )}
            </li>
          );
        })}
      </ul>
    </section>
  );
}
