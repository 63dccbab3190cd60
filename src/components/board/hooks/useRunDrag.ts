/**
 * Dragging on the board with dnd-kit: a run to another time or still, or a wash from the side
 * onto a still to book it. Pointer, touch and keyboard sensors; a preview of where it lands with
 * the warnings it would raise there; a run saved on drop (a wash opens the booking dialog);
 * nothing changed when a drag is cancelled; announcements in the product's words.
 */
import { useMemo, useRef, useState, type RefObject } from 'react';
import {
  KeyboardSensor,
  PointerSensor,
  TouchSensor,
  pointerWithin,
  rectIntersection,
  useSensor,
  useSensors,
  type Announcements,
  type CollisionDetection,
  type DragEndEvent,
  type DragMoveEvent,
  type DragStartEvent,
} from '@dnd-kit/core';
import {
  boardKeyboardCoordinates,
  cancelledDragMessage,
  dayAndTime,
  dayWidth,
  fermentDraftRun,
  firstHit,
  moveTarget,
  movedMessage,
  overMessage,
  pickedUpMessage,
  slotAtX,
  slotWidth,
  toFermentState,
  toScheduleRun,
  toScheduleStill,
  ROW_HEIGHT,
  RUN_TYPE_LABELS,
  type BoardRun,
  type MoveTarget,
} from '../../../lib/board';
import { computeRunWarnings, type Warning } from '../../../lib/schedule';
import { WARNING_BADGES } from '../WarningBadges';
import type { BoardData } from './useBoardData';
import type { Notice, RunEditing } from './useRunEditing';

/** Where a drag would land, and what it would warn about there. */
export interface DragPreview extends MoveTarget {
  kind: 'run' | 'ferment';
  id: number;
  warnings: Warning[];
}

type DragData = { kind: 'run'; runId: number } | { kind: 'ferment'; fermentId: number };

/** The still row under the pointer first; the row the block overlaps most for keyboard and touch. */
const collisionDetection: CollisionDetection = firstHit(pointerWithin, rectIntersection);

const screenReaderInstructions = {
  draggable:
    'To move a run, press space to pick it up. Arrow keys move it by one slot or one still, shift and arrow by a day. Press space again to drop it and save, or escape to put it back. Enter opens its details.',
};

export function useRunDrag(data: BoardData, editing: RunEditing, options: { dragging: RefObject<boolean>; setNotice: (notice: Notice) => void }) {
  const { board, tz, spec, win, stillIds, stillById, fermentById, names } = data;
  const { saveMove, openDialog, dragEndedAt } = editing;
  const { dragging, setNotice } = options;
  const [preview, setPreview] = useState<DragPreview | null>(null);
  const previewRef = useRef<DragPreview | null>(null);
  const endMessage = useRef<string | undefined>(undefined);
  const stepSizes = useRef({ slotPx: slotWidth(spec), dayPx: dayWidth(spec), rowPx: ROW_HEIGHT });
  stepSizes.current = { slotPx: slotWidth(spec), dayPx: dayWidth(spec), rowPx: ROW_HEIGHT };
  const [keyboard] = useState(() => boardKeyboardCoordinates(() => stepSizes.current));

  const sensors = useSensors(
    useSensor(PointerSensor, { activationConstraint: { distance: 6 } }),
    useSensor(TouchSensor, { activationConstraint: { delay: 220, tolerance: 8 } }),
    useSensor(KeyboardSensor, {
      coordinateGetter: keyboard.getter,
      keyboardCodes: { start: ['Space'], cancel: ['Escape'], end: ['Space', 'Enter'] },
      scrollBehavior: 'auto',
    }),
  );

  const candidateWarnings = (base: BoardRun, target: MoveTarget): Warning[] => {
    const still = stillById.get(target.stillId);
    if (!still) return [];
    // A run dropped somewhere is booked anew there: its risk at booking is what the move makes it.
    const moved = toScheduleRun({ ...base, ...target, bookedAtRisk: undefined });
    return computeRunWarnings(moved, {
      still: toScheduleStill(still),
      runs: board.runs.map(toScheduleRun),
      ferments: new Map(board.ferments.map((f) => [f.id, toFermentState(f)])),
      timeZone: tz,
      now: board.now,
      atRiskThreshold: board.atRiskThreshold,
    });
  };

  const runTarget = (run: BoardRun, e: DragMoveEvent | DragEndEvent): MoveTarget =>
    moveTarget({
      run,
      deltaX: e.delta.x,
      deltaY: e.delta.y,
      rowHeight: ROW_HEIGHT,
      stillIds,
      pxPerHour: spec.pxPerHour,
      slotMinutes: spec.slotMinutes,
      timeZone: tz,
    });

  /** The slot under a dragged wash's left edge, on the still row it is over. */
  const fermentTarget = (e: DragMoveEvent | DragEndEvent): MoveTarget | null => {
    const over = e.over;
    const rect = e.active.rect.current.translated;
    if (!over || !rect) return null;
    const stillId = (over.data.current as { stillId?: number } | undefined)?.stillId;
    if (!stillId) return null;
    const startsAt = slotAtX(rect.left - over.rect.left, win.start, spec.pxPerHour, spec.slotMinutes, tz);
    return { stillId, startsAt, endsAt: startsAt };
  };

  const draftFor = (fermentId: number, t: MoveTarget) => fermentDraftRun(fermentById.get(fermentId)!, stillById.get(t.stillId)!, t.startsAt);

  const onDragStart = (_e: DragStartEvent) => {
    keyboard.reset();
    dragging.current = true;
    setNotice(null);
    previewRef.current = null;
  };

  const onDragMove = (e: DragMoveEvent) => {
    const d = e.active.data.current as DragData;
    let next: DragPreview | null = null;
    if (d.kind === 'run') {
      const run = board.runs.find((r) => r.id === d.runId);
      if (!run) return;
      const target = runTarget(run, e);
      const prev = previewRef.current;
      if (prev && prev.stillId === target.stillId && prev.startsAt.getTime() === target.startsAt.getTime()) return;
      next = { kind: 'run', id: run.id, ...target, warnings: candidateWarnings(run, target) };
    } else {
      const t = fermentTarget(e);
      if (!t) {
        if (previewRef.current) {
          previewRef.current = null;
          setPreview(null);
        }
        return;
      }
      const prev = previewRef.current;
      if (prev && prev.stillId === t.stillId && prev.startsAt.getTime() === t.startsAt.getTime()) return;
      const draft = draftFor(d.fermentId, t);
      next = {
        kind: 'ferment',
        id: d.fermentId,
        stillId: t.stillId,
        startsAt: draft.startsAt,
        endsAt: draft.endsAt,
        warnings: candidateWarnings(draft, draft),
      };
    }
    previewRef.current = next;
    setPreview(next);
  };

  const finishDrag = () => {
    dragging.current = false;
    dragEndedAt.current = Date.now();
    previewRef.current = null;
    setPreview(null);
  };

  const onDragEnd = (e: DragEndEvent) => {
    const d = e.active.data.current as DragData;
    endMessage.current = undefined;
    if (d.kind === 'run') {
      const run = board.runs.find((r) => r.id === d.runId);
      finishDrag();
      if (!run) return;
      const target = runTarget(run, e);
      if (target.stillId === run.stillId && target.startsAt.getTime() === run.startsAt.getTime()) {
        endMessage.current = `${RUN_TYPE_LABELS[run.type]} dropped where it was.`;
        return;
      }
      endMessage.current = `${movedMessage(run.type, names.still(target.stillId), target.startsAt, tz)}. Saving…`;
      void saveMove(run, target);
    } else {
      const t = fermentTarget(e);
      finishDrag();
      if (!t) {
        endMessage.current = 'Wash dropped outside the stills; nothing booked.';
        return;
      }
      const draft = draftFor(d.fermentId, t);
      endMessage.current = `Booking wash ${fermentById.get(d.fermentId)?.code} on ${names.still(t.stillId)}, ${dayAndTime(t.startsAt, tz)}: check the details and confirm.`;
      openDialog({ run: null, stillId: t.stillId, startsAt: t.startsAt, type: 'stripping', ferments: draft.ferments });
    }
  };

  const announcements: Announcements = useMemo(
    () => ({
      onDragStart: ({ active }) => {
        const d = active.data.current as { kind: string; runId?: number; fermentId?: number };
        if (d.kind === 'run') {
          const run = board.runs.find((r) => r.id === d.runId);
          return run ? pickedUpMessage(run.type, names.still(run.stillId), run.startsAt, tz) : undefined;
        }
        return `Picked up wash ${fermentById.get(d.fermentId!)?.code}. Drop it on a still to book it.`;
      },
      onDragMove: () => {
        const p = previewRef.current;
        if (!p) return undefined;
        const type = p.kind === 'run' ? (board.runs.find((r) => r.id === p.id)?.type ?? 'stripping') : 'stripping';
        const warn = p.warnings.filter((w) => w.severity !== 'info');
        return `${overMessage(type, names.still(p.stillId), p.startsAt, tz)}${warn.length ? `. Warning: ${warn.map((w) => WARNING_BADGES[w.code]).join(', ')}` : ''}`;
      },
      onDragOver: () => undefined,
      onDragEnd: () => endMessage.current,
      onDragCancel: ({ active }) => {
        finishDrag();
        const d = active.data.current as { kind: string; runId?: number };
        const run = d.kind === 'run' ? board.runs.find((r) => r.id === d.runId) : undefined;
        return run ? cancelledDragMessage(run.type, names.still(run.stillId), run.startsAt, tz) : 'Cancelled; nothing booked.';
      },
    }),
    [board, names, tz, fermentById],
  );

  return {
    preview,
    /** Everything DndContext takes but its id, which stays fixed in the island. */
    contextProps: {
      sensors,
      collisionDetection,
      onDragStart,
      onDragMove,
      onDragEnd,
      onDragCancel: finishDrag,
      accessibility: { announcements, screenReaderInstructions },
    },
  };
}
