export type { Board, BoardFerment, BoardFermentJson, BoardPayload, BoardRun, BoardRunJson, BoardStill, StillKind } from './types';
export { ZOOMS, isZoom, mondayOf, boardWindow, shiftAnchor, xOf, timeAtX, moveTarget, resizeTarget, slotAtX, hourMarks } from './timeline';
export type { Zoom, ZoomSpec, BoardDay, BoardWindow, MoveInput, MoveTarget } from './timeline';
export {
  RUN_TYPE_LABELS,
  RUN_STATUS_LABELS,
  WEEKDAY_NAMES,
  dayAndTime,
  shortDate,
  movedMessage,
  overMessage,
  pickedUpMessage,
  cancelledDragMessage,
  describeChanges,
} from './words';
export type { ComparableRun } from './words';
export {
  hydrateRun,
  dehydrateRun,
  hydrateFerment,
  hydrateBoard,
  toScheduleRun,
  toFermentState,
  toScheduleStill,
  boardWarnings,
  windowPlacement,
  bookedLitres,
  bookableFerments,
  runsAtRisk,
  notBeforeForRisk,
  vesselBars,
  DEFAULT_CHARGE_ABV,
  defaultRunMinutes,
} from './planning';
export type { WindowPlacement, BookableFerment, RunAtRisk, VesselBar } from './planning';
export { SAFETY_CAUTIONS } from './safety';
export {
  LABEL_WIDTH,
  ROW_HEIGHT,
  VESSEL_ROW_HEIGHT,
  HEADER_HEIGHT,
  canvasWidth,
  slotWidth,
  dayWidth,
  initials,
  runsByStill,
  closedSpans,
  readyWindowSpans,
  runBlockLayout,
  vesselBarLayout,
  dropGhostBox,
  rangeLabel,
  pageName,
  axisDayLabel,
  axisTicks,
  initialScrollLeft,
} from './geometry';
export type { Span, ReadyWindowSpan, RunBlockLayout, RunBlockContext, VesselBarLayout } from './geometry';
export { boardKeyboardCoordinates } from './keyboard';
export type { Coordinates, KeyboardStepSizes, BoardKeyboardCoordinates } from './keyboard';
export { firstHit } from './collision';
export { fermentDraftRun, firstBookableHour, fermentBooking } from './drafts';
