/** Washes to book: ferments with litres no run takes yet, confirmed finished first, each draggable onto a still or booked with one button. */
import { dayAndTime, type BookableFerment, type BoardFerment } from '../../lib/board';
import { formatReadyWindow } from '../../lib/schedule';
import { formatVolume, type UnitSystem } from '../../lib/units';
import { FermentChip } from './FermentChip';

const whenText = (f: BoardFerment, timeZone: string) =>
  f.status === 'finished' && f.confirmedAt
    ? `stable since ${dayAndTime(f.confirmedAt, timeZone)}`
    : (formatReadyWindow(f, timeZone) ?? (f.status === 'stalled' || f.status === 'souring' ? f.reason || 'no window' : 'no forecast yet'));

export function WashesPanel(p: { bookable: BookableFerment[]; units: UnitSystem; timeZone: string; canBook: boolean; onBook: (fermentId: number) => void }) {
  return (
    <section className="side-card" aria-labelledby="wash-h">
      <h3 id="wash-h">
        Washes to book <span className="count">{p.bookable.length}</span>
      </h3>
      <p className="text-xs text-ink-soft">Confirmed finished first, then soonest predicted. {p.canBook ? 'Drag one onto a still, or use Book.' : ''}</p>
      <ul className="wash-list">
        {p.bookable.map(({ ferment: f, unbookedLitres }) => (
          <FermentChip
            key={f.id}
            ferment={f}
            canBook={p.canBook}
            onBook={p.onBook}
            unbookedText={formatVolume(unbookedLitres, p.units)}
            whenText={whenText(f, p.timeZone)}
          />
        ))}
      </ul>
    </section>
  );
}
