/** Runs at risk: booked runs whose wash may not be there by their start (the one at-risk test), each with its earliest free slots one step away. */
import { dayAndTime, RUN_TYPE_LABELS, type BoardFerment, type BoardRun, type MoveTarget, type RunAtRisk } from '../../lib/board';
import { formatMoment, formatReadyWindow } from '../../lib/schedule';
import type { SlotSuggestions } from './hooks/useSlotSuggestions';

type Reason = RunAtRisk['reasons'][number];

/** One line per wash, in the product's words: "booked before its wash is likely ready" unless the window moved past a run booked safely. */
export function riskWords(reason: Reason, f: BoardFerment | undefined, timeZone: string, threshold: number, now?: Date): string {
  const window = f ? formatReadyWindow(f, timeZone, now) : null;
  const tail = window ? ` (${window})` : '';
  switch (reason.why) {
    case 'stalled':
      return `Wash ${reason.code} has stalled`;
    case 'souring':
      return `Wash ${reason.code} may be souring`;
    case 'late':
      return `Wash late: the ready window of ${reason.code} has moved past this run${tail}`;
    case 'early':
      return `Wash ${reason.code}: booked before its wash is likely ready, very likely still fermenting then${tail}`;
    default:
      return `Wash ${reason.code}: booked before its wash is likely ready, under ${Math.round(threshold * 100)} % likely confirmed by the start${tail}`;
  }
}

export function RisksPanel(p: {
  atRisk: RunAtRisk[];
  suggestions: Record<number, SlotSuggestions>;
  fermentById: ReadonlyMap<number, BoardFerment>;
  stillName: (id: number) => string;
  stableDays: number;
  /** The distillery's at-risk threshold (0–1). */
  atRiskThreshold: number;
  now: Date;
  timeZone: string;
  canMove: boolean;
  onOpen: (runId: number) => void;
  onFindSlots: (runId: number) => void;
  onMoveHere: (run: BoardRun, slot: MoveTarget) => void;
}) {
  const tz = p.timeZone;
  const pct = Math.round(p.atRiskThreshold * 100);
  return (
    <section className="side-card" aria-labelledby="risk-h">
      <h3 id="risk-h">
        Runs at risk <span className="count">{p.atRisk.length}</span>
      </h3>
      {p.atRisk.length === 0 && (
        <p className="text-sm text-ink-soft">No booked run is at risk: every wash is at least {pct} % likely to be confirmed by its run's start.</p>
      )}
      <ul className="risk-list">
        {p.atRisk.map(({ run, reasons }) => {
          const sug = p.suggestions[run.id];
          return (
            <li key={run.id} className="risk-item" data-testid={`risk-${run.id}`}>
              <button type="button" className="risk-title" onClick={() => p.onOpen(run.id)}>
                {RUN_TYPE_LABELS[run.type]} · {p.stillName(run.stillId)} · {dayAndTime(run.startsAt, tz, p.now)}
              </button>
              <p className="text-sm">
                {reasons.map((x) => (
                  <span key={x.fermentId} className="block" data-why={x.why}>
                    {riskWords(x, p.fermentById.get(x.fermentId), tz, p.atRiskThreshold, p.now)}
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
                      Not before {dayAndTime(new Date(sug.notBefore), tz, p.now)}
                      {reasons.some((x) => x.why === 'stalled' || x.why === 'souring')
                        ? ` (a fresh ${p.stableDays}-day stable period)`
                        : ` (when its wash is ${pct} % likely to be confirmed)`}
                      ; inside the still's hours, with time to clean before closing.
                    </p>
                  )}
                  {sug.slots.length === 0 && <p className="text-sm">No free slot in the next four weeks on a still that takes this charge.</p>}
                  <ul className="slot-list">
                    {sug.slots.map((s) => (
                      <li key={`${s.stillId}-${s.startsAt.getTime()}`}>
                        <span>
                          {p.stillName(s.stillId)}, {formatMoment(s.startsAt, tz, { now: p.now, dated: true })}
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
