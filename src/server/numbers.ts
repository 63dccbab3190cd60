/**
 * Numbers sent to the API. JSON numbers stay numbers. A string where a number is expected (a
 * form post, a hand-written client) is read only when it is unambiguous in plain form
 * ("1200", "1200.5", "-3"); "1,200", "1.200,5", "1 200" or "12,5" are refused with a 400 naming
 * the field and saying what the number probably was, never read as 1.2. Where thousands can occur
 * (volumes, capacities), "2.000" is refused too: it is 2 to one reader and 2000 to another. The islands and the
 * settings form read what people type by the distillery's number format
 * (src/lib/units/typed-number.ts) and send plain numbers.
 */
import { z } from 'zod';
import { parseTypedNumber } from '../lib/units/typed-number';

const PLAIN = /^-?\d+(\.\d+)?$/;
/** "2.000", "1.500": a decimal point to a point-format reader, a thousands mark to a comma-format one. */
const AMBIGUOUS = /^-?\d{1,3}\.\d{3}$/;

/** The "did you mean" text for a number sent as a string that is not in plain form. */
export function plainNumberMessage(text: string, grouping = true): string {
  const shown = text.trim().slice(0, 40);
  // Plain form is what a point-format distillery types; guess from that reading first
  // (without thousands for gravities and the like, so "1,050" suggests 1.05, not 1050).
  const guess = parseTypedNumber(shown, 'point', { grouping });
  const value = guess.ok ? guess.value : guess.suggestion;
  if (value !== undefined) return `${shown} — did you mean ${value}? Send numbers without grouping marks, with a decimal point (e.g. 1200.5).`;
  return `${shown} is not a number: send it without grouping marks, with a decimal point (e.g. 1200.5).`;
}

/**
 * Wraps a number schema so that a plain-form string is read as its number and any other string
 * is refused with the "did you mean" message. Use it around every typed quantity
 * (`grouping: false` for quantities without thousands: gravities, pH, strengths, temperatures):
 *   capacity: typedNumber(z.number({ error: '…' }).positive('…'))
 *   og: typedNumber(z.number().min(1).max(1.2), { grouping: false })
 */
export function typedNumber<T extends z.ZodType<number>>(schema: T, options: { grouping?: boolean } = {}) {
  return z.preprocess((input, ctx) => {
    if (typeof input !== 'string') return input;
    const text = input.trim();
    if ((options.grouping ?? true) && AMBIGUOUS.test(text)) {
      const thousands = Number(text.replace('.', ''));
      ctx.addIssue({
        code: 'custom',
        message: `${text} could be ${Number(text)} or ${thousands}: send it without the point, or as a JSON number.`,
        input,
      });
      return z.NEVER;
    }
    if (PLAIN.test(text)) return Number(text);
    if (text === '') return input; // the number schema names an empty field in its own words
    ctx.addIssue({ code: 'custom', message: plainNumberMessage(text, options.grouping ?? true), input });
    return z.NEVER;
  }, schema);
}
