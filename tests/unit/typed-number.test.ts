/**
 * Typed numbers read by the distillery's number format. The outside reference for how each
 * format writes numbers is the platform's CLDR data through Intl.NumberFormat: 'en-GB' writes
 * the point format (1,234.5), 'de-DE' the comma format (1.234,5). Every string Intl writes must
 * read back to its number; the refusals and their "did you mean" are the product's rule
 * (src/lib/units/typed-number.ts).
 */
import { describe, expect, it } from 'vitest';
import { formatTypedNumber, parseTypedNumber, type NumberFormat } from '../../src/lib/units/typed-number';

const LOCALE: Record<NumberFormat, string> = { point: 'en-GB', comma: 'de-DE' };
const VALUES = [0, 1, 12, 999, 1000, 1200, 1200.5, 12345.678, 1234567.891, 0.5, 1.06, 0.99, 3785.411784, -5, -1200.25, 250000];

describe.each(['point', 'comma'] as const)('Intl.NumberFormat(%s locale) output reads back exactly', (format) => {
  it.each(VALUES)('%s', (value) => {
    const decimals = (String(value).split('.')[1] ?? '').length;
    const nf = new Intl.NumberFormat(LOCALE[format], { minimumFractionDigits: decimals, maximumFractionDigits: decimals });
    const written = nf.format(value).replace('\u2212', '-');
    expect(parseTypedNumber(written, format)).toEqual({ ok: true, value });
    // And we write it as Intl does (grouping and decimal mark of the locale).
    expect(formatTypedNumber(value, format, decimals)).toBe(written);
    // Ungrouped, as an input's value is written, it reads back too.
    expect(parseTypedNumber(formatTypedNumber(value, format, decimals, { grouping: false }), format)).toEqual({ ok: true, value });
  });
});

describe('point format (decimals with a point, en-GB)', () => {
  it.each([
    ['1200', 1200],
    ['1,200', 1200],
    ['1,200.5', 1200.5],
    ['12,345,678.9', 12345678.9],
    ['1 200', 1200],
    ['1\u00a0200,', null],
    ['1\u202f200.25', 1200.25],
    ['1.5', 1.5],
    ['.5', 0.5],
    ['5.', 5],
    ['-3.5', -3.5],
    ['\u22123.5', -3.5],
    ['  42  ', 42],
    ['-0', 0],
  ])('reads %j as %s', (text, expected) => {
    const r = parseTypedNumber(text, 'point');
    if (expected === null) expect(r.ok).toBe(false);
    else expect(r).toEqual({ ok: true, value: expected });
  });

  it.each([
    ['1,2', '1,2 — did you mean 1.2? (this distillery writes decimals with a point)', 1.2],
    ['1,20', '1,20 — did you mean 1.20? (this distillery writes decimals with a point)', 1.2],
    ['12,5', '12,5 — did you mean 12.5? (this distillery writes decimals with a point)', 12.5],
    ['1.200,5', '1.200,5 — did you mean 1200.5? (this distillery writes decimals with a point)', 1200.5],
    ['0,75', '0,75 — did you mean 0.75? (this distillery writes decimals with a point)', 0.75],
  ])('refuses %j with %j', (text, message, suggestion) => {
    expect(parseTypedNumber(text, 'point')).toEqual({ ok: false, message, suggestion });
  });
});

describe('comma format (decimals with a comma, de-DE)', () => {
  it.each([
    ['1200', 1200],
    ['1,2', 1.2],
    ['1,200', 1.2],
    ['1.200', 1200],
    ['1.200,5', 1200.5],
    ['1 200,5', 1200.5],
    ['1\u202f234\u202f567,891', 1234567.891],
    ['-0,5', -0.5],
    [',5', 0.5],
  ])('reads %j as %s', (text, expected) => {
    expect(parseTypedNumber(text, 'comma')).toEqual({ ok: true, value: expected });
  });

  it.each([
    ['1.2', '1.2 — did you mean 1,2? (this distillery writes decimals with a comma)', 1.2],
    ['1,200.5', '1,200.5 — did you mean 1200,5? (this distillery writes decimals with a comma)', 1200.5],
    ['12.50', '12.50 — did you mean 12,50? (this distillery writes decimals with a comma)', 12.5],
  ])('refuses %j with %j', (text, message, suggestion) => {
    expect(parseTypedNumber(text, 'comma')).toEqual({ ok: false, message, suggestion });
  });
});

describe('refusals without a reading', () => {
  it.each([
    ['1,200.5.3', 'point'],
    ['1.200,5,3', 'comma'],
    ['1,200 300', 'point'],
    ['1,2,3', 'point'],
    ['1٫5', 'point'],
    ['1e3', 'point'],
    ['0x10', 'point'],
    ['Infinity', 'comma'],
    ['NaN', 'point'],
    ['12 kg', 'point'],
    ['--3', 'point'],
    ['3-', 'comma'],
    ['1,,200', 'point'],
  ] as const)('%j in %s format', (text, format) => {
    const r = parseTypedNumber(text, format);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.message).toContain(text);
      expect(r.suggestion).toBeUndefined();
    }
  });

  it('marks empty input as empty', () => {
    expect(parseTypedNumber('   ', 'point')).toMatchObject({ ok: false, empty: true });
  });

  it('refuses a minus where the field allows none', () => {
    expect(parseTypedNumber('-3', 'point', { negative: false })).toMatchObject({ ok: false, message: '-3 — this cannot be below zero.' });
    expect(parseTypedNumber('3', 'point', { negative: false })).toEqual({ ok: true, value: 3 });
  });
});

describe('fields without thousands (gravity, pH, ABV): grouping off', () => {
  it.each([
    ['1.050', 'comma', '1.050 — did you mean 1,050? (this distillery writes decimals with a comma)', 1.05],
    ['1,050', 'point', '1,050 — did you mean 1.050? (this distillery writes decimals with a point)', 1.05],
  ] as const)('%j in %s format is refused: %j', (text, format, message, suggestion) => {
    expect(parseTypedNumber(text, format, { grouping: false })).toEqual({ ok: false, message, suggestion });
  });
  it.each([
    ['1,050', 'comma', 1.05],
    ['1.050', 'point', 1.05],
  ] as const)('%j in %s format reads as %s', (text, format, value) => {
    expect(parseTypedNumber(text, format, { grouping: false })).toEqual({ ok: true, value });
  });
});

describe('formatTypedNumber', () => {
  it.each([
    [1200, 'point', 0, '1,200'],
    [1200, 'comma', 0, '1.200'],
    [1.06, 'comma', 3, '1,060'],
    [-0.0001, 'point', 2, '0.00'],
    [1234567.891, 'comma', 3, '1.234.567,891'],
  ] as const)('%s in %s format with %s decimals is %j', (value, format, decimals, text) => {
    expect(formatTypedNumber(value, format, decimals)).toBe(text);
  });
  it('writes as many decimals as the value has when none are given', () => {
    expect(formatTypedNumber(1200.5, 'comma')).toBe('1.200,5');
    expect(formatTypedNumber(1.012, 'point', undefined, { grouping: false })).toBe('1.012');
  });
});
