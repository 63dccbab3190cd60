export { forecastFerment } from './forecast';
export { stabilityCheck, firstRuleMet, dailyLevels, isDense, ruleSeriesOf, earliestPossibleStart, robustSpread, FLOAT_EPSILON } from './stability';
export type { StabilityOptions, StabilityResult, DailyLevel, TimedValue } from './stability';
export { fitModel, logisticAt, firstOrderAt, modelAt } from './fit';
export type { ModelKind, ModelFit, FitData, FitOptions, Prior } from './fit';
export type { Forecast, ForecastHistoryUse, ForecastInput, ForecastStatus, Reading, TerminalRange, FittedCurve } from './types';
export { CALIBRATION } from './calibration';
