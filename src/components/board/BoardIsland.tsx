/**
 * The still-run board: stills down the side, the distillery's time across, runs as blocks
 * you drag (mouse, touch or keyboard) to another time or still, ferments' ready windows on
 * the rows, washes to book at the side, runs at risk with one-step moves, and the
 * fermenters' occupancy underneath. Server state is the truth: every drop is saved at once
 * and the board reloads after each change and every 30 seconds.
 */
import { memo, useCallback, useEffect, useMemo, useRef, useState } from 'react';
import {
  DndContext, KeyboardSensor, PointerSensor, TouchSensor, pointerWithin, rectIntersection, useDroppable, useSensor, useSensors,
  type CollisionDetection, type DragEndEvent, type DragMoveEvent, type DragStartEvent, type KeyboardCoordinateGetter, type Announcements,
} from '@dnd-kit/core';
import {
  boardWarnings, boardWindow, bookableFerments, cancelledDragMessage, dayAndTime, describeChanges, hourMarks, hydrateBoard, hydrateRun,
  moveTarget, movedMessage, overMessage, pickedUpMessage, resizeTarget, runsAtRisk, shiftAnchor, shortDate, slotAtX, vesselBars,
  windowPlacement, xOf, ZOOMS, RUN_TYPE_LABELS,
  type Board, type BoardPayload, type BoardRun, type MoveTarget, type Zoom,
} from '../../lib/board';
import { computeRunWarnings, formatReadyWindow, occupiedRange, openIntervals, wallClock, type Warning } from '../../lib/schedule';
import { toFermentState, toScheduleRun, toScheduleStill } from '../../lib/board';
import { formatVolume, type UnitSystem } from '../../lib/units';
import { api, type ApiError } from './api';
import { RunBlock } from './RunBlock';
import { FermentChip } from './FermentChip';
import { RunDialog, type DialogDraft } from './RunDialog';
import { WarningBadges, WARNING_BADGES } from './WarningBadges';
import './board.css';

export interface BoardIslandProps {
  initial: BoardPayload;
  zoom: Zoom;
  anchor: string;
  today: string;
  units: UnitSystem;
  canBook: boolean;
  canMove: boolean;
  canOperate: boolean;
}

const LABEL_W = 150;
const ROW_H = 66;
const VESSEL_H = 28;
const HEADER_H = 46;
const REFRESH_MS = 30_000;

interface Preview extends MoveTarget { kind: 'run' | 'ferment'; id: number; warnings: Warning[] }
type Notice = { tone: 'info' | 'error'; text: string } | null;

const initials = (name: string) => name.split(/\s+/).map((w) => w[0]).join('').slice(0, 3).toUpperCase();

function StillLane(props: {
  still: Board['stills'][number];
  index: number;
  width: number;
  closed: Array<{ x: number; w: number }>;
  windows: Array<{ key: string; x: number; w: number; mid: number | null; code: string }>;
  children: React.ReactNode;
  onEmptyClick: (stillId: number, x: number) => void;
  canBook: boolean;
}) {
  const { setNodeRef, isOver } = useDroppable({ id: `still:${props.still.id}`, data: { stillId: props.still.id } });
  return (
    <div className={`lane${isOver ? ' is-over' : ''}`} style={{ width: props.width, height: ROW_H }} ref={setNodeRef}
      data-testid={`lane-${props.still.id}`}
      onClick={(e) => {
        if (!props.canBook || e.target !== e.currentTarget) return;
        const rect = e.currentTarget.getBoundingClientRect();
        props.onEmptyClick(props.still.id, e.clientX - rect.left);
      }}>
      {props.closed.map((c, i) => <div key={i} className="lane-closed" style={{ left: c.x, width: c.w }} aria-hidden="true" />)}
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

const MemoLane = memo(StillLane);
const NO_CLOSED: Array<{ x: number; w: number }> = [];
const NO_WINDOWS: Array<{ key: string; x: number; w: number; mid: number | null; code: string }> = [];

export default function BoardIsland(props: BoardIslandProps) {
  const [board, setBoard] = useState<Board>(() => hydrateBoard(props.initial));
  const [zoom, setZoom] = useState<Zoom>(props.zoom);
  const [anchor, setAnchor] = useState(props.anchor);
  const [dialog, setDialog] = useState<DialogDraft | null>(null);
  const [dialogError, setDialogError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [notice, setNotice] = useState<Notice>(null);
  const [preview, setPreview] = useState<Preview | null>(null);
  const [live, setLive] = useState('');
  const [suggestions, setSuggestions] = useState<Record<number, { loading: boolean; notBefore?: string; slots: Array<{ stillId: number; startsAt: Date; endsAt: Date }>; error?: string }>>({});
  const draggingRef = useRef(false);
  const previewRef = useRef<Preview | null>(null);
  const lastDragEnd = useRef(0);
  const endMessage = useRef<string | undefined>(undefined);
  const requestNo = useRef(0);
  const scrollRef = useRef<HTMLDivElement>(null);
  const keyboardSteps = useRef<{ origin: { x: number; y: number } | null; x: number; y: number }>({ origin: null, x: 0, y: 0 });

  const tz = board.timeZone;
  const spec = ZOOMS[zoom];
  const win = useMemo(() => boardWindow(anchor, zoom, tz), [anchor, zoom, tz]);
  const width = Math.round(xOf(win.end, win.start, spec.pxPerHour));
  const slotPx = (spec.slotMinutes / 60) * spec.pxPerHour;
  const compact = zoom === 'six-weeks';
  const stillIds = useMemo(() => board.stills.map((s) => s.id), [board.stills]);
  const stillById = useMemo(() => new Map(board.stills.map((s) => [s.id, s])), [board.stills]);
  const fermentById = useMemo(() => new Map(board.ferments.map((f) => [f.id, f])), [board.ferments]);
  const personById = useMemo(() => new Map(board.people.map((p) => [p.id, p])), [board.people]);
  const warnings = useMemo(() => boardWarnings(board), [board]);
  const geometry = useRef({ slotPx, dayPx: 24 * spec.pxPerHour });
  geometry.current = { slotPx, dayPx: 24 * spec.pxPerHour };

  const names = useMemo(() => ({
    still: (id: number) => stillById.get(id)?.name ?? 'a retired still',
    person: (id: number | null) => (id === null ? 'nobody' : personById.get(id)?.name ?? 'someone'),
  }), [stillById, personById]);

  // ---- loading ----
  // Every refresh but the periodic one follows something we did, so it asks for fresh data.
  const refresh = useCallback(async (w = win, fresh = true) => {
    const mine = ++requestNo.current;
    const res = await api.board(w.start, w.end, fresh);
    if (mine !== requestNo.current) return;
    if (res.ok) setBoard(hydrateBoard(res.data, new Date()));
    else setNotice({ tone: 'error', text: res.error.message });
  }, [win]);

  useEffect(() => {
    const url = new URL(window.location.href);
    url.searchParams.set('zoom', zoom);
    url.searchParams.set('date', anchor);
    window.history.replaceState(null, '', url);
  }, [zoom, anchor]);

  const firstLoad = useRef(true);
  useEffect(() => {
    if (firstLoad.current) { firstLoad.current = false; return; }
    void refresh(win, false);
  }, [win]);

  useEffect(() => {
    const t = window.setInterval(() => { if (!draggingRef.current && document.visibilityState === 'visible') void refresh(undefined, false); }, REFRESH_MS);
    return () => window.clearInterval(t);
  }, [refresh]);

  // Scroll the day view to the working morning on first paint.
  useEffect(() => {
    const el = scrollRef.current;
    if (!el) return;
    if (zoom === 'day') el.scrollLeft = Math.max(0, xOf(new Date(win.start.getTime() + 5 * 3_600_000), win.start, spec.pxPerHour));
    else if (zoom === 'week' && board.now > win.start && board.now < win.end) {
      // Today at the left edge, so the coming days are in view at 7 am.
      const todayStart = win.days.find((d) => board.now >= d.start && board.now < d.end)?.start ?? win.start;
      el.scrollLeft = Math.max(0, xOf(todayStart, win.start, spec.pxPerHour) - 20);
    } else el.scrollLeft = 0;
  }, [zoom, anchor]);

  // ---- errors ----
  const explain = useCallback((error: ApiError, mine?: BoardRun) => {
    if (error.status === 409 && error.current && mine) {
      const theirs = hydrateRun(error.current);
      const changes = describeChanges(mine, theirs, names, tz);
      setNotice({ tone: 'error', text: `Someone else changed this ${RUN_TYPE_LABELS[mine.type].toLowerCase()} while you had the board open${changes.length ? `: ${changes.join('; ')}` : ''}. The board now shows their version; nothing of yours was saved.` });
    } else {
      setNotice({ tone: 'error', text: error.message });
    }
  }, [names, tz]);

  // ---- moving ----
  const saveMove = useCallback(async (run: BoardRun, target: MoveTarget) => {
    const snapshot = board;
    setBoard((b) => ({ ...b, runs: b.runs.map((r) => (r.id === run.id ? { ...r, ...target } : r)) }));
    const res = await api.updateRun(run.id, { version: run.version, stillId: target.stillId, startsAt: target.startsAt.toISOString(), endsAt: target.endsAt.toISOString() });
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
  }, [board, names, tz, explain, refresh]);

  const onResize = useCallback((runId: number, deltaX: number) => {
    const run = board.runs.find((r) => r.id === runId);
    if (!run) return;
    const endsAt = resizeTarget(run, deltaX, spec.pxPerHour, spec.slotMinutes, tz);
    if (endsAt.getTime() !== run.endsAt.getTime()) void saveMove(run, { stillId: run.stillId, startsAt: run.startsAt, endsAt });
  }, [board.runs, spec, tz, saveMove]);

  const onResizeKey = useCallback((runId: number, steps: number) => onResize(runId, steps * slotPx), [onResize, slotPx]);

  const candidateWarnings = useCallback((base: BoardRun, target: MoveTarget): Warning[] => {
    const still = stillById.get(target.stillId);
    if (!still) return [];
    const moved = toScheduleRun({ ...base, ...target });
    return computeRunWarnings(moved, {
      still: toScheduleStill(still), runs: board.runs.map(toScheduleRun),
      ferments: new Map(board.ferments.map((f) => [f.id, toFermentState(f)])), timeZone: tz, now: board.now,
    });
  }, [board, stillById, tz]);

  const fermentDraftRun = useCallback((fermentId: number, stillId: number, startsAt: Date): BoardRun => {
    const f = fermentById.get(fermentId)!;
    const still = stillById.get(stillId)!;
    const litres = Math.min(f.volumeLitres, still.capacityLitres);
    const minutes = Math.max(60, still.typicalMinutes.stripping);
    return {
      id: -1, stillId, type: 'stripping', status: 'planned', startsAt, endsAt: new Date(startsAt.getTime() + minutes * 60000), operatorId: null,
      chargeLitres: litres, chargeAbv: null, ferments: [{ fermentId, litres }], feeds: [], lowWinesLitres: null, version: 0, sequence: 0, notes: null,
    };
  }, [fermentById, stillById]);

  const fermentTarget = (e: DragMoveEvent | DragEndEvent): MoveTarget | null => {
    const over = e.over;
    const rect = e.active.rect.current.translated;
    if (!over || !rect) return null;
    const stillId = (over.data.current as { stillId?: number } | undefined)?.stillId;
    if (!stillId) return null;
    const startsAt = slotAtX(rect.left - over.rect.left, win.start, spec.pxPerHour, spec.slotMinutes, tz);
    return { stillId, startsAt, endsAt: startsAt };
  };

  const sensors = useSensors(
    useSensor(PointerSensor, { activationConstraint: { distance: 6 } }),
    useSensor(TouchSensor, { activationConstraint: { delay: 220, tolerance: 8 } }),
    useSensor(KeyboardSensor, {
      coordinateGetter: useCallback<KeyboardCoordinateGetter>((event, { currentCoordinates }) => {
        // Count steps ourselves from where the drag began: dnd-kit's current coordinates come
        // from re-measured rects and can drift from whole slots.
        const g = geometry.current;
        const k = keyboardSteps.current;
        if (!k.origin) k.origin = { ...currentCoordinates };
        switch (event.code) {
          case 'ArrowRight': k.x += event.shiftKey ? g.dayPx : g.slotPx; break;
          case 'ArrowLeft': k.x -= event.shiftKey ? g.dayPx : g.slotPx; break;
          case 'ArrowDown': k.y += ROW_H; break;
          case 'ArrowUp': k.y -= ROW_H; break;
          default: return undefined;
        }
        return { x: k.origin.x + k.x, y: k.origin.y + k.y };
      }, []),
      keyboardCodes: { start: ['Space'], cancel: ['Escape'], end: ['Space', 'Enter'] },
      scrollBehavior: 'auto',
    }),
  );

  const collision: CollisionDetection = useCallback((args) => {
    const hits = pointerWithin(args);
    return hits.length ? hits : rectIntersection(args);
  }, []);

  const onDragStart = (_e: DragStartEvent) => {
    keyboardSteps.current = { origin: null, x: 0, y: 0 };
    draggingRef.current = true;
    setNotice(null);
    previewRef.current = null;
  };

  const onDragMove = (e: DragMoveEvent) => {
    const data = e.active.data.current as { kind: 'run'; runId: number } | { kind: 'ferment'; fermentId: number };
    let next: Preview | null = null;
    if (data.kind === 'run') {
      const run = board.runs.find((r) => r.id === data.runId);
      if (!run) return;
      const target = moveTarget({ run, deltaX: e.delta.x, deltaY: e.delta.y, rowHeight: ROW_H, stillIds, pxPerHour: spec.pxPerHour, slotMinutes: spec.slotMinutes, timeZone: tz });
      const prev = previewRef.current;
      if (prev && prev.stillId === target.stillId && prev.startsAt.getTime() === target.startsAt.getTime()) return;
      next = { kind: 'run', id: run.id, ...target, warnings: candidateWarnings(run, target) };
    } else {
      const t = fermentTarget(e);
      if (!t) { if (previewRef.current) { previewRef.current = null; setPreview(null); } return; }
      const prev = previewRef.current;
      if (prev && prev.stillId === t.stillId && prev.startsAt.getTime() === t.startsAt.getTime()) return;
      const draft = fermentDraftRun(data.fermentId, t.stillId, t.startsAt);
      next = { kind: 'ferment', id: data.fermentId, stillId: t.stillId, startsAt: draft.startsAt, endsAt: draft.endsAt, warnings: candidateWarnings(draft, draft) };
    }
    previewRef.current = next;
    setPreview(next);
  };

  const finishDrag = () => {
    draggingRef.current = false;
    lastDragEnd.current = Date.now();
    previewRef.current = null;
    setPreview(null);
  };

  const onDragEnd = (e: DragEndEvent) => {
    const data = e.active.data.current as { kind: 'run'; runId: number } | { kind: 'ferment'; fermentId: number };
    endMessage.current = undefined;
    if (data.kind === 'run') {
      const run = board.runs.find((r) => r.id === data.runId);
      finishDrag();
      if (!run) return;
      const target = moveTarget({ run, deltaX: e.delta.x, deltaY: e.delta.y, rowHeight: ROW_H, stillIds, pxPerHour: spec.pxPerHour, slotMinutes: spec.slotMinutes, timeZone: tz });
      if (target.stillId === run.stillId && target.startsAt.getTime() === run.startsAt.getTime()) {
        endMessage.current = `${RUN_TYPE_LABELS[run.type]} dropped where it was.`;
        return;
      }
      endMessage.current = `${movedMessage(run.type, names.still(target.stillId), target.startsAt, tz)}. Saving…`;
      void saveMove(run, target);
    } else {
      const t = fermentTarget(e);
      finishDrag();
      if (!t) { endMessage.current = 'Wash dropped outside the stills; nothing booked.'; return; }
      const draft = fermentDraftRun(data.fermentId, t.stillId, t.startsAt);
      endMessage.current = `Booking wash ${fermentById.get(data.fermentId)?.code} on ${names.still(t.stillId)}, ${dayAndTime(t.startsAt, tz)}: check the details and confirm.`;
      setDialogError(null);
      setDialog({ run: null, stillId: t.stillId, startsAt: t.startsAt, type: 'stripping', ferments: draft.ferments });
    }
  };

  const announcements: Announcements = useMemo(() => ({
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
      const type = p.kind === 'run' ? board.runs.find((r) => r.id === p.id)?.type ?? 'stripping' : 'stripping';
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
  }), [board, names, tz, fermentById]);

  // ---- dialog ----
  const openRun = useCallback((runId: number) => {
    if (Date.now() - lastDragEnd.current < 300) return;
    const run = board.runs.find((r) => r.id === runId);
    if (!run) return;
    setDialogError(null);
    setDialog({ run, stillId: run.stillId, startsAt: run.startsAt, type: run.type, ferments: run.ferments });
  }, [board.runs]);

  const onEmptyClick = useCallback((stillId: number, x: number) => {
    if (Date.now() - lastDragEnd.current < 300) return;
    const startsAt = slotAtX(x, win.start, spec.pxPerHour, spec.slotMinutes, tz);
    setDialogError(null);
    setDialog({ run: null, stillId, startsAt, type: 'stripping', ferments: [] });
  }, [win.start, spec, tz]);

  const bookFerment = useCallback((fermentId: number) => {
    const f = fermentById.get(fermentId);
    if (!f || board.stills.length === 0) return;
    const still = board.stills.find((s) => s.capacityLitres >= f.volumeLitres) ?? board.stills[0]!;
    const after = new Date(Math.max(board.now.getTime(), (f.readyP90 ?? f.readyAt ?? board.now).getTime()));
    const startsAt = slotAtX(xOf(after, win.start, spec.pxPerHour), win.start, spec.pxPerHour, 60, tz);
    setDialogError(null);
    setDialog({ run: null, stillId: still.id, startsAt: new Date(Math.max(startsAt.getTime(), after.getTime())), type: 'stripping', ferments: [{ fermentId, litres: Math.min(f.volumeLitres, still.capacityLitres) }] });
  }, [fermentById, board, win.start, spec, tz]);

  const onSave = async (body: Record<string, unknown>, run: BoardRun | null) => {
    setBusy(true);
    const res = run ? await api.updateRun(run.id, body) : await api.createRun(body);
    setBusy(false);
    if (res.ok) {
      const saved = hydrateRun(res.data.run);
      setDialog(null);
      setLive(`${RUN_TYPE_LABELS[saved.type]} ${run ? 'saved' : 'booked'} on ${names.still(saved.stillId)}, ${dayAndTime(saved.startsAt, tz)}.`);
      setNotice({ tone: 'info', text: `${RUN_TYPE_LABELS[saved.type]} ${run ? 'saved' : 'booked'} on ${names.still(saved.stillId)}, ${dayAndTime(saved.startsAt, tz)}.` });
      void refresh();
    } else if (res.error.status === 409 && res.error.current && run) {
      setDialog(null);
      explain(res.error, run);
      void refresh();
    } else {
      setDialogError(res.error.message + (res.error.fields ? ` ${Object.values(res.error.fields).filter((m) => m !== res.error.message).join(' ')}` : ''));
    }
  };

  const onAction = async (action: 'cancel' | 'start' | 'finish', run: BoardRun) => {
    if (action === 'cancel' && !window.confirm(`Cancel this ${RUN_TYPE_LABELS[run.type].toLowerCase()}? The still time is freed.`)) return;
    setBusy(true);
    const res = action === 'cancel' ? await api.cancelRun(run.id, run.version) : action === 'start' ? await api.startRun(run.id, run.version) : await api.finishRun(run.id, run.version);
    setBusy(false);
    setDialog(null);
    if (res.ok) {
      const word = action === 'cancel' ? 'cancelled' : action === 'start' ? 'started' : 'finished';
      setNotice({ tone: 'info', text: `${RUN_TYPE_LABELS[run.type]} on ${names.still(run.stillId)} ${word}.` });
      setLive(`${RUN_TYPE_LABELS[run.type]} ${word}.`);
    } else explain(res.error, run);
    void refresh();
  };

  // ---- move on stall ----
  const atRisk = useMemo(() => runsAtRisk(board.runs, board.ferments, board.now), [board]);
  const findSlots = async (runId: number) => {
    setSuggestions((s) => ({ ...s, [runId]: { loading: true, slots: [] } }));
    const res = await api.suggestions(runId);
    setSuggestions((s) => ({
      ...s,
      [runId]: res.ok
        ? { loading: false, notBefore: res.data.notBefore, slots: res.data.slots.map((x) => ({ stillId: x.stillId, startsAt: new Date(x.startsAt), endsAt: new Date(x.endsAt) })) }
        : { loading: false, slots: [], error: res.error.message },
    }));
  };
  const moveHere = async (run: BoardRun, slot: MoveTarget) => {
    setSuggestions((s) => { const n = { ...s }; delete n[run.id]; return n; });
    await saveMove(run, slot);
  };

  // ---- drawing ----
  const runsByStill = useMemo(() => {
    const m = new Map<number, BoardRun[]>();
    for (const s of board.stills) m.set(s.id, []);
    for (const r of board.runs) {
      if (r.status === 'cancelled') continue;
      if (r.endsAt <= win.start || r.startsAt >= win.end) continue;
      m.get(r.stillId)?.push(r);
    }
    return m;
  }, [board.runs, board.stills, win]);

  const closedByStill = useMemo(() => {
    const m = new Map<number, Array<{ x: number; w: number }>>();
    for (const s of board.stills) {
      const open = openIntervals(s, { start: win.start, end: win.end }, tz);
      const out: Array<{ x: number; w: number }> = [];
      let cursor = win.start;
      for (const o of [...open, { start: win.end, end: win.end }]) {
        if (o.start > cursor) out.push({ x: xOf(cursor, win.start, spec.pxPerHour), w: xOf(o.start, cursor, spec.pxPerHour) });
        cursor = o.end;
      }
      m.set(s.id, out);
    }
    return m;
  }, [board.stills, win, tz, spec.pxPerHour]);

  const windowsByStill = useMemo(() => {
    const m = new Map<number, Array<{ key: string; x: number; w: number; mid: number | null; code: string }>>();
    for (const [stillId, list] of runsByStill) {
      const seen = new Set<number>();
      const out: Array<{ key: string; x: number; w: number; mid: number | null; code: string }> = [];
      for (const r of list) {
        for (const c of r.ferments) {
          const f = fermentById.get(c.fermentId);
          if (!f || seen.has(f.id) || f.emptiedAt) continue;
          seen.add(f.id);
          const early = f.readyP10 ?? f.readyAt;
          const late = f.readyP90 ?? f.readyAt;
          if (!early || !late) continue;
          const x = xOf(early, win.start, spec.pxPerHour);
          out.push({ key: `${r.id}-${f.id}`, x, w: xOf(late, early, spec.pxPerHour), mid: f.readyAt ? xOf(f.readyAt, early, spec.pxPerHour) : null, code: f.code });
        }
      }
      m.set(stillId, out);
    }
    return m;
  }, [runsByStill, fermentById, win.start, spec.pxPerHour]);

  const blockProps = useCallback((r: BoardRun) => {
    const still = stillById.get(r.stillId);
    const occupied = occupiedRange(r, still);
    const codes = r.ferments.map((c) => fermentById.get(c.fermentId)?.code ?? '?').join(' + ');
    const worst = r.ferments.map((c) => fermentById.get(c.fermentId)).filter((f) => f && !f.emptiedAt).map((f) => windowPlacement(r.startsAt, f!));
    const placement = worst.includes('before') ? 'before' : worst.includes('inside') ? 'inside' : worst.includes('after') ? 'after' : 'unknown';
    const charge = r.chargeLitres ?? (r.ferments.length ? r.ferments.reduce((s, c) => s + c.litres, 0) : null);
    const op = r.operatorId ? personById.get(r.operatorId)?.name ?? '' : '';
    return {
      x: xOf(r.startsAt, win.start, spec.pxPerHour),
      width: xOf(r.endsAt, r.startsAt, spec.pxPerHour),
      cleaningWidth: xOf(occupied.end, r.endsAt, spec.pxPerHour),
      fermentCodes: codes,
      chargeText: charge ? formatVolume(charge, props.units) : '',
      operatorText: op ? (zoom === 'day' ? op : initials(op)) : '',
      timeText: `${dayAndTime(r.startsAt, tz)} to ${dayAndTime(r.endsAt, tz)}`,
      placement: placement as ReturnType<typeof windowPlacement>,
    };
  }, [stillById, fermentById, personById, win.start, spec.pxPerHour, tz, zoom, props.units]);

  // The run blocks, built once per board / window / warnings change: a drag's preview re-renders
  // the island on every slot it crosses, and must not rebuild (or re-format) every block.
  const blocksByStill = useMemo(() => {
    const out = new Map<number, React.ReactNode[]>();
    for (const [stillId, runs] of runsByStill) {
      out.set(stillId, runs.map((r) => (
        <RunBlock key={r.id} run={r} {...blockProps(r)} rowHeight={ROW_H} warnings={warnings.get(r.id) ?? NO_WARNINGS}
          canMove={props.canMove} compact={compact} onOpen={openRun} onResize={onResize} onResizeKey={onResizeKey} />
      )));
    }
    return out;
  }, [runsByStill, blockProps, warnings, props.canMove, compact, openRun, onResize, onResizeKey]);

  const bars = useMemo(() => vesselBars(board.fermenters, board.ferments, board.runs), [board]);
  const bookable = useMemo(() => bookableFerments(board.ferments, board.runs), [board]);
  const nowX = xOf(board.now, win.start, spec.pxPerHour);
  const tickEvery = zoom === 'day' ? 1 : zoom === 'week' ? 6 : 0;
  const todayVisible = board.now >= win.start && board.now < win.end;

  const rangeLabel = zoom === 'day'
    ? shortDate(win.days[0]!.ymd, win.days[0]!.weekday)
    : `${shortDate(win.days[0]!.ymd, win.days[0]!.weekday)} – ${shortDate(win.days[win.days.length - 1]!.ymd, win.days[win.days.length - 1]!.weekday)}`;

  const previewRow = preview ? stillIds.indexOf(preview.stillId) : -1;

  return (
    <div className="board-root">
      <div className="board-toolbar" role="toolbar" aria-label="Board view">
        <div className="flex items-center gap-1">
          <button type="button" className="btn btn-quiet" onClick={() => setAnchor(shiftAnchor(anchor, zoom, -1))} aria-label={`Previous ${zoom === 'day' ? 'day' : zoom === 'week' ? 'week' : 'six weeks'}`}>◀</button>
          <button type="button" className="btn btn-quiet" onClick={() => setAnchor(props.today)}>Today</button>
          <button type="button" className="btn btn-quiet" onClick={() => setAnchor(shiftAnchor(anchor, zoom, 1))} aria-label={`Next ${zoom === 'day' ? 'day' : zoom === 'week' ? 'week' : 'six weeks'}`}>▶</button>
        </div>
        <h2 className="board-range" aria-live="polite">{rangeLabel}</h2>
        <div className="zoom-switch" role="group" aria-label="Zoom">
          {(Object.keys(ZOOMS) as Zoom[]).map((z) => (
            <button key={z} type="button" className={`zoom-btn${z === zoom ? ' is-on' : ''}`} aria-pressed={z === zoom} onClick={() => setZoom(z)}>{ZOOMS[z].label}</button>
          ))}
        </div>
        {props.canBook && (
          <button type="button" className="btn ml-auto" onClick={() => {
            setDialogError(null);
            const start = new Date(Math.max(board.now.getTime(), win.start.getTime()));
            setDialog({ run: null, stillId: board.stills[0]?.id ?? 0, startsAt: slotAtX(xOf(start, win.start, spec.pxPerHour), win.start, spec.pxPerHour, 60, tz), type: 'stripping', ferments: [] });
          }} disabled={board.stills.length === 0}>Book a run</button>
        )}
      </div>
      <p className="board-tz">Times are {tz}. {props.canMove ? 'Drag a run, or focus it and press space, then the arrow keys (shift + arrow moves a day), then space to drop.' : 'You can read the board; planners and distillers move runs.'}</p>
      {notice && (
        <div className={`board-notice ${notice.tone === 'error' ? 'is-error' : ''}`} role={notice.tone === 'error' ? 'alert' : 'status'} data-testid="board-notice">
          <span>{notice.text}</span>
          <button type="button" className="btn-quiet notice-close" onClick={() => setNotice(null)} aria-label="Dismiss">✕</button>
        </div>
      )}
      <div aria-live="assertive" className="sr-only" data-testid="board-live">{live}</div>

      <div className="board-layout">
        <DndContext id="plateau-board" sensors={sensors} collisionDetection={collision} onDragStart={onDragStart} onDragMove={onDragMove} onDragEnd={onDragEnd}
          onDragCancel={finishDrag}
          accessibility={{ announcements, screenReaderInstructions: { draggable: 'To move a run, press space to pick it up. Arrow keys move it by one slot or one still, shift and arrow by a day. Press space again to drop it and save, or escape to put it back. Enter opens its details.' } }}>
          <div className="board-scroll" ref={scrollRef} data-testid="board-scroll" tabIndex={0} role="region" aria-label="Still board timeline (scroll sideways with the arrow keys)">
            <div className="board-canvas" style={{ width: LABEL_W + width }}>
              <div className="board-head" style={{ height: HEADER_H }}>
                <div className="corner" style={{ width: LABEL_W }}>Stills</div>
                <div className="axis" style={{ width }}>
                  {win.days.map((d) => {
                    const x = xOf(d.start, win.start, spec.pxPerHour);
                    const w = xOf(d.end, d.start, spec.pxPerHour);
                    return (
                      <div key={d.ymd} className={`axis-day${d.weekday === 0 || d.weekday === 6 ? ' is-weekend' : ''}${d.ymd === props.today ? ' is-today' : ''}`} style={{ left: x, width: w }}>
                        <span className="axis-day-label">{zoom === 'six-weeks' ? `${shortDate(d.ymd, d.weekday).split(' ').slice(1).join(' ')}` : shortDate(d.ymd, d.weekday)}</span>
                        {tickEvery > 0 && hourMarks(d, tickEvery, tz).filter((m) => m.label !== '00:00').map((m) => (
                          <span key={m.label} className="axis-tick" style={{ left: xOf(m.at, d.start, spec.pxPerHour) }}>{zoom === 'day' ? m.label : m.label.slice(0, 2)}</span>
                        ))}
                      </div>
                    );
                  })}
                </div>
              </div>
              {board.stills.length === 0 && <p className="p-4">No stills yet. A manager adds them under Stills &amp; fermenters.</p>}
              {board.stills.map((s, i) => (
                <div className="board-row" key={s.id}>
                  <div className="row-label" style={{ width: LABEL_W, height: ROW_H }}>
                    <span className="font-semibold">{s.name}</span>
                    <span className="text-xs text-ink-soft">{s.kind} · {formatVolume(s.capacityLitres, props.units)}</span>
                  </div>
                  <MemoLane still={s} index={i} width={width} closed={closedByStill.get(s.id) ?? NO_CLOSED} windows={windowsByStill.get(s.id) ?? NO_WINDOWS} onEmptyClick={onEmptyClick} canBook={props.canBook}>
                    {blocksByStill.get(s.id)}
                  </MemoLane>
                </div>
              ))}
              {todayVisible && <div className="now-line" style={{ left: LABEL_W + nowX, top: HEADER_H, height: board.stills.length * ROW_H }} aria-hidden="true" />}
              {preview && previewRow >= 0 && (
                <div className="drop-ghost" data-testid="drop-preview"
                  style={{ left: LABEL_W + xOf(preview.startsAt, win.start, spec.pxPerHour), top: HEADER_H + previewRow * ROW_H + 4, width: Math.max(8, xOf(preview.endsAt, preview.startsAt, spec.pxPerHour)), height: ROW_H - 10 }}>
                  <span className="drop-ghost-label">
                    <span className="drop-ghost-time">{names.still(preview.stillId)}, {dayAndTime(preview.startsAt, tz)}</span>
                    <WarningBadges warnings={preview.warnings} />
                    {preview.warnings.filter((w) => w.severity !== 'info').length === 0 && <span className="text-xs">no warnings</span>}
                  </span>
                </div>
              )}

              <div className="band-title" style={{ width: LABEL_W + width }}>
                <span className="band-sticky">Vessel occupancy <span className="band-hint">fermenting, ready window (hatched), then waiting until the run that empties it</span></span>
              </div>
              {board.fermenters.map((v) => (
                <div className="board-row" key={v.id}>
                  <div className="row-label vessel-label" style={{ width: LABEL_W, height: VESSEL_H }}>
                    <span className="font-semibold">{v.name}</span>
                  </div>
                  <div className="vessel-lane" style={{ width, height: VESSEL_H }}>
                    {(bars.get(v.id) ?? []).map((b) => {
                      const endAt = b.freeAt ?? b.readyP90 ?? win.end;
                      if (endAt <= win.start || b.pitchedAt >= win.end) return null;
                      const x0 = xOf(b.pitchedAt, win.start, spec.pxPerHour);
                      const x1 = xOf(endAt, win.start, spec.pxPerHour);
                      const p10 = b.readyP10 ? xOf(b.readyP10, win.start, spec.pxPerHour) : null;
                      const p90 = b.readyP90 ? xOf(b.readyP90, win.start, spec.pxPerHour) : null;
                      const label = `${b.code}: pitched ${dayAndTime(b.pitchedAt, tz)}${b.readyP10 && b.readyP90 ? `, ready window ${dayAndTime(b.readyP10, tz)} to ${dayAndTime(b.readyP90, tz)}` : ''}, ${b.freeAt ? `${b.freedBy === 'emptied' ? 'emptied' : 'taken by a run'} ${dayAndTime(b.freeAt, tz)}` : 'no run booked yet'}`;
                      return (
                        <div key={b.fermentId} className={`vessel-bar vs-${b.status}${b.freeAt ? '' : ' is-open'}`} style={{ left: x0, width: Math.max(4, x1 - x0) }} title={label}>
                          {p10 !== null && p90 !== null && <span className="vessel-window" style={{ left: p10 - x0, width: Math.max(2, p90 - p10) }} />}
                          <span className="vessel-code">{b.code}</span>
                          <span className="sr-only">{label}</span>
                        </div>
                      );
                    })}
                  </div>
                </div>
              ))}
            </div>
          </div>

          <aside className="board-side" aria-label="Planning">
            <section className="side-card" aria-labelledby="risk-h">
              <h3 id="risk-h">Runs at risk <span className="count">{atRisk.length}</span></h3>
              {atRisk.length === 0 && <p className="text-sm text-ink-soft">No booked run is waiting on a late, stalled or souring wash.</p>}
              <ul className="risk-list">
                {atRisk.map(({ run, reasons }) => {
                  const sug = suggestions[run.id];
                  return (
                    <li key={run.id} className="risk-item" data-testid={`risk-${run.id}`}>
                      <button type="button" className="risk-title" onClick={() => openRun(run.id)}>
                        {RUN_TYPE_LABELS[run.type]} · {names.still(run.stillId)} · {dayAndTime(run.startsAt, tz)}
                      </button>
                      <p className="text-sm">
                        {reasons.map((x) => {
                          const f = fermentById.get(x.fermentId);
                          const why = x.why === 'stalled' ? 'has stalled' : x.why === 'souring' ? 'may be souring' : `is late (${f ? formatReadyWindow(f, tz) : ''})`;
                          return <span key={x.fermentId} className="block">Wash {x.code} {why}</span>;
                        })}
                      </p>
                      {props.canMove && !sug && <button type="button" className="btn btn-quiet" onClick={() => findSlots(run.id)}>Find earliest slots</button>}
                      {sug?.loading && <p className="text-sm">Looking for slots…</p>}
                      {sug?.error && <p className="field-error">{sug.error}</p>}
                      {sug && !sug.loading && !sug.error && (
                        <div>
                          {sug.notBefore && <p className="text-xs text-ink-soft">Not before {dayAndTime(new Date(sug.notBefore), tz)}{reasons.some((x) => x.why !== 'late') ? ` (a fresh ${board.stableDays}-day stable period)` : ' (after the ready window)'}</p>}
                          {sug.slots.length === 0 && <p className="text-sm">No free slot in the next four weeks on a still that takes this charge.</p>}
                          <ul className="slot-list">
                            {sug.slots.map((s) => (
                              <li key={`${s.stillId}-${s.startsAt.getTime()}`}>
                                <span>{names.still(s.stillId)}, {dayAndTime(s.startsAt, tz)} <span className="text-ink-soft">({shortDate(wallClock(s.startsAt, tz).ymd, wallClock(s.startsAt, tz).weekday)})</span></span>
                                <button type="button" className="btn" onClick={() => moveHere(run, { stillId: s.stillId, startsAt: s.startsAt, endsAt: s.endsAt })}>Move here</button>
                              </li>
                            ))}
                          </ul>
                        </div>
                      )}
                    </li>
                  );
                })}
              </ul>
            </section>
            <section className="side-card" aria-labelledby="wash-h">
              <h3 id="wash-h">Washes to book <span className="count">{bookable.length}</span></h3>
              <p className="text-xs text-ink-soft">Confirmed finished first, then soonest predicted. {props.canBook ? 'Drag one onto a still, or use Book.' : ''}</p>
              <ul className="wash-list">
                {bookable.map(({ ferment: f, unbookedLitres }) => (
                  <FermentChip key={f.id} ferment={f} canBook={props.canBook} onBook={bookFerment}
                    unbookedText={formatVolume(unbookedLitres, props.units)}
                    whenText={f.status === 'finished' && f.confirmedAt ? `stable since ${dayAndTime(f.confirmedAt, tz)}` : formatReadyWindow(f, tz) ?? (f.status === 'stalled' || f.status === 'souring' ? f.reason || 'no window' : 'no forecast yet')} />
                ))}
              </ul>
            </section>
            <section className="side-card legend" aria-labelledby="legend-h">
              <h3 id="legend-h">Key</h3>
              <ul className="text-sm">
                <li><span className="key key-window" /> ready window of a run's wash (10–90 %)</li>
                <li><span className="key key-before" /> run starts before its wash is ready</li>
                <li><span className="key key-inside" /> run starts inside the window</li>
                <li><span className="key key-after" /> run starts after the window</li>
                <li><span className="key key-clean" /> cleaning after a run</li>
                <li><span className="key key-closed" /> still closed</li>
              </ul>
            </section>
          </aside>
        </DndContext>
      </div>
      {dialog && (
        <RunDialog board={board} draft={dialog} units={props.units} canBook={props.canBook} canOperate={props.canOperate} busy={busy} error={dialogError}
          onClose={() => setDialog(null)} onSave={onSave} onAction={onAction} />
      )}
    </div>
  );
}

const NO_WARNINGS: Warning[] = [];
