/** The board's toolbar: previous / today / next, the range shown, the zoom switch and Book a run. */
import { ZOOMS, pageName, type Zoom } from '../../lib/board';

export function BoardToolbar(p: {
  zoom: Zoom;
  rangeLabel: string;
  canBook: boolean;
  noStills: boolean;
  onShift: (direction: -1 | 1) => void;
  onToday: () => void;
  onZoom: (zoom: Zoom) => void;
  onBook: () => void;
}) {
  return (
    <div className="board-toolbar" role="toolbar" aria-label="Board view">
      <div className="flex items-center gap-1">
        <button type="button" className="btn btn-quiet" onClick={() => p.onShift(-1)} aria-label={`Previous ${pageName(p.zoom)}`}>
          ◀
        </button>
        <button type="button" className="btn btn-quiet" onClick={p.onToday}>
          Today
        </button>
        <button type="button" className="btn btn-quiet" onClick={() => p.onShift(1)} aria-label={`Next ${pageName(p.zoom)}`}>
          ▶
        </button>
      </div>
      <h2 className="board-range" aria-live="polite">
        {p.rangeLabel}
      </h2>
      <div className="zoom-switch" role="group" aria-label="Zoom">
        {(Object.keys(ZOOMS) as Zoom[]).map((z) => (
          <button key={z} type="button" className={`zoom-btn${z === p.zoom ? ' is-on' : ''}`} aria-pressed={z === p.zoom} onClick={() => p.onZoom(z)}>
            {ZOOMS[z].label}
          </button>
        ))}
      </div>
      {p.canBook && (
        <button type="button" className="btn ml-auto" onClick={p.onBook} disabled={p.noStills}>
          Book a run
        </button>
      )}
    </div>
  );
}
