/**
 * The scrolling timeline: the axis, a row per still with its run blocks, the now line, the drop
 * preview while dragging, and the vessel occupancy band underneath.
 */
import { useEffect, useMemo, useRef, type ReactNode } from 'react';
import {
  canvasWidth,
  closedSpans,
  initialScrollLeft,
  readyWindowSpans,
  runBlockLayout,
  runsByStill,
  xOf,
  HEADER_HEIGHT,
  LABEL_WIDTH,
  ROW_HEIGHT,
} from '../../lib/board';
import type { Warning } from '../../lib/schedule';
import type { UnitSystem } from '../../lib/units';
import { BoardAxis } from './BoardAxis';
import { DropGhost } from './DropGhost';
import type { BoardData } from './hooks/useBoardData';
import type { RunEditing } from './hooks/useRunEditing';
import type { DragPreview } from './hooks/useRunDrag';
import { RunBlock } from './RunBlock';
import { NO_SPANS, NO_WINDOWS, StillRow } from './StillRow';
import { VesselBand } from './VesselBand';

const NO_WARNINGS: Warning[] = [];

export function BoardTimeline(p: {
  data: BoardData;
  editing: Pick<RunEditing, 'openRun' | 'onResize' | 'onResizeKey' | 'onEmptyClick'>;
  preview: DragPreview | null;
  today: string;
  units: UnitSystem;
  canBook: boolean;
  canMove: boolean;
}) {
  const { board, zoom, anchor, tz, spec, win, stillIds, stillById, fermentById, personById, warnings, names } = p.data;
  const { openRun, onResize, onResizeKey, onEmptyClick } = p.editing;
  const scrollRef = useRef<HTMLDivElement>(null);
  const width = canvasWidth(win, spec.pxPerHour);
  const compact = zoom === 'six-weeks';

  // Scroll to the working morning (or today) on first paint and when the page changes.
  useEffect(() => {
    if (scrollRef.current) scrollRef.current.scrollLeft = initialScrollLeft(win, board.now, spec.pxPerHour);
    // Only a new page (zoom or anchor) scrolls; the 30 s refresh of board.now must not move the view.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [zoom, anchor]);

  const runs = useMemo(() => runsByStill(board.stills, board.runs, win, board.now), [board.runs, board.stills, win, board.now]);
  const closed = useMemo(() => closedSpans(board.stills, win, tz, spec.pxPerHour), [board.stills, win, tz, spec.pxPerHour]);
  const windows = useMemo(() => readyWindowSpans(runs, fermentById, win.start, spec.pxPerHour), [runs, fermentById, win.start, spec.pxPerHour]);

  // The run blocks, built once per board / window / warnings change: a drag's preview re-renders
  // the timeline on every slot it crosses, and must not rebuild (or re-format) every block.
  const blocks = useMemo(() => {
    const context = {
      stillById,
      fermentById,
      personById,
      windowStart: win.start,
      pxPerHour: spec.pxPerHour,
      timeZone: tz,
      zoom,
      units: p.units,
      now: board.now,
    };
    const out = new Map<number, ReactNode[]>();
    for (const [stillId, list] of runs) {
      out.set(
        stillId,
        list.map((r) => (
          <RunBlock
            key={r.id}
            run={r}
            {...runBlockLayout(r, context)}
            rowHeight={ROW_HEIGHT}
            warnings={warnings.get(r.id) ?? NO_WARNINGS}
            canMove={p.canMove}
            compact={compact}
            onOpen={openRun}
            onResize={onResize}
            onResizeKey={onResizeKey}
          />
        )),
      );
    }
    return out;
  }, [
    runs,
    stillById,
    fermentById,
    personById,
    win.start,
    spec.pxPerHour,
    tz,
    zoom,
    p.units,
    warnings,
    p.canMove,
    compact,
    openRun,
    onResize,
    onResizeKey,
    board.now,
  ]);

  const previewRow = p.preview ? stillIds.indexOf(p.preview.stillId) : -1;

  return (
    <div
      className="board-scroll"
      ref={scrollRef}
      data-testid="board-scroll"
      tabIndex={0}
      role="region"
      aria-label="Still board timeline (scroll sideways with the arrow keys)"
    >
      <div className="board-canvas" style={{ width: LABEL_WIDTH + width }}>
        <BoardAxis win={win} zoom={zoom} today={p.today} timeZone={tz} pxPerHour={spec.pxPerHour} width={width} />
        {board.stills.length === 0 && <p className="p-4">No stills yet. A manager adds them under Stills &amp; fermenters.</p>}
        {board.stills.map((s) => (
          <StillRow
            key={s.id}
            still={s}
            units={p.units}
            width={width}
            closed={closed.get(s.id) ?? NO_SPANS}
            windows={windows.get(s.id) ?? NO_WINDOWS}
            onEmptyClick={onEmptyClick}
            canBook={p.canBook}
          >
            {blocks.get(s.id)}
          </StillRow>
        ))}
        {board.now >= win.start && board.now < win.end && (
          <div
            className="now-line"
            style={{ left: LABEL_WIDTH + xOf(board.now, win.start, spec.pxPerHour), top: HEADER_HEIGHT, height: board.stills.length * ROW_HEIGHT }}
            aria-hidden="true"
          />
        )}
        {p.preview && previewRow >= 0 && (
          <DropGhost
            preview={p.preview}
            row={previewRow}
            windowStart={win.start}
            pxPerHour={spec.pxPerHour}
            stillName={names.still(p.preview.stillId)}
            timeZone={tz}
          />
        )}
        <VesselBand board={board} win={win} pxPerHour={spec.pxPerHour} width={width} />
      </div>
    </div>
  );
}
