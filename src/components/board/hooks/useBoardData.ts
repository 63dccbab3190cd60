/**
 * The board's data: the window the zoom and date show, the board loaded for it (reloaded when
 * the window changes, after every change we make, and every 30 seconds while no drag is under
 * way and the tab is visible), the zoom and date kept in the address bar, and the lookups the
 * rest of the island reads.
 */
import { useCallback, useEffect, useMemo, useRef, useState, type RefObject } from 'react';
import { boardWarnings, boardWindow, hydrateBoard, ZOOMS, type Board, type BoardPayload, type BoardWindow, type Zoom } from '../../../lib/board';
import { api } from '../api';

const REFRESH_MS = 30_000;

export interface BoardNames {
  still: (id: number) => string;
  person: (id: number | null) => string;
}

export function useBoardData(options: {
  initial: BoardPayload;
  zoom: Zoom;
  anchor: string;
  /** True while a drag is under way: the periodic reload waits. */
  paused: RefObject<boolean>;
  onError: (message: string) => void;
}) {
  const { paused, onError } = options;
  const [board, setBoard] = useState<Board>(() => hydrateBoard(options.initial));
  const [zoom, setZoom] = useState<Zoom>(options.zoom);
  const [anchor, setAnchor] = useState(options.anchor);
  const requestNo = useRef(0);

  const tz = board.timeZone;
  const spec = ZOOMS[zoom];
  const win = useMemo(() => boardWindow(anchor, zoom, tz), [anchor, zoom, tz]);
  const stillIds = useMemo(() => board.stills.map((s) => s.id), [board.stills]);
  const stillById = useMemo(() => new Map(board.stills.map((s) => [s.id, s])), [board.stills]);
  const fermentById = useMemo(() => new Map(board.ferments.map((f) => [f.id, f])), [board.ferments]);
  const personById = useMemo(() => new Map(board.people.map((p) => [p.id, p])), [board.people]);
  const warnings = useMemo(() => boardWarnings(board), [board]);
  const names = useMemo<BoardNames>(
    () => ({
      still: (id: number) => stillById.get(id)?.name ?? 'a retired still',
      person: (id: number | null) => (id === null ? 'nobody' : (personById.get(id)?.name ?? 'someone')),
    }),
    [stillById, personById],
  );

  // Every refresh but the periodic one follows something we did, so it asks for fresh data.
  const refresh = useCallback(
    async (w: BoardWindow = win, fresh = true) => {
      const mine = ++requestNo.current;
      const res = await api.board(w.start, w.end, fresh);
      if (mine !== requestNo.current) return;
      if (res.ok) setBoard(hydrateBoard(res.data, new Date()));
      else onError(res.error.message);
    },
    [win],
  );

  useEffect(() => {
    const url = new URL(window.location.href);
    url.searchParams.set('zoom', zoom);
    url.searchParams.set('date', anchor);
    window.history.replaceState(null, '', url);
  }, [zoom, anchor]);

  const firstLoad = useRef(true);
  useEffect(() => {
    if (firstLoad.current) {
      firstLoad.current = false;
      return;
    }
    void refresh(win, false);
  }, [win]);

  useEffect(() => {
    const t = window.setInterval(() => {
      if (!paused.current && document.visibilityState === 'visible') void refresh(undefined, false);
    }, REFRESH_MS);
    return () => window.clearInterval(t);
  }, [refresh]);

  return { board, setBoard, zoom, setZoom, anchor, setAnchor, tz, spec, win, stillIds, stillById, fermentById, personById, warnings, names, refresh };
}

export type BoardData = ReturnType<typeof useBoardData>;
