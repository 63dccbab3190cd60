export type {
  Closure,
  FermentState,
  FermentStatus,
  OperatingHours,
  Run,
  RunFeed,
  RunFermentCharge,
  RunStatus,
  RunType,
  Still,
  TimeRange,
  Warning,
  WarningCode,
  WarningSeverity,
  Weekday,
} from './types';
export {
  addDaysYmd,
  isClosedOn,
  isPlanningDate,
  PLANNING_YEARS,
  localDatesTouched,
  moveRunPreservingWallClock,
  offsetMinutes,
  openIntervals,
  shiftRun,
  snapToSlot,
  wallClock,
  weekdayOfYmd,
  zonedDateTime,
} from './time';
export type { SnapMode, WallClock } from './time';
export { findOverlap, needsCleaningAfter, occupiedRange } from './overlap';
export type { OverlapCandidate } from './overlap';
export { computeRunWarnings, lookupFerment } from './warnings';
export { lineLitres, runChargeLitres, type ChargeSource, type LitresLine } from './charge';
export type { FermentLookup, WarningContext } from './warnings';
export { bubblePointC, estimateDurationMinutes, WASH_SPECIFIC_HEAT_KJ_PER_KG_K, WATER_DENSITY_20C_KG_PER_L } from './duration';
export type { DurationEstimate, DurationEstimateInput } from './duration';
export { findEarliestSlots } from './slots';
export type { Slot, SlotRequest } from './slots';
export { availableHours, bookedHours, idleWaitingHours } from './utilisation';
export { formatLitres, formatReadyWindow, formatWhen } from './format';
