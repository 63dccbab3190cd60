/** The fermenters under the stills: each wash from pitching through its ready window (hatched) to the run that empties it. */
import { useMemo } from 'react';
import { vesselBarLayout, vesselBars, LABEL_WIDTH, VESSEL_ROW_HEIGHT, type Board, type BoardWindow } from '../../lib/board';

export function VesselBand(p: { board: Board; win: BoardWindow; pxPerHour: number; width: number }) {
  const { board, win, pxPerHour, width } = p;
  const bars = useMemo(() => vesselBars(board.fermenters, board.ferments, board.runs), [board]);
  return (
    <>
      <div className="band-title" style={{ width: LABEL_WIDTH + width }}>
        <span className="band-sticky">
          Vessel occupancy <span className="band-hint">fermenting, ready window (hatched), then waiting until the run that empties it</span>
        </span>
      </div>
      {board.fermenters.map((v) => (
        <div className="board-row" key={v.id}>
          <div className="row-label vessel-label" style={{ width: LABEL_WIDTH, height: VESSEL_ROW_HEIGHT }}>
            <span className="font-semibold">{v.name}</span>
          </div>
          <div className="vessel-lane" style={{ width, height: VESSEL_ROW_HEIGHT }}>
            {(bars.get(v.id) ?? []).map((b) => {
              const bar = vesselBarLayout(b, win, pxPerHour, board.timeZone);
              if (!bar) return null;
              return (
                <div
                  key={b.fermentId}
                  className={`vessel-bar vs-${b.status}${b.freeAt ? '' : ' is-open'}`}
                  style={{ left: bar.x, width: bar.width }}
                  title={bar.label}
                >
                  {bar.window && <span className="vessel-window" style={{ left: bar.window.x, width: bar.window.w }} />}
                  <span className="vessel-code">{b.code}</span>
                  <span className="sr-only">{bar.label}</span>
                </div>
              );
            })}
          </div>
        </div>
      ))}
    </>
  );
}
