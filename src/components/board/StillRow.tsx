/**
 * One still's row: its name and size, and its lane, a drop target holding its closed hours, the
 * ready windows of its washes and its run blocks. A click on the empty lane books a run there.
 */
import { memo, type ReactNode } from 'react';
import { useDroppable } from '@dnd-kit/core';
import { LABEL_WIDTH, ROW_HEIGHT, type BoardStill, type ReadyWindowSpan, type Span } from '../../lib/board';
import { formatVolume, type UnitSystem } from '../../lib/units';

export const NO_SPANS: Span[] = [];
export const NO_WINDOWS: ReadyWindowSpan[] = [];

function StillLane(props: {
  still: BoardStill;
  width: number;
  closed: Span[];
  windows: ReadyWindowSpan[];
  children: ReactNode;
  onEmptyClick: (stillId: number, x: number) => void;
  canBook: boolean;
}) {
  const { setNodeRef, isOver } = useDroppable({ id: `still:${props.still.id}`, data: { stillId: props.still.id } });
  return (
    // A click on an empty stretch of lane is a mouse shortcut; keyboard and screen-reader users book
    // through the "Book a run" button and the run dialog, which do the same.
    // eslint-disable-next-line jsx-a11y/click-events-have-key-events, jsx-a11y/no-static-element-interactions
    <div
      className={`lane${isOver ? ' is-over' : ''}`}
      style={{ width: props.width, height: ROW_HEIGHT }}
      ref={setNodeRef}
      data-testid={`lane-${props.still.id}`}
      onClick={(e) => {
        if (!props.canBook || e.target !== e.currentTarget) return;
        const rect = e.currentTarget.getBoundingClientRect();
        props.onEmptyClick(props.still.id, e.clientX - rect.left);
      }}
    >
      {props.closed.map((c, i) => (
        <div key={i} className="lane-closed" style={{ left: c.x, width: c.w }} aria-hidden="true" />
      ))}
      {props.windows.map((w) => (
        <div key={w.key} className="ready-window" style={{ left: w.x, width: Math.max(3, w.w) }} aria-hidden="true" title={`Ready window of ${w.code}`}>
          {w.mid !== null && <span className="ready-mid" style={{ left: w.mid }} />}
          <span className="ready-label">{w.code}</span>
        </div>
      ))}
      {props.children}
    </div>
  );
}

/** Memoised: a drag's preview re-renders the board on every slot it crosses; the lanes stay put. */
const MemoLane = memo(StillLane);

export function StillRow(props: Parameters<typeof StillLane>[0] & { units: UnitSystem }) {
  const { still: s, units, ...lane } = props;
  return (
    <div className="board-row">
      <div className="row-label" style={{ width: LABEL_WIDTH, height: ROW_HEIGHT }}>
        <span className="font-semibold">{s.name}</span>
        <span className="text-xs text-ink-soft">
          {s.kind} · {formatVolume(s.capacityLitres, units)}
        </span>
      </div>
      <MemoLane still={s} {...lane} />
    </div>
  );
}
