/**
 * The one input for a typed number. It is a text input with the decimal keyboard (a number
 * input would let the browser guess the locale), read by the distillery's number format as the
 * person types: beside it, "= 1,200 L" says how the number was understood, or the refusal says
 * what could not be read ("1,2 — did you mean 1.2? …"). Forms read the same text with
 * `readNumber` before saving and refuse to send while a field cannot be read.
 *
 *   <NumberField id="fv-cap" value={text} onValueChange={setText} format={numberFormat} unit="L" />
 *   const cap = readNumber(text, numberFormat);   // { ok: true, value } | { ok: false, message }
 */
import { useState, type InputHTMLAttributes } from 'react';
import { formatTypedNumber, parseTypedNumber, type NumberFormat, type TypedNumberOptions } from '../../lib/units/typed-number';

export type { NumberFormat };

export interface NumberFieldProps extends Omit<InputHTMLAttributes<HTMLInputElement>, 'value' | 'onChange' | 'type' | 'inputMode'> {
  id: string;
  /** The text as typed. */
  value: string;
  onValueChange: (text: string) => void;
  format: NumberFormat;
  /** Unit printed after the understood value ("L", "SG", "°C", "% ABV"). */
  unit?: string;
  /** Decimals of the understood value (default: as many as typed). */
  decimals?: number;
  /** A minus is accepted (default false: most quantities cannot be negative). */
  negative?: boolean;
  /** Thousands separators are accepted (default true; false for gravity, pH, ABV, temperatures). */
  grouping?: boolean;
  /** Render the understood value and refusal (default true). */
  echo?: boolean;
}

export type ReadNumber = { ok: true; value: number | null } | { ok: false; message: string };

/** Read a field's text for saving: empty is null, anything the format cannot read is refused. */
export function readNumber(text: string, format: NumberFormat, options: TypedNumberOptions = {}): ReadNumber {
  const r = parseTypedNumber(text, format, { negative: false, ...options });
  if (r.ok) return r;
  if (r.empty) return { ok: true, value: null };
  return { ok: false, message: r.message };
}

/** What a form says when it refuses to send: the refusal itself is already beside the field. */
export const NOT_READ_MESSAGE = 'Not saved: a number could not be read (see the note beside it).';

/**
 * Before sending: the first field whose text cannot be read is focused (its refusal is beside
 * it) and the form's message is returned; null when every field reads.
 */
export function refuseUnread(fields: Array<[inputId: string, read: ReadNumber]>): string | null {
  const first = fields.find(([, r]) => !r.ok);
  if (!first) return null;
  const input = typeof document === 'undefined' ? null : document.getElementById(first[0]);
  input?.scrollIntoView({ block: 'center' });
  input?.focus({ preventScroll: true });
  return NOT_READ_MESSAGE;
}

/**
 * Before sending a form whose numbers are held as numbers (not text): the first NumberField in
 * `root` whose text cannot be read is focused and the form's message returned; null when all read.
 */
export function refusedIn(root: ParentNode | null | undefined): string | null {
  const note = root?.querySelector<HTMLElement>('[data-refused]');
  if (!note) return null;
  const input = note.id ? document.querySelector<HTMLInputElement>(`[aria-describedby~="${CSS.escape(note.id)}"]`) : null;
  input?.scrollIntoView({ block: 'center' });
  input?.focus({ preventScroll: true });
  return NOT_READ_MESSAGE;
}

/**
 * The refusal for a field's text, for forms that show it somewhere else than beside the input
 * (NumberField with echo={false}, e.g. three narrow inputs in a row): null when it reads or is empty.
 */
export function refusalOf(text: string, format: NumberFormat, options: TypedNumberOptions = {}): string | null {
  const r = readNumber(text, format, options);
  return r.ok ? null : r.message;
}

/** A stored number written back into a field, in the distillery's format (no grouping, so it reads back exactly). */
export function typedText(value: number | null | undefined, format: NumberFormat, decimals?: number): string {
  return value == null || !Number.isFinite(value) ? '' : formatTypedNumber(value, format, decimals, { grouping: false });
}

/** Decimals as typed ("1.050" has 3), so the understood value keeps the zeros a gravity is read with. */
function typedDecimals(text: string, format: NumberFormat): number {
  const mark = format === 'comma' ? ',' : '.';
  const at = text.trim().lastIndexOf(mark);
  return at < 0 ? 0 : Math.min(text.trim().length - at - 1, 6);
}

export default function NumberField({
  id,
  value,
  onValueChange,
  format,
  unit,
  decimals,
  negative = false,
  grouping = true,
  echo = true,
  className = 'input',
  ...rest
}: NumberFieldProps) {
  const parsed = parseTypedNumber(value, format, { negative, grouping });
  const refused = !parsed.ok && !parsed.empty;
  const noteId = `${id}-understood`;
  const shown = parsed.ok
    ? `= ${formatTypedNumber(parsed.value, format, decimals ?? typedDecimals(value, format))}${unit ? ` ${unit}` : ''}`
    : refused
      ? parsed.message
      : '';
  const describedBy = [echo && shown ? noteId : null, rest['aria-describedby']].filter(Boolean).join(' ') || undefined;
  return (
    <>
      <input
        {...rest}
        id={id}
        type="text"
        inputMode="decimal"
        autoComplete="off"
        spellCheck={false}
        className={className}
        value={value}
        onChange={(e) => onValueChange(e.target.value)}
        aria-describedby={describedBy}
        aria-invalid={refused || rest['aria-invalid'] ? true : undefined}
        data-number-format={format}
      />
      {echo && shown ? (
        <span
          id={noteId}
          className={refused ? 'field-error block' : 'block text-sm text-ink-soft tabular-nums'}
          data-testid={`${id}-understood`}
          data-refused={refused ? '' : undefined}
        >
          {shown}
        </span>
      ) : null}
    </>
  );
}

/**
 * A NumberField bound to a number (for forms that keep numbers, not text, in their state): it
 * keeps what is typed, and reports the number each time the text reads (null when emptied).
 * While the text cannot be read the last number stands and the refusal is shown; the form
 * checks `refusedIn(form)` before sending.
 */
export function NumberValueField({
  number,
  onNumber,
  decimals,
  ...rest
}: Omit<NumberFieldProps, 'value' | 'onValueChange'> & { number: number | null; onNumber: (n: number | null) => void }) {
  const [text, setText] = useState(() => typedText(number, rest.format, decimals));
  return (
    <NumberField
      {...rest}
      decimals={decimals}
      value={text}
      onValueChange={(t) => {
        setText(t);
        const r = readNumber(t, rest.format, { negative: rest.negative ?? false, grouping: rest.grouping ?? true });
        if (r.ok) onNumber(r.value);
      }}
    />
  );
}
