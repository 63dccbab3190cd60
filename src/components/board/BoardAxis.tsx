/** The time axis over the still rows: one cell per day (weekends and today marked) with its hour ticks. */
import { axisDayLabel, axisTicks, xOf, HEADER_HEIGHT, LABEL_WIDTH, type BoardWindow, type Zoom } from '../../lib/board';

export function BoardAxis(p: { win: BoardWindow; zoom: Zoom; today: string; timeZone: string; pxPerHour: number; width: number }) {
  return (
    <div className="board-head" style={{ height: HEADER_HEIGHT }}>
      <div className="corner" style={{ width: LABEL_WIDTH }}>
        Stills
      </div>
      <div className="axis" style={{ width: p.width }}>
        {p.win.days.map((d) => (
          <div
            key={d.ymd}
            className={`axis-day${d.weekday === 0 || d.weekday === 6 ? ' is-weekend' : ''}${d.ymd === p.today ? ' is-today' : ''}`}
            style={{ left: xOf(d.start, p.win.start, p.pxPerHour), width: xOf(d.end, d.start, p.pxPerHour) }}
          >
            <span className="axis-day-label">{axisDayLabel(d, p.zoom)}</span>
            {axisTicks(d, p.zoom, p.timeZone, p.pxPerHour).map((m) => (
              <span key={m.label} className="axis-tick" style={{ left: m.x }}>
                {m.label}
              </span>
            ))}
          </div>
        ))}
      </div>
    </div>
  );
}
