import Papa from 'papaparse';
import { fahrenheitToCelsius } from '../units';
import { assertTimeZone, resolveLocalTime } from './local-time';
import { MAX_UPLOAD_ROWS, RAW_DEGREES_MAX, RAW_DEGREES_MIN, RAW_SG_MAX, RAW_SG_MIN, SAMPLE_TEMP_MAX_C, SAMPLE_TEMP_MIN_C } from './format';

import type { ReadingMethod, ReadingUnit, TemperatureUnit } from '../vocabulary';

/** A logger's columns speak the same units and methods as a typed-in reading. */
export type LoggerUnit = ReadingUnit;
export type LoggerMethod = ReadingMethod;
export type CsvDelimiter = ',' | ';';

export interface LoggerRow {
  line: number;
  takenAt: Date;
  value: number;
  unit: LoggerUnit;
  method: LoggerMethod;
  sampleTempC: number | null;
}

export interface RejectedLine {
  line: number;
  reason: string;
  raw: string;
}

export interface LoggerCsvFatal {
  code: 'missing_columns' | 'too_many_rows' | 'empty' | 'unreadable';
  message: string;
}

export interface LoggerCsvResult {
  rows: LoggerRow[];
  rejected: RejectedLine[];
  fatal: LoggerCsvFatal | null;
  delimiter: CsvDelimiter;
}

export interface LoggerCsvOptions {
  /** IANA zone for times written without one. */
  timeZone: string;
  /** Unit of a `temperature` / `temp` / `sample_temp` column. */
  defaultTempUnit: TemperatureUnit;
  maxRows?: number;
}

const RAW_MAX_CHARS = 200;

type Role = 'time' | 'value' | 'unit' | 'method' | 'temperature';
type TempUnit = 'default' | TemperatureUnit;

const HEADER_ROLES = new Map<string, { role: Role; tempUnit?: TempUnit }>(
  Object.entries({
    time: { role: 'time' },
    timestamp: { role: 'time' },
    taken_at: { role: 'time' },
    date: { role: 'time' },
    value: { role: 'value' },
    reading: { role: 'value' },
    gravity: { role: 'value' },
    sg: { role: 'value' },
    unit: { role: 'unit' },
    method: { role: 'method' },
    instrument: { role: 'method' },
    temperature: { role: 'temperature', tempUnit: 'default' },
    temp: { role: 'temperature', tempUnit: 'default' },
    sample_temp: { role: 'temperature', tempUnit: 'default' },
    temp_c: { role: 'temperature', tempUnit: 'C' },
    temp_f: { role: 'temperature', tempUnit: 'F' },
  } satisfies Record<string, { role: Role; tempUnit?: TempUnit }>),
);

const UNITS = new Map<string, LoggerUnit>(
  Object.entries({
    sg: 'sg',
    brix: 'brix',
    bx: 'brix',
    '°bx': 'brix',
    plato: 'plato',
    '°p': 'plato',
  } satisfies Record<string, LoggerUnit>),
);

const METHODS = new Map<string, LoggerMethod>(
  Object.entries({
    hydrometer: 'hydrometer',
    refractometer: 'refractometer',
    digital: 'digital',
  } satisfies Record<string, LoggerMethod>),
);

function normaliseHeader(cell: string): string {
  return cell
    .trim()
    .toLowerCase()
    .replace(/[\s-]+/g, '_');
}

/** Semicolon when the header line has more semicolons than commas (outside quotes). */
function detectDelimiter(text: string): CsvDelimiter {
  const firstLine = text.split('\n').find((line) => line.trim() !== '') ?? '';
  let commas = 0;
  let semicolons = 0;
  let quoted = false;
  for (const ch of firstLine) {
    if (ch === '"') quoted = !quoted;
    else if (!quoted && ch === ',') commas++;
    else if (!quoted && ch === ';') semicolons++;
  }
  return semicolons > commas ? ';' : ',';
}

const PLAIN_NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)$/;
const DECIMAL_COMMA_NUMBER = /^[+-]?\d*,\d+$/;

/** A plain decimal number, or null when the cell is not one (formulas, text, thousands separators). */
function parseNumber(cell: string, decimalComma: boolean): number | null {
  let text = cell.trim();
  if (decimalComma && DECIMAL_COMMA_NUMBER.test(text)) text = text.replace(',', '.');
  if (!PLAIN_NUMBER.test(text)) return null;
  const n = Number(text);
  return Number.isFinite(n) ? n : null;
}

const ISO_DATE_TIME = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(?:[.,](\d{1,9}))?)?\s*(Z|[+-]\d{2}(?::?\d{2})?)?$/i;

function daysInMonth(year: number, month: number): number {
  return new Date(Date.UTC(year, month, 0)).getUTCDate();
}

type TimeResult = { ok: true; date: Date } | { ok: false; reason: string };

function parseTime(cell: string, timeZone: string): TimeResult {
  const text = cell.trim();
  if (text === '') return { ok: false, reason: 'time is missing' };
  const m = ISO_DATE_TIME.exec(text);
  if (!m) return { ok: false, reason: `time "${text.slice(0, 40)}" is not an ISO 8601 date and time (YYYY-MM-DD HH:MM)` };
  const year = Number(m[1]);
  const month = Number(m[2]);
  const day = Number(m[3]);
  const hour = Number(m[4]);
  const minute = Number(m[5]);
  const second = m[6] === undefined ? 0 : Number(m[6]);
  const millisecond = m[7] === undefined ? 0 : Math.floor(Number(`0.${m[7]}`) * 1000);
  if (year < 1970 || month < 1 || month > 12 || day < 1 || day > daysInMonth(year, month) || hour > 23 || minute > 59 || second > 59) {
    return { ok: false, reason: `time "${text.slice(0, 40)}" is not a valid date and time` };
  }
  const zone = m[8];
  if (zone !== undefined) {
    let offsetMinutes = 0;
    if (zone.toUpperCase() !== 'Z') {
      const sign = zone.startsWith('-') ? -1 : 1;
      const digits = zone.slice(1).replace(':', '');
      const oh = Number(digits.slice(0, 2));
      const om = digits.length > 2 ? Number(digits.slice(2, 4)) : 0;
      if (oh > 14 || om > 59) return { ok: false, reason: `time zone offset "${zone}" is not valid` };
      offsetMinutes = sign * (oh * 60 + om);
    }
    const utc = Date.UTC(year, month - 1, day, hour, minute, second, millisecond) - offsetMinutes * 60_000;
    return { ok: true, date: new Date(utc) };
  }
  const local = resolveLocalTime({ year, month, day, hour, minute, second, millisecond }, timeZone);
  if (!local.ok) {
    return {
      ok: false,
      reason: `time "${text.slice(0, 40)}" does not exist in ${timeZone} (skipped when the clocks went forward)`,
    };
  }
  return { ok: true, date: local.instant };
}

interface ColumnMap {
  time: number;
  value: number;
  unit: number | null;
  method: number | null;
  temperature: number | null;
  tempUnit: TempUnit;
}

type HeaderResult = { ok: true; columns: ColumnMap } | { ok: false; fatal: LoggerCsvFatal };

function mapHeader(cells: string[]): HeaderResult {
  const found = new Map<Role, { index: number; name: string; tempUnit?: TempUnit }>();
  for (let index = 0; index < cells.length; index++) {
    const name = normaliseHeader(cells[index]);
    const entry = HEADER_ROLES.get(name);
    if (!entry) continue;
    const earlier = found.get(entry.role);
    if (earlier) {
      return {
        ok: false,
        fatal: {
          code: 'unreadable',
          message: `Columns "${earlier.name}" and "${name}" both give the ${entry.role}; keep only one.`,
        },
      };
    }
    found.set(entry.role, { index, name, tempUnit: entry.tempUnit });
  }
  const missing = (['time', 'value'] as const).filter((role) => !found.has(role));
  if (missing.length > 0) {
    return {
      ok: false,
      fatal: {
        code: 'missing_columns',
        message: `The header line lacks the required column${missing.length > 1 ? 's' : ''} ${missing
          .map((m) => `"${m}"`)
          .join(' and ')}. Found: ${cells.map((c) => `"${c.trim()}"`).join(', ') || 'nothing'}.`,
      },
    };
  }
  const temperature = found.get('temperature');
  return {
    ok: true,
    columns: {
      time: found.get('time')!.index,
      value: found.get('value')!.index,
      unit: found.get('unit')?.index ?? null,
      method: found.get('method')?.index ?? null,
      temperature: temperature?.index ?? null,
      tempUnit: temperature?.tempUnit ?? 'default',
    },
  };
}

const fmt1 = (n: number): string => n.toFixed(1);

function checkRow(
  cells: string[],
  columns: ColumnMap,
  headerWidth: number,
  decimalComma: boolean,
  opts: LoggerCsvOptions,
): { row: Omit<LoggerRow, 'line'> } | { reasons: string[] } {
  const reasons: string[] = [];
  // More fields than the header means the columns have shifted (often a
  // decimal comma in a comma-separated file): nothing in the line can be trusted.
  if (cells.length > headerWidth) {
    return {
      reasons: [`line has ${cells.length} fields but the header has ${headerWidth}` + (decimalComma ? '' : ' (a decimal comma in a comma-separated file?)')],
    };
  }
  const cell = (index: number | null): string => (index === null ? '' : (cells[index] ?? '').trim());

  const time = parseTime(cell(columns.time), opts.timeZone);
  if (!time.ok) reasons.push(time.reason);

  const unitText = cell(columns.unit).toLowerCase();
  const unit: LoggerUnit | undefined = unitText === '' ? 'sg' : UNITS.get(unitText);
  if (!unit) reasons.push(`unit "${cell(columns.unit).slice(0, 20)}" is not sg, brix or plato`);

  const methodText = cell(columns.method).toLowerCase();
  const method: LoggerMethod | undefined = methodText === '' ? 'digital' : METHODS.get(methodText);
  if (!method) reasons.push(`method "${cell(columns.method).slice(0, 20)}" is not hydrometer, refractometer or digital`);

  const valueText = cell(columns.value);
  const value = valueText === '' ? null : parseNumber(valueText, decimalComma);
  if (valueText === '') reasons.push('value is missing');
  else if (value === null) reasons.push(`value "${valueText.slice(0, 20)}" is not a number`);
  else if (unit === 'sg' && (value < RAW_SG_MIN || value > RAW_SG_MAX)) {
    reasons.push(`SG ${value} is outside ${RAW_SG_MIN.toFixed(3)}–${RAW_SG_MAX.toFixed(3)}`);
  } else if ((unit === 'brix' || unit === 'plato') && (value < RAW_DEGREES_MIN || value > RAW_DEGREES_MAX)) {
    reasons.push(`${unit === 'brix' ? '°Bx' : '°P'} ${value} is outside ${RAW_DEGREES_MIN} to ${RAW_DEGREES_MAX}`);
  }

  let sampleTempC: number | null = null;
  const tempText = cell(columns.temperature);
  if (tempText !== '') {
    const t = parseNumber(tempText, decimalComma);
    if (t === null) reasons.push(`temperature "${tempText.slice(0, 20)}" is not a number`);
    else {
      const unitOfColumn = columns.tempUnit === 'default' ? opts.defaultTempUnit : columns.tempUnit;
      const c = unitOfColumn === 'F' ? fahrenheitToCelsius(t) : t;
      if (c < SAMPLE_TEMP_MIN_C || c > SAMPLE_TEMP_MAX_C) {
        reasons.push(`temperature ${fmt1(c)} °C is outside ${SAMPLE_TEMP_MIN_C} to ${SAMPLE_TEMP_MAX_C} °C`);
      } else sampleTempC = c;
    }
  }

  if (reasons.length > 0 || !time.ok || value === null || !unit || !method) {
    return { reasons };
  }
  return { row: { takenAt: time.date, value, unit, method, sampleTempC } };
}

/**
 * Parses a logger CSV upload (format in LOGGER_CSV_FORMAT_DOC). Pure: no I/O.
 * Good lines come back as rows, bad ones as rejected with a reason; a problem
 * with the file as a whole comes back as fatal, with no rows.
 */
export function parseLoggerCsv(input: string, opts: LoggerCsvOptions): LoggerCsvResult {
  assertTimeZone(opts.timeZone);
  const maxRows = opts.maxRows ?? MAX_UPLOAD_ROWS;
  // One line-end convention, so file line numbers are a count of "\n".
  const text = input.replace(/^\uFEFF/, '').replace(/\r\n?/g, '\n');
  const delimiter = detectDelimiter(text);
  const fail = (code: LoggerCsvFatal['code'], message: string): LoggerCsvResult => ({
    rows: [],
    rejected: [],
    fatal: { code, message },
    delimiter,
  });

  if (text.trim() === '') return fail('empty', 'The file is empty.');
  if (text.includes('\u0000')) {
    return fail('unreadable', 'The file is not UTF-8 text (it contains NUL bytes); export it as UTF-8 CSV.');
  }

  // Assigned inside the parser callback: typed with `as` so TypeScript does
  // not narrow them to null at the declaration.
  let fatal = null as LoggerCsvFatal | null;
  let header = null as string[] | null;
  let headerLine = 1;
  const records: Array<{ line: number; cells: string[]; start: number; end: number }> = [];
  let rowStart = 0;
  let line = 1;
  let countedTo = 0;

  const lineAt = (offset: number): number => {
    for (let i = countedTo; i < offset; i++) if (text.charCodeAt(i) === 10) line++;
    countedTo = offset;
    return line;
  };

  // First pass: split into records with their file line numbers; stop at
  // broken quoting or once the row limit is passed, before any checking.
  Papa.parse<string[]>(text, {
    delimiter,
    newline: '\n',
    quoteChar: '"',
    skipEmptyLines: false,
    step: (result, parser) => {
      const start = rowStart;
      const end = result.meta.cursor;
      rowStart = end;
      const rowLine = lineAt(start);
      const cells = result.data;
      if (cells.every((c) => c.trim() === '')) return;
      if (result.errors.length > 0) {
        fatal = {
          code: 'unreadable',
          message: `Line ${rowLine}: a quoted field is not closed properly (${result.errors[0].message}); fix the quotes and upload again.`,
        };
        parser.abort();
        return;
      }
      if (header === null) {
        header = cells;
        headerLine = rowLine;
        return;
      }
      if (records.length >= maxRows) {
        fatal = {
          code: 'too_many_rows',
          message: `The file has more than ${maxRows} readings; split it into smaller files.`,
        };
        parser.abort();
        return;
      }
      records.push({ line: rowLine, cells, start, end });
    },
  });

  if (fatal) return { rows: [], rejected: [], fatal, delimiter };
  if (header === null) return fail('empty', 'The file has no header line.');
  const mapped = mapHeader(header);
  if (!mapped.ok) return { rows: [], rejected: [], fatal: mapped.fatal, delimiter };
  if (records.length === 0) return fail('empty', `The file has a header line (line ${headerLine}) but no readings.`);

  const headerWidth = header.length;
  const decimalComma = delimiter === ';';
  const rows: LoggerRow[] = [];
  const rejected: RejectedLine[] = [];
  for (const record of records) {
    const checked = checkRow(record.cells, mapped.columns, headerWidth, decimalComma, opts);
    if ('row' in checked) {
      rows.push({ line: record.line, ...checked.row });
    } else {
      const raw = text.slice(record.start, record.end).replace(/\n$/, '').trim().slice(0, RAW_MAX_CHARS);
      rejected.push({ line: record.line, reason: checked.reasons.join('; '), raw });
    }
  }
  return { rows, rejected, fatal: null, delimiter };
}
