/**
 * The still-run board: stills down the side, the distillery's time across, runs as blocks
 * you drag (mouse, touch or keyboard) to another time or still, ferments' ready windows on
 * the rows, washes to book at the side, runs at risk with one-step moves, and the
 * fermenters' occupancy underneath. Server state is the truth: every drop is saved at once
 * and the board reloads after each change and every 30 seconds.
 *
 * This file composes the parts: data (hooks/useBoardData), changes and the run dialog
 * (hooks/useRunEditing), dragging (hooks/useRunDrag), the timeline and the side panels; the
 * geometry, keyboard steps and collision detection are pure modules in lib/board.
 */
import { useMemo, useRef, useState } from 'react';
import { DndContext } from '@dnd-kit/core';
import { bookableFerments, rangeLabel, runsAtRisk, shiftAnchor, type BoardPayload, type Zoom } from '../../lib/board';
import type { UnitSystem } from '../../lib/units';
import { BoardLegend } from './BoardLegend';
import { BoardTimeline } from './BoardTimeline';
import { BoardToolbar } from './BoardToolbar';
import { useBoardData } from './hooks/useBoardData';
import { useRunDrag } from './hooks/useRunDrag';
import { useRunEditing, type Notice } from './hooks/useRunEditing';
import { useSlotSuggestions } from './hooks/useSlotSuggestions';
import { RisksPanel } from './RisksPanel';
import { RunDialog } from './RunDialog';
import type { NumberFormat } from '../../lib/vocabulary';
import { WashesPanel } from './WashesPanel';
import './board.css';

export interface BoardIslandProps {
  initial: BoardPayload;
  zoom: Zoom;
  anchor: string;
  today: string;
  units: UnitSystem;
  /** How the distillery types numbers (the run dialog's charge, litres and minutes). */
  numberFormat?: NumberFormat;
  canBook: boolean;
  canMove: boolean;
  canOperate: boolean;
}

export default function BoardIsland(props: BoardIslandProps) {
  const [notice, setNotice] = useState<Notice>(null);
  const [live, setLive] = useState('');
  const dragging = useRef(false);
  const data = useBoardData({
    initial: props.initial,
    zoom: props.zoom,
    anchor: props.anchor,
    paused: dragging,
    onError: (text) => setNotice({ tone: 'error', text }),
  });
  const editing = useRunEditing(data, { setNotice, setLive });
  const drag = useRunDrag(data, editing, { dragging, setNotice });
  const { suggestions, findSlots, moveHere } = useSlotSuggestions(editing.saveMove);
  const { board, zoom, anchor, tz } = data;
  const atRisk = useMemo(() => runsAtRisk(board.runs, board.ferments, board.now, board.atRiskThreshold), [board]);
  const bookable = useMemo(() => bookableFerments(board.ferments, board.runs), [board]);

  return (
    <div className="board-root">
      <BoardToolbar
        zoom={zoom}
        rangeLabel={rangeLabel(data.win)}
        canBook={props.canBook}
        noStills={board.stills.length === 0}
        onShift={(direction) => data.setAnchor(shiftAnchor(anchor, zoom, direction))}
        onToday={() => data.setAnchor(props.today)}
        onZoom={data.setZoom}
        onBook={editing.bookRun}
      />
      <p className="board-tz">
        Times are {tz}.{' '}
        {props.canMove
          ? 'Drag a run, or focus it and press space, then the arrow keys (shift + arrow moves a day), then space to drop.'
          : 'You can read the board; planners and distillers move runs.'}
      </p>
      {notice && (
        <div
          className={`board-notice ${notice.tone === 'error' ? 'is-error' : ''}`}
          role={notice.tone === 'error' ? 'alert' : 'status'}
          data-testid="board-notice"
        >
          <span>{notice.text}</span>
          <button type="button" className="btn-quiet notice-close" onClick={() => setNotice(null)} aria-label="Dismiss">
            ✕
          </button>
        </div>
      )}
      <div aria-live="assertive" className="sr-only" data-testid="board-live">
        {live}
      </div>

      <div className="board-layout">
        {/* A fixed id: React 19 renders the island on the server, and dnd-kit's generated ids must match on hydration. */}
        <DndContext id="plateau-board" {...drag.contextProps}>
          <BoardTimeline
            data={data}
            editing={editing}
            preview={drag.preview}
            today={props.today}
            units={props.units}
            canBook={props.canBook}
            canMove={props.canMove}
          />
          <aside className="board-side" aria-label="Planning">
            <RisksPanel
              atRisk={atRisk}
              suggestions={suggestions}
              fermentById={data.fermentById}
              stillName={data.names.still}
              stableDays={board.stableDays}
              atRiskThreshold={board.atRiskThreshold}
              now={board.now}
              timeZone={tz}
              canMove={props.canMove}
              onOpen={editing.openRun}
              onFindSlots={findSlots}
              onMoveHere={moveHere}
            />
            <WashesPanel
              bookable={bookable}
              units={props.units}
              timeZone={tz}
              atRiskThreshold={board.atRiskThreshold}
              now={board.now}
              canBook={props.canBook}
              onBook={editing.bookFerment}
            />
            <BoardLegend />
          </aside>
        </DndContext>
      </div>
      {editing.dialog && (
        <RunDialog
          board={board}
          draft={editing.dialog}
          units={props.units}
          numberFormat={props.numberFormat}
          canBook={props.canBook}
          canOperate={props.canOperate}
          busy={editing.busy}
          error={editing.dialogError}
          onClose={editing.closeDialog}
          onSave={editing.onSave}
          onAction={editing.onAction}
        />
      )}
    </div>
  );
}
