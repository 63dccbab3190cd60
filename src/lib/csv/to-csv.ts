/**
 * CSV export: RFC 4180 quoting with CRLF line ends, and formula-injection
 * neutralisation (OWASP CSV injection guidance): a string cell beginning with
 * = + - @ TAB or CR gets a leading single quote so spreadsheets show it as
 * text. Numbers are written as numbers (a JS number -0.003 stays -0.003).
 */

const FORMULA_START = /^[=+\-@\t\r]/;
const NEEDS_QUOTES = /[",\r\n]/;

function cellText(value: unknown): { text: string; isString: boolean } {
  if (value === null || value === undefined) return { text: '', isString: false };
  if (typeof value === 'number') return { text: Number.isFinite(value) ? String(value) : '', isString: false };
  if (typeof value === 'bigint') return { text: value.toString(), isString: false };
  if (typeof value === 'boolean') return { text: value ? 'true' : 'false', isString: false };
  if (value instanceof Date) {
    return { text: Number.isNaN(value.getTime()) ? '' : value.toISOString(), isString: false };
  }
  if (typeof value === 'string') return { text: value, isString: true };
  return { text: JSON.stringify(value) ?? '', isString: true };
}

export function csvCell(value: unknown): string {
  const { text, isString } = cellText(value);
  const safe = isString && FORMULA_START.test(text) ? `'${text}` : text;
  return NEEDS_QUOTES.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
}

export function toCsv(rows: Array<Record<string, unknown>>, columns: string[]): string {
  const lines = [columns.map((c) => csvCell(c)).join(',')];
  for (const row of rows) lines.push(columns.map((c) => csvCell(row[c])).join(','));
  return lines.map((l) => `${l}\r\n`).join('');
}
