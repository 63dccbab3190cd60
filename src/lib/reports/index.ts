export { quantileSorted, median, mean, spreadOf } from './stats';
export type { Spread } from './stats';
export { isoWeekOfYmd, isoWeekOf, mondayOf, monthOf, weeksIn } from './periods';
export type { WeekSlice } from './periods';
export {
  FRACTION_LABELS,
  FRACTIONS_BY_RUN_TYPE,
  MAX_VOLUME_CAPACITY_FACTOR,
  ALCOHOLMETER_MIN,
  ALCOHOLMETER_MAX,
  READING_TEMP_MIN_C,
  READING_TEMP_MAX_C,
  CUT_NOTE_MAX,
  EXPECTED_LAA_FORMULA,
  computeFraction,
  validateRunRecord,
  sumLaa,
  chargedLaa,
  recoveryRatio,
  expectedLaaFromFerments,
  expectedLaaFromFeeds,
} from './recovery';
export type { Fraction, RecordableRunType, FractionInput, FractionResult, ChargeInput, FieldErrors, FermentCharge, FeedShare } from './recovery';
export {
  utilisationByStillWeek,
  cycleTimes,
  troubleRates,
  accuracyPoints,
  accuracyByMonth,
  throughputByWeek,
  yieldPerTonne,
  YIELD_FORMULA,
  ACCURACY_LEAD_HOURS,
  ACCURACY_LEAD_TOLERANCE_HOURS,
} from './analytics';
export type {
  UtilisationRow,
  CycleInput,
  CycleRow,
  OutcomeStatusInput,
  TroubleRate,
  HistoryPoint,
  AccuracyInput,
  AccuracyPoint,
  AccuracyMonth,
  ThroughputRunInput,
  ThroughputWeek,
  StrippingShare,
  YieldInput,
  YieldRow,
} from './analytics';
