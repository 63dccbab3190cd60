/**
 * Keyboard moves on the board: the arrow keys move a picked-up run by one slot or one still,
 * shift and an arrow by a day. Steps are counted from where the drag began, not added to the
 * drag library's current coordinates: those come from re-measured rects and can drift from
 * whole slots. The getter has the shape of dnd-kit's KeyboardCoordinateGetter.
 */

export interface Coordinates {
  x: number;
  y: number;
}

/** Pixels per step; read on every key press, so a zoom change mid-session is honoured. */
export interface KeyboardStepSizes {
  slotPx: number;
  dayPx: number;
  rowPx: number;
}

export interface BoardKeyboardCoordinates {
  /** Where the dragged item goes after this key, or undefined for a key that does not move it. */
  getter: (event: { code: string; shiftKey: boolean }, args: { currentCoordinates: Coordinates }) => Coordinates | undefined;
  /** Forget the steps of the last drag; call when a drag starts. */
  reset: () => void;
}

export function boardKeyboardCoordinates(sizes: () => KeyboardStepSizes): BoardKeyboardCoordinates {
  let origin: Coordinates | null = null;
  let x = 0;
  let y = 0;
  return {
    getter(event, { currentCoordinates }) {
      const s = sizes();
      if (!origin) origin = { ...currentCoordinates };
      switch (event.code) {
        case 'ArrowRight':
          x += event.shiftKey ? s.dayPx : s.slotPx;
          break;
        case 'ArrowLeft':
          x -= event.shiftKey ? s.dayPx : s.slotPx;
          break;
        case 'ArrowDown':
          y += s.rowPx;
          break;
        case 'ArrowUp':
          y -= s.rowPx;
          break;
        default:
          return undefined;
      }
      return { x: origin.x + x, y: origin.y + y };
    },
    reset() {
      origin = null;
      x = 0;
      y = 0;
    },
  };
}
