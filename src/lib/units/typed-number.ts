/**
 * Numbers as people type them, read by the distillery's number format (workspace setting).
 *
 * - `point`: "1200.5", "1,200.5", "1 200.5" are one thousand two hundred and a half.
 * - `comma`: "1200,5", "1.200,5", "1 200,5" are the same number.
 *
 * Grouping separators (the other mark, a space, a no-break space U+00A0 or a narrow no-break
 * space U+202F) are accepted only between whole groups of three digits, so in point format
 * "1,200" IS 1200 while "1,2" is refused ("did you mean 1.2?"); in comma format "1,2" is 1.2 and
 * "1.200" is 1200, while "1.2" is refused ("did you mean 1,2?"). A number that the other format
 * would read gets a "did you mean" in this distillery's own format; anything else is refused with
 * an example. Nothing here ever reads "1,200" as 1.2 in point format.
 *
 * Fields where thousands never occur (gravity, pH, ABV, temperatures) pass `grouping: false`: there
 * "1.050" typed in comma format is refused with "did you mean 1,050?" instead of read as 1050.
 */
import type { NumberFormat } from '../vocabulary';

export type { NumberFormat };

export type TypedNumber = { ok: true; value: number } | { ok: false; message: string; empty?: boolean; suggestion?: number };

export interface TypedNumberOptions {
  /** May the number be negative (a leading "-" or "−")? Default true. */
  negative?: boolean;
  /** Are thousands separators accepted? Default true. */
  grouping?: boolean;
}

/** Longest text read as a number: far more digits than any quantity at a distillery has. */
const MAX_LENGTH = 40;
/** Spaces accepted as grouping: space, no-break space, narrow no-break space, thin space. */
const SPACES = /[ \u00a0\u202f\u2009]/g;

const DECIMAL: Record<NumberFormat, string> = { point: '.', comma: ',' };
const GROUP: Record<NumberFormat, string> = { point: ',', comma: '.' };
const FORMAT_WORDS: Record<NumberFormat, string> = { point: 'with a point', comma: 'with a comma' };
const FORMAT_EXAMPLE: Record<NumberFormat, string> = { point: '1,200.5', comma: '1.200,5' };

const escape = (c: string) => c.replace(/[.]/g, '\\.');

interface Strict {
  negative: boolean;
  /** Whole-number digits without grouping marks ("" for ".5"). */
  whole: string;
  /** Fraction digits as typed ("" when none). */
  frac: string;
  value: number;
}

/** The strict reading of one format; null when the text does not fit it. */
function readStrict(text: string, format: NumberFormat, grouping: boolean): Strict | null {
  const dec = escape(DECIMAL[format]);
  const grp = escape(GROUP[format]);
  // A grouping mark is the format's own mark or a space (all spaces were normalised to " ").
  const groupMark = grouping ? `(?:${grp}| )` : '(?!)';
  const re = new RegExp(`^([-\u2212])?(?:(\\d{1,3}(?:${groupMark}\\d{3})+)|(\\d+))?(?:${dec}(\\d*))?$`);
  const m = re.exec(text);
  if (!m) return null;
  const [, sign, grouped, plain, frac = ''] = m;
  const whole = (grouped ?? plain ?? '').replace(/\D/g, '');
  if (!whole && !frac) return null; // "", "-", "." alone
  if (grouped && new Set(grouped.replace(/\d/g, '')).size > 1) return null; // "1,200 300" mixes marks
  const value = Number(`${whole || '0'}.${frac || '0'}`);
  if (!Number.isFinite(value)) return null;
  return { negative: !!sign, whole, frac, value: sign ? -value : value };
}

/** "1,2 — did you mean 1.2? (this distillery writes decimals with a point)" and its kin. */
function refusal(text: string, format: NumberFormat, guess?: Strict): TypedNumber {
  if (guess) {
    // Written from the digits as typed, so "1.050" in comma format suggests "1,050", not "1,05".
    const shown = `${guess.negative ? '-' : ''}${guess.whole || '0'}${guess.frac ? DECIMAL[format] + guess.frac : ''}`;
    return {
      ok: false,
      suggestion: guess.value,
      message: `${text} — did you mean ${shown}? (this distillery writes decimals ${FORMAT_WORDS[format]})`,
    };
  }
  return { ok: false, message: `${text} is not a number this distillery can read (decimals ${FORMAT_WORDS[format]}, e.g. ${FORMAT_EXAMPLE[format]}).` };
}

/**
 * Read a typed number by the distillery's format. Returns the value, or a message that quotes
 * what was typed and, when the text reads as a number some other way, the likely meaning.
 */
export function parseTypedNumber(text: string, format: NumberFormat, options: TypedNumberOptions = {}): TypedNumber {
  const negativeAllowed = options.negative ?? true;
  const grouping = options.grouping ?? true;
  const shown = String(text ?? '').trim();
  if (shown === '') return { ok: false, empty: true, message: 'Enter a number.' };
  if (shown.length > MAX_LENGTH) return { ok: false, message: 'That is too long to be a number.' };
  const normal = shown.replace(SPACES, ' ');
  const read = readStrict(normal, format, grouping);
  if (read) {
    if (read.negative && read.value !== 0 && !negativeAllowed) return { ok: false, message: `${shown} — this cannot be below zero.` };
    return { ok: true, value: read.value === 0 ? 0 : read.value };
  }
  // Not this format: would the other format read it (or this one, were grouping allowed)?
  const other: NumberFormat = format === 'point' ? 'comma' : 'point';
  const guess = readStrict(normal, other, grouping) ?? readStrict(normal, other, true);
  if (guess && (negativeAllowed || !guess.negative)) return refusal(shown, format, guess);
  return refusal(shown, format);
}

/**
 * A number written in the distillery's format: `decimals` fixed places (or as many as it has,
 * up to 6, when omitted), thousands grouped unless `grouping: false` (values put back into an
 * input are written ungrouped so they read back exactly).
 */
export function formatTypedNumber(value: number, format: NumberFormat, decimals?: number, options: { grouping?: boolean } = {}): string {
  if (!Number.isFinite(value)) return '';
  const grouping = options.grouping ?? true;
  const fixed = decimals === undefined ? String(Math.round(value * 1e6) / 1e6) : value.toFixed(decimals);
  if (/e/i.test(fixed)) return String(value); // beyond 1e21: no quantity at a distillery
  const negative = fixed.startsWith('-');
  const [whole = '0', frac] = fixed.replace('-', '').split('.');
  const isZero = /^[0.]*$/.test(fixed.replace('-', ''));
  const grouped = grouping ? whole.replace(/\B(?=(\d{3})+(?!\d))/g, GROUP[format]) : whole;
  return `${negative && !isZero ? '-' : ''}${grouped}${frac ? DECIMAL[format] + frac : ''}`;
}
