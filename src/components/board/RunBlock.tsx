import { memo, useRef, useState } from 'react';
import { useDraggable } from '@dnd-kit/core';
import type { BoardRun, WindowPlacement } from '../../lib/board';
import { RUN_STATUS_LABELS, RUN_TYPE_ABBREVIATIONS, RUN_TYPE_LABELS } from '../../lib/vocabulary';
import type { Warning } from '../../lib/schedule';
import { WarningBadges } from './WarningBadges';

export interface RunBlockProps {
  run: BoardRun;
  x: number;
  width: number;
  cleaningWidth: number;
  /** The booking, drawn faintly beside a started or done run (row coordinates); null before a start. */
  booked: { x: number; w: number } | null;
  rowHeight: number;
  fermentCodes: string;
  chargeText: string;
  operatorText: string;
  timeText: string;
  /** "started 40 min late, finished 1 h 5 min early"; empty before a start. */
  timingText: string;
  warnings: readonly Warning[];
  placement: WindowPlacement;
  canMove: boolean;
  compact: boolean;
  onOpen: (runId: number) => void;
  onResize: (runId: number, deltaX: number) => void;
  onResizeKey: (runId: number, steps: number) => void;
}

const TYPE_CLASS: Record<BoardRun['type'], string> = {
  stripping: 'run-stripping',
  spirit: 'run-spirit',
  redistillation: 'run-redistillation',
  cleaning: 'run-cleaning',
  maintenance: 'run-maintenance',
};

const PLACEMENT_TEXT: Record<WindowPlacement, string> = {
  before: 'starts before its wash is ready',
  inside: 'starts inside its wash’s ready window',
  after: 'starts after its wash is ready',
  unknown: '',
};

/**
 * What a block shows. Kept apart and memoised: dnd-kit re-renders every draggable whenever the
 * drop target under the pointer changes, and that must not redraw 500 blocks' contents.
 */
const RunBlockBody = memo(function RunBlockBody(p: {
  type: BoardRun['type'];
  compact: boolean;
  width: number;
  narrow: boolean;
  fermentCodes: string;
  chargeText: string;
  operatorText: string;
  warnings: readonly Warning[];
  cleaningWidth: number;
}) {
  return (
    <>
      <div className="run-body" style={{ width: p.width }}>
        <div className="run-line1">
          <span className="run-type">
            {p.compact ? RUN_TYPE_ABBREVIATIONS[p.type].slice(0, 1) : p.narrow ? RUN_TYPE_ABBREVIATIONS[p.type] : RUN_TYPE_LABELS[p.type]}
          </span>
          {!p.compact && p.fermentCodes && <span className="run-codes">{p.fermentCodes}</span>}
        </div>
        {!p.compact && (
          <div className="run-line2">
            {p.chargeText && <span>{p.chargeText}</span>}
            {p.operatorText && <span className="run-op">{p.operatorText}</span>}
          </div>
        )}
        <WarningBadges warnings={p.warnings} compact={p.compact} />
      </div>
      {p.cleaningWidth > 0 && <div className="run-cleaning-tail" style={{ width: p.cleaningWidth }} aria-hidden="true" />}
    </>
  );
});

function RunBlockInner(p: RunBlockProps) {
  const movable = p.canMove && (p.run.status === 'planned' || p.run.status === 'confirmed');
  const { attributes, listeners, setNodeRef, transform, isDragging } = useDraggable({
    id: `run:${p.run.id}`,
    data: { kind: 'run', runId: p.run.id },
    disabled: !movable,
  });
  const [resizeDx, setResizeDx] = useState(0);
  const startX = useRef<number | null>(null);

  const label = `${RUN_TYPE_LABELS[p.run.type]}, ${RUN_STATUS_LABELS[p.run.status].toLowerCase()}, ${p.timeText}${p.timingText ? `, ${p.timingText}` : ''}${p.fermentCodes ? `, wash ${p.fermentCodes}` : ''}${p.chargeText ? `, ${p.chargeText}` : ''}${p.operatorText ? `, ${p.operatorText}` : ''}${p.placement !== 'unknown' ? `, ${PLACEMENT_TEXT[p.placement]}` : ''}${p.warnings.length ? `, ${p.warnings.length} warning${p.warnings.length > 1 ? 's' : ''}` : ''}`;
  const width = Math.max(6, p.width + resizeDx);
  const style: React.CSSProperties = {
    left: p.x,
    width: width + p.cleaningWidth,
    height: p.rowHeight - 10,
    transform: transform ? `translate3d(${transform.x}px, ${transform.y}px, 0)` : undefined,
    zIndex: isDragging ? 30 : undefined,
  };

  return (
    <>
      {p.booked && (
        <div
          className="run-booking"
          data-testid={`run-booking-${p.run.id}`}
          style={{
            position: 'absolute',
            top: 4,
            left: p.booked.x,
            width: Math.max(4, p.booked.w),
            height: p.rowHeight - 10,
            border: '2px dashed var(--color-haze)',
            borderRadius: '0.45rem',
            background: 'rgba(107, 122, 118, 0.08)',
            pointerEvents: 'none',
            zIndex: 1,
          }}
          aria-hidden="true"
        />
      )}
      {/* dnd-kit's spread attributes give this block role="button", tabIndex and its keyboard handling. */}
      {/* eslint-disable-next-line jsx-a11y/no-static-element-interactions */}
      <div
        ref={setNodeRef}
        className={`run-block ${TYPE_CLASS[p.run.type]} status-${p.run.status} place-${p.placement}${isDragging ? ' is-dragging' : ''}${movable ? '' : ' is-fixed'}`}
        style={style}
        data-run-id={p.run.id}
        data-testid={`run-${p.run.id}`}
        {...attributes}
        {...listeners}
        aria-roledescription={movable ? 'movable run' : 'run'}
        // dnd-kit marks a block it may not drag as disabled, but every block still opens its run (and a done run's record) with Enter or a click.
        aria-disabled={undefined}
        aria-label={label}
        title={label}
        onKeyDown={(e) => {
          if (e.key === 'Enter') {
            e.preventDefault();
            p.onOpen(p.run.id);
            return;
          }
          listeners?.onKeyDown?.(e);
        }}
        onClick={(e) => {
          e.stopPropagation();
          p.onOpen(p.run.id);
        }}
      >
        <RunBlockBody
          type={p.run.type}
          compact={p.compact}
          width={width}
          narrow={p.width < 90}
          fermentCodes={p.fermentCodes}
          chargeText={p.chargeText}
          operatorText={p.operatorText}
          warnings={p.warnings}
          cleaningWidth={p.cleaningWidth}
        />
      </div>
      {movable && !p.compact && !isDragging && (
        <button
          type="button"
          className="run-resize"
          style={{ left: p.x + width - 10, top: 4, height: p.rowHeight - 10 }}
          aria-label={`Change the length of this ${RUN_TYPE_LABELS[p.run.type].toLowerCase()}: left and right arrows shorten or lengthen it by a slot`}
          onPointerDown={(e) => {
            e.stopPropagation();
            e.preventDefault();
            startX.current = e.clientX;
            (e.target as HTMLElement).setPointerCapture(e.pointerId);
          }}
          onPointerMove={(e) => {
            if (startX.current !== null) setResizeDx(e.clientX - startX.current);
          }}
          onPointerUp={(e) => {
            if (startX.current === null) return;
            const dx = e.clientX - startX.current;
            startX.current = null;
            setResizeDx(0);
            if (Math.abs(dx) > 2) p.onResize(p.run.id, dx);
          }}
          onPointerCancel={() => {
            startX.current = null;
            setResizeDx(0);
          }}
          onClick={(e) => e.stopPropagation()}
          onKeyDown={(e) => {
            e.stopPropagation();
            if (e.key === 'ArrowRight') {
              e.preventDefault();
              p.onResizeKey(p.run.id, 1);
            }
            if (e.key === 'ArrowLeft') {
              e.preventDefault();
              p.onResizeKey(p.run.id, -1);
            }
          }}
        />
      )}
    </>
  );
}

export const RunBlock = memo(RunBlockInner);
