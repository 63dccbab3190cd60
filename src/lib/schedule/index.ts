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
  closesNextDay,
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
export { findEarliestSlots, washBookingSlot } from './slots';
export type { Slot, SlotRequest, WashSlotRequest } from './slots';
export { actualHours, availableHours, bookedHours, idleWaitingHours } from './utilisation';
export { formatLitres, formatMoment, formatReadyWindow, formatWhen, formatYmd, NEAR_DAYS } from './format';
export type { MomentOptions } from './format';
export { DEFAULT_AT_RISK_THRESHOLD, earliestStartNotAtRisk, fermentRisk, fermentRisks, isAtRisk, readyQuantile, RISK_ORDER, runRisk, worseRisk } from './risk';
export type { RiskFerments, RunRisk } from './risk';
export {
  actualSpan,
  correctionProblems,
  deviationWords,
  durationWords,
  finishQuestion,
  hasActualTimes,
  overrunHours,
  startQuestions,
  timingWords,
  CLOCK_SKEW_MS,
  MAX_CORRECTION_DAYS,
  MIN_RUN_MINUTES,
} from './actual-times';
export type { CorrectionInput, StartCheckInput, TimedRun } from './actual-times';
