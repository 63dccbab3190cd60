/**
 * Changing runs: the run dialog (open a run, book on an empty row, book a wash, book a run) and
 * its save and actions, moves saved at once with the snapshot restored when the server refuses,
 * resizing, and the words for a conflict with someone else's change.
 */
import { useCallback, useRef, useState, type Dispatch, type SetStateAction } from 'react';
import {
  dayAndTime,
  describeChanges,
  fermentBooking,
  firstBookableHour,
  hydrateRun,
  movedMessage,
  resizeTarget,
  slotAtX,
  slotWidth,
  RUN_TYPE_LABELS,
  type BoardRun,
  type MoveTarget,
} from '../../../lib/board';
import { api, type ApiError } from '../api';
import { runRecordHref, takesRecord } from '../../runs/record-link';
import type { DialogDraft } from '../RunDialog';
import type { BoardData } from './useBoardData';

export type Notice = { tone: 'info' | 'error'; text: string } | null;

/** A click this soon after a drag ends is the end of that drag, not a click. */
const CLICK_AFTER_DRAG_MS = 300;

export function useRunEditing(data: BoardData, messages: { setNotice: Dispatch<SetStateAction<Notice>>; setLive: (text: string) => void }) {
  const { board, setBoard, tz, spec, win, names, fermentById, refresh } = data;
  const { setNotice, setLive } = messages;
  const [dialog, setDialog] = useState<DialogDraft | null>(null);
  const [dialogError, setDialogError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  /** When the last drag ended (set by the drag). */
  const dragEndedAt = useRef(0);

  const openDialog = useCallback((draft: DialogDraft) => {
    setDialogError(null);
    setDialog(draft);
  }, []);

  const explain = useCallback(
    (error: ApiError, mine?: BoardRun) => {
      if (error.status === 409 && error.current && mine) {
        const theirs = hydrateRun(error.current);
        const changes = describeChanges(mine, theirs, names, tz);
        setNotice({
          tone: 'error',
          text: `Someone else changed this ${RUN_TYPE_LABELS[mine.type].toLowerCase()} while you had the board open${changes.length ? `: ${changes.join('; ')}` : ''}. The board now shows their version; nothing of yours was saved.`,
        });
      } else {
        setNotice({ tone: 'error', text: error.message });
      }
    },
    [names, tz],
  );

  const saveMove = useCallback(
    async (run: BoardRun, target: MoveTarget) => {
      const snapshot = board;
      setBoard((b) => ({ ...b, runs: b.runs.map((r) => (r.id === run.id ? { ...r, ...target } : r)) }));
      const res = await api.updateRun(run.id, {
        version: run.version,
        stillId: target.stillId,
        startsAt: target.startsAt.toISOString(),
        endsAt: target.endsAt.toISOString(),
      });
      if (res.ok) {
        const saved = hydrateRun(res.data.run);
        setBoard((b) => ({ ...b, runs: b.runs.map((r) => (r.id === saved.id ? saved : r)) }));
        setLive(`${movedMessage(saved.type, names.still(saved.stillId), saved.startsAt, tz)}. Saved.`);
        setNotice(null);
      } else {
        setBoard(snapshot);
        setLive(`Not saved: ${res.error.message}`);
        explain(res.error, run);
      }
      void refresh();
    },
    [board, names, tz, explain, refresh],
  );

  const onResize = useCallback(
    (runId: number, deltaX: number) => {
      const run = board.runs.find((r) => r.id === runId);
      if (!run) return;
      const endsAt = resizeTarget(run, deltaX, spec.pxPerHour, spec.slotMinutes, tz);
      if (endsAt.getTime() !== run.endsAt.getTime()) void saveMove(run, { stillId: run.stillId, startsAt: run.startsAt, endsAt });
    },
    [board.runs, spec, tz, saveMove],
  );

  const slotPx = slotWidth(spec);
  const onResizeKey = useCallback((runId: number, steps: number) => onResize(runId, steps * slotPx), [onResize, slotPx]);

  const openRun = useCallback(
    (runId: number) => {
      if (Date.now() - dragEndedAt.current < CLICK_AFTER_DRAG_MS) return;
      const run = board.runs.find((r) => r.id === runId);
      if (!run) return;
      setDialogError(null);
      setDialog({ run, stillId: run.stillId, startsAt: run.startsAt, type: run.type, ferments: run.ferments });
    },
    [board.runs],
  );

  const onEmptyClick = useCallback(
    (stillId: number, x: number) => {
      if (Date.now() - dragEndedAt.current < CLICK_AFTER_DRAG_MS) return;
      const startsAt = slotAtX(x, win.start, spec.pxPerHour, spec.slotMinutes, tz);
      setDialogError(null);
      setDialog({ run: null, stillId, startsAt, type: 'stripping', ferments: [] });
    },
    [win.start, spec, tz],
  );

  const bookFerment = useCallback(
    (fermentId: number) => {
      const f = fermentById.get(fermentId);
      if (!f) return;
      const booking = fermentBooking(f, board.stills, board.now, win.start, spec.pxPerHour, tz, {
        runs: board.runs,
        atRiskThreshold: board.atRiskThreshold,
        stableDays: board.stableDays,
      });
      if (!booking) return;
      setDialogError(null);
      setDialog({ run: null, type: 'stripping', ...booking });
    },
    [fermentById, board, win.start, spec, tz],
  );

  const bookRun = () =>
    openDialog({
      run: null,
      stillId: board.stills[0]?.id ?? 0,
      startsAt: firstBookableHour(board.now, win.start, spec.pxPerHour, tz),
      type: 'stripping',
      ferments: [],
    });

  const onSave = async (body: Record<string, unknown>, run: BoardRun | null) => {
    setBusy(true);
    const res = run ? await api.updateRun(run.id, body) : await api.createRun(body);
    setBusy(false);
    if (res.ok) {
      const saved = hydrateRun(res.data.run);
      setDialog(null);
      setLive(`${RUN_TYPE_LABELS[saved.type]} ${run ? 'saved' : 'booked'} on ${names.still(saved.stillId)}, ${dayAndTime(saved.startsAt, tz)}.`);
      setNotice({
        tone: 'info',
        text: `${RUN_TYPE_LABELS[saved.type]} ${run ? 'saved' : 'booked'} on ${names.still(saved.stillId)}, ${dayAndTime(saved.startsAt, tz)}.`,
      });
      void refresh();
    } else if (res.error.status === 409 && res.error.current && run) {
      setDialog(null);
      explain(res.error, run);
      void refresh();
    } else {
      setDialogError(
        res.error.message +
          (res.error.fields
            ? ` ${Object.values(res.error.fields)
                .filter((m) => m !== res.error.message)
                .join(' ')}`
            : ''),
      );
    }
  };

  /**
   * Cancel: asked here, then sent. Start and finish: the dialog's confirmation has already sent
   * them (and any questions the server asked were accepted there); a finish opens the run's record
   * form, like the run page's Finish button.
   */
  const onAction = async (action: 'cancel' | 'start' | 'finish', run: BoardRun) => {
    const word = action === 'cancel' ? 'cancelled' : action === 'start' ? 'started' : 'finished';
    if (action === 'finish' && takesRecord(run.type)) {
      setDialog(null);
      window.location.assign(runRecordHref(run.id));
      return;
    }
    if (action !== 'cancel') {
      setDialog(null);
      setNotice({ tone: 'info', text: `${RUN_TYPE_LABELS[run.type]} on ${names.still(run.stillId)} ${word}.` });
      setLive(`${RUN_TYPE_LABELS[run.type]} ${word}.`);
      void refresh();
      return;
    }
    if (!window.confirm(`Cancel this ${RUN_TYPE_LABELS[run.type].toLowerCase()}? The still time is freed.`)) return;
    setBusy(true);
    const res = await api.cancelRun(run.id, run.version);
    setBusy(false);
    setDialog(null);
    if (res.ok) {
      setNotice({ tone: 'info', text: `${RUN_TYPE_LABELS[run.type]} on ${names.still(run.stillId)} ${word}.` });
      setLive(`${RUN_TYPE_LABELS[run.type]} ${word}.`);
    } else explain(res.error, run);
    void refresh();
  };

  return {
    dialog,
    dialogError,
    busy,
    dragEndedAt,
    openDialog,
    closeDialog: () => setDialog(null),
    saveMove,
    onResize,
    onResizeKey,
    openRun,
    onEmptyClick,
    bookFerment,
    bookRun,
    onSave,
    onAction,
  };
}

export type RunEditing = ReturnType<typeof useRunEditing>;
