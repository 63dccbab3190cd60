export { parseLoggerCsv } from './parse';
export type { LoggerRow, RejectedLine, LoggerCsvFatal, LoggerCsvResult, LoggerCsvOptions, LoggerUnit, LoggerMethod, CsvDelimiter } from './parse';
export { toCsv, csvCell } from './to-csv';
export { resolveLocalTime } from './local-time';
export type { WallClock, LocalTimeResult } from './local-time';
export {
  LOGGER_CSV_FORMAT_DOC,
  MAX_UPLOAD_BYTES,
  MAX_UPLOAD_ROWS,
  RAW_SG_MIN,
  RAW_SG_MAX,
  RAW_DEGREES_MIN,
  RAW_DEGREES_MAX,
  SAMPLE_TEMP_MIN_C,
  SAMPLE_TEMP_MAX_C,
} from './format';
