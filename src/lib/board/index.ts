export type { Board, BoardFerment, BoardFermentJson, BoardPayload, BoardRun, BoardRunJson, BoardStill, StillKind } from './types';
export {
  ZOOMS, isZoom, mondayOf, boardWindow, shiftAnchor, xOf, timeAtX, widthOf, moveTarget, resizeTarget, slotAtX, hourMarks,
} from './timeline';
export type { Zoom, ZoomSpec, BoardDay, BoardWindow, MoveInput, MoveTarget } from './timeline';
export {
  RUN_TYPE_LABELS, RUN_STATUS_LABELS, WEEKDAY_NAMES, dayAndTime, shortDate, movedMessage, overMessage, pickedUpMessage,
  cancelledDragMessage, describeChanges,
} from './words';
export type { ComparableRun } from './words';
export {
  hydrateRun, dehydrateRun, hydrateFerment, hydrateBoard, toScheduleRun, toFermentState, toScheduleStill, boardWarnings,
  windowPlacement, bookedLitres, bookableFerments, runsAtRisk, notBeforeForRisk, vesselBars, DEFAULT_CHARGE_ABV, defaultRunMinutes,
} from './planning';
export type { WindowPlacement, BookableFerment, RunAtRisk, VesselBar } from './planning';
export { SAFETY_CAUTIONS } from './safety';
