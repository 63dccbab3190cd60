/** Washes to book: ferments with litres no run takes yet, confirmed finished first, each draggable onto a still or booked with one button. */
import { dayAndTime, type BookableFerment, type BoardFerment } from '../../lib/board';
import { formatReadyWindow, readyQuantile } from '../../lib/schedule';
import { formatVolume, type UnitSystem } from '../../lib/units';
import { FermentChip } from './FermentChip';

/** The wash's state, and for one still fermenting when a run on it stops being at risk (where Book starts looking for a slot). */
export function washWhenText(f: BoardFerment, timeZone: string, threshold: number, now?: Date): string {
  if (f.status === 'finished' && f.confirmedAt) return `stable since ${dayAndTime(f.confirmedAt, timeZone, now)}`;
  if (f.status === 'stalled' || f.status === 'souring') return f.reason || 'no window';
  const window = formatReadyWindow(f, timeZone, now);
  if (!window) return 'no forecast yet';
  const safe = readyQuantile(f, threshold);
  return safe ? `${window}; not at risk from ${dayAndTime(safe, timeZone, now)}` : window;
}

export function WashesPanel(p: {
  bookable: BookableFerment[];
  units: UnitSystem;
  timeZone: string;
  /** The distillery's at-risk threshold (0–1). */
  atRiskThreshold: number;
  now: Date;
  canBook: boolean;
  onBook: (fermentId: number) => void;
}) {
  return (
    <section className="side-card" aria-labelledby="wash-h">
      <h3 id="wash-h">
        Washes to book <span className="count">{p.bookable.length}</span>
      </h3>
      <p className="text-xs text-ink-soft">
        Confirmed finished first, then soonest predicted.{' '}
        {p.canBook ? 'Drag one onto a still, or use Book: it finds the first opening that fits the run and its cleaning.' : ''}
      </p>
      <ul className="wash-list">
        {p.bookable.map(({ ferment: f, unbookedLitres }) => (
          <FermentChip
            key={f.id}
            ferment={f}
            canBook={p.canBook}
            onBook={p.onBook}
            unbookedText={formatVolume(unbookedLitres, p.units)}
            whenText={washWhenText(f, p.timeZone, p.atRiskThreshold, p.now)}
          />
        ))}
      </ul>
    </section>
  );
}
