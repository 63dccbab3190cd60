import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import Papa from 'papaparse';
import { afterEach, describe, expect, it } from 'vitest';
import { LOGGER_CSV_FORMAT_DOC, MAX_UPLOAD_BYTES, MAX_UPLOAD_ROWS, parseLoggerCsv, toCsv, type LoggerCsvOptions } from '../../src/lib/csv';

const fixture = (name: string): string => readFileSync(fileURLToPath(new URL(`../fixtures/csv/${name}`, import.meta.url)), 'utf8');

const london: LoggerCsvOptions = { timeZone: 'Europe/London', defaultTempUnit: 'C' };
const iso = (d: Date): string => d.toISOString();

describe('limits', () => {
  it('are 5 MB and 50,000 readings', () => {
    expect(MAX_UPLOAD_BYTES).toBe(5 * 1024 * 1024);
    expect(MAX_UPLOAD_ROWS).toBe(50000);
  });

  it('the format document names every column spelling and the limits', () => {
    for (const word of [
      'time',
      'timestamp',
      'taken_at',
      'value',
      'reading',
      'gravity',
      'unit',
      'method',
      'instrument',
      'temp_c',
      'temp_f',
      'sample_temp',
      '50,000',
      '5 MB',
      'first occurrence',
    ]) {
      expect(LOGGER_CSV_FORMAT_DOC).toContain(word);
    }
  });
});

describe('parseLoggerCsv: well-formed files', () => {
  it('comma file with all columns', () => {
    const result = parseLoggerCsv(fixture('comma.csv'), london);
    expect(result.fatal).toBeNull();
    expect(result.delimiter).toBe(',');
    expect(result.rejected).toEqual([]);
    expect(result.rows.map((r) => ({ ...r, takenAt: iso(r.takenAt) }))).toEqual([
      { line: 2, takenAt: '2026-11-03T08:00:00.000Z', value: 1.072, unit: 'sg', method: 'hydrometer', sampleTempC: 21.5 },
      { line: 3, takenAt: '2026-11-03T14:00:00.000Z', value: 1.064, unit: 'sg', method: 'digital', sampleTempC: null },
      { line: 4, takenAt: '2026-11-03T20:00:00.000Z', value: 14.2, unit: 'brix', method: 'refractometer', sampleTempC: null },
      { line: 5, takenAt: '2026-11-04T08:00:00.000Z', value: 12.1, unit: 'plato', method: 'hydrometer', sampleTempC: 19 },
    ]);
  });

  it('semicolon file with decimal commas, CRLF, other header spellings and a blank line', () => {
    const result = parseLoggerCsv(fixture('semicolon-decimal-comma.csv'), london);
    expect(result.fatal).toBeNull();
    expect(result.delimiter).toBe(';');
    expect(result.rejected).toEqual([]);
    // November in London is GMT (UTC+0).
    expect(result.rows.map((r) => [r.line, iso(r.takenAt), r.value, r.unit, r.method, r.sampleTempC])).toEqual([
      [2, '2026-11-03T08:00:00.000Z', 1.072, 'sg', 'hydrometer', 21.5],
      [3, '2026-11-03T14:00:00.000Z', 1.064, 'sg', 'digital', null],
      [5, '2026-11-03T20:00:00.000Z', -1.5, 'brix', 'refractometer', null],
      [6, '2026-11-04T08:00:00.000Z', 0.998, 'sg', 'digital', 18],
    ]);
  });

  it('UTF-8 file with a byte-order mark, zoned times and a °F column', () => {
    const text = fixture('bom.csv');
    expect(text.charCodeAt(0)).toBe(0xfeff);
    const result = parseLoggerCsv(text, london);
    expect(result.fatal).toBeNull();
    expect(result.rows.map((r) => [r.line, iso(r.takenAt), r.value])).toEqual([
      [2, '2026-11-03T07:00:00.000Z', 1.05],
      [3, '2026-11-03T14:00:00.000Z', 1.049],
    ]);
    // 68 °F = 20 °C and 77 °F = 25 °C (definition of the Fahrenheit scale).
    expect(result.rows[0].sampleTempC).toBeCloseTo(20, 10);
    expect(result.rows[1].sampleTempC).toBeCloseTo(25, 10);
  });

  it.each([
    ['LF', '\n'],
    ['CRLF', '\r\n'],
    ['CR', '\r'],
  ])('%s line ends give the same rows and line numbers', (_name, eol) => {
    const text = ['time,value', '2026-11-03T08:00Z,1.050', '', '2026-11-03T09:00Z,1.049'].join(eol) + eol;
    const result = parseLoggerCsv(text, london);
    expect(result.rows.map((r) => [r.line, r.value])).toEqual([
      [2, 1.05],
      [4, 1.049],
    ]);
  });

  it('uses the default temperature unit for a plain "temperature" column', () => {
    const text = 'time,value,method,temperature\n2026-11-03T08:00Z,1.050,hydrometer,68\n';
    expect(parseLoggerCsv(text, { ...london, defaultTempUnit: 'F' }).rows[0].sampleTempC).toBeCloseTo(20, 10);
    expect(parseLoggerCsv(text, { ...london, defaultTempUnit: 'C' }).rejected[0].reason).toMatch(/temperature 68\.0 °C/);
  });

  it('"temp_c" is Celsius whatever the default unit', () => {
    const text = 'time,value,temp_c\n2026-11-03T08:00Z,1.050,20\n';
    expect(parseLoggerCsv(text, { ...london, defaultTempUnit: 'F' }).rows[0].sampleTempC).toBe(20);
  });

  it('ignores extra columns and reads a quoted field spanning two lines with the right line numbers', () => {
    const text = 'note,time,value\n"first\nsecond",2026-11-03T08:00Z,1.050\nx,2026-11-03T09:00Z,1.049\n';
    const result = parseLoggerCsv(text, london);
    expect(result.rows.map((r) => [r.line, r.value])).toEqual([
      [2, 1.05],
      [4, 1.049],
    ]);
  });
});

describe('parseLoggerCsv: file-level failures', () => {
  it('missing value column', () => {
    const result = parseLoggerCsv(fixture('missing-column.csv'), london);
    expect(result.fatal?.code).toBe('missing_columns');
    expect(result.fatal?.message).toMatch(/"value"/);
    expect(result.rows).toEqual([]);
  });

  it.each([
    ['empty text', ''],
    ['only blank lines', '\r\n\n  \n'],
    ['only a BOM', '\uFEFF'],
    ['header without readings', 'time,value\n\n'],
  ])('%s -> empty', (_name, text) => {
    expect(parseLoggerCsv(text, london).fatal?.code).toBe('empty');
  });

  it('binary or UTF-16 content -> unreadable', () => {
    expect(parseLoggerCsv('t\u0000i\u0000m\u0000e\u0000', london).fatal?.code).toBe('unreadable');
  });

  it('an unterminated quote -> unreadable, naming the line', () => {
    const result = parseLoggerCsv('time,value\n2026-11-03T08:00Z,1.050\n"2026-11-03T09:00Z,1.049\n', london);
    expect(result.fatal?.code).toBe('unreadable');
    expect(result.fatal?.message).toMatch(/Line 3/);
  });

  it('two temperature columns -> unreadable', () => {
    expect(parseLoggerCsv('time,value,temp_c,temp_f\n2026-11-03T08:00Z,1.05,20,68\n', london).fatal?.code).toBe('unreadable');
  });

  it('an unknown time zone is a programming error', () => {
    expect(() => parseLoggerCsv('time,value\n', { ...london, timeZone: 'Not/A_Zone' })).toThrow(RangeError);
  });

  const generated = (n: number): string => {
    const lines = ['time,value'];
    const start = Date.UTC(2026, 10, 1);
    for (let i = 0; i < n; i++) lines.push(`${new Date(start + i * 60_000).toISOString()},1.050`);
    return lines.join('\n');
  };

  it('50,001 readings -> too_many_rows', () => {
    const result = parseLoggerCsv(generated(50_001), london);
    expect(result.fatal?.code).toBe('too_many_rows');
    expect(result.rows).toEqual([]);
  });

  it('exactly 50,000 readings are accepted', () => {
    const result = parseLoggerCsv(generated(50_000), london);
    expect(result.fatal).toBeNull();
    expect(result.rows).toHaveLength(50_000);
    expect(result.rows[49_999].line).toBe(50_001);
  });

  it('a smaller maxRows applies', () => {
    expect(parseLoggerCsv(generated(11), { ...london, maxRows: 10 }).fatal?.code).toBe('too_many_rows');
    expect(parseLoggerCsv(generated(10), { ...london, maxRows: 10 }).fatal).toBeNull();
  });
});

describe('parseLoggerCsv: rejected lines', () => {
  it('bad dates', () => {
    const result = parseLoggerCsv(fixture('bad-dates.csv'), london);
    expect(result.fatal).toBeNull();
    expect(result.rows.map((r) => [r.line, iso(r.takenAt)])).toEqual([
      [2, '2026-11-03T08:00:00.000Z'],
      [10, '2026-11-03T11:00:00.000Z'],
    ]);
    expect(result.rejected.map((r) => r.line)).toEqual([3, 4, 5, 6, 7, 8, 9]);
    for (const r of result.rejected) expect(r.reason).toMatch(/^time/);
    expect(result.rejected[0].raw).toBe('03/11/2026 08:00,1.049');
  });

  it.each([
    [2, /SG 1\.5 is outside 0\.980–1\.200/],
    [3, /SG 0\.5 is outside/],
    [4, /SG 1050 is outside/],
    [5, /°Bx 80 is outside/],
    [6, /°P -6 is outside/],
    [7, /unit "kg"/],
    [8, /method "magic"/],
    [9, /temperature 95\.0 °C is outside/],
    [10, /temperature -11\.0 °C is outside/],
    [11, /temperature "warm" is not a number/],
    [12, /value is missing/],
    [15, /fields but the header has 5 \(a decimal comma/],
  ])('absurd values: line %s is rejected', (line, reason) => {
    const result = parseLoggerCsv(fixture('absurd-values.csv'), london);
    const hit = result.rejected.find((r) => r.line === line);
    expect(hit?.reason).toMatch(reason);
  });

  it('absurd values: the limits themselves are accepted (SG 1.200, SG 0.980 at 60 °C)', () => {
    const result = parseLoggerCsv(fixture('absurd-values.csv'), london);
    expect(result.rows.map((r) => [r.line, r.value, r.sampleTempC])).toEqual([
      [13, 1.2, null],
      [14, 0.98, 60],
    ]);
    expect(result.rejected).toHaveLength(12);
  });

  it('formula-like cells are not numbers; a plain negative Brix is', () => {
    const result = parseLoggerCsv(fixture('formula.csv'), london);
    expect(result.rows.map((r) => [r.line, r.value, r.unit])).toEqual([[7, -1.5, 'brix']]);
    expect(result.rejected.map((r) => [r.line, r.reason])).toEqual([
      [2, 'value "=1+1" is not a number'],
      [3, 'value "+1+1" is not a number'],
      [4, 'value "-2+3" is not a number'],
      [5, 'value "@SUM(A1:A2)" is not a number'],
      [6, expect.stringMatching(/^value "=HYPERLINK.* is not a number$/)],
      [8, 'temperature "=20" is not a number'],
    ]);
  });

  it('object-property names are not units, methods or columns', () => {
    const result = parseLoggerCsv('time,value,unit,method,constructor\n2026-11-03T08:00Z,1.05,constructor,__proto__,x\n', london);
    expect(result.rows).toEqual([]);
    expect(result.rejected[0].reason).toBe('unit "constructor" is not sg, brix or plato; method "__proto__" is not hydrometer, refractometer or digital');
  });

  it('keeps raw to 200 characters', () => {
    const text = `time,value,note\n2026-11-03T08:00Z,oops,${'x'.repeat(500)}\n`;
    const [rejected] = parseLoggerCsv(text, london).rejected;
    expect(rejected.raw).toHaveLength(200);
    expect(rejected.raw.startsWith('2026-11-03T08:00Z,oops,')).toBe(true);
  });

  it('a decimal comma in a comma file is not silently misread', () => {
    const result = parseLoggerCsv('time,value\n2026-11-03T08:00Z,"1,050"\n', london);
    expect(result.rows).toEqual([]);
    expect(result.rejected[0].reason).toMatch(/not a number/);
  });
});

describe('parseLoggerCsv: times without a zone, Europe/London across DST (checked by hand)', () => {
  // 2026: BST starts Sunday 29 March at 01:00 UTC (clocks 01:00 -> 02:00) and
  // ends Sunday 25 October at 01:00 UTC (clocks 02:00 -> 01:00).
  const originalTz = process.env.TZ;
  afterEach(() => {
    process.env.TZ = originalTz;
  });

  const expected = [
    [2, '2026-03-29T00:30:00.000Z'], // 00:30 GMT
    [4, '2026-03-29T01:30:00.000Z'], // 02:30 BST
    [5, '2026-10-24T23:30:00.000Z'], // 00:30 BST
    [6, '2026-10-25T00:30:00.000Z'], // 01:30 occurs twice: the first, BST, is taken
    [7, '2026-10-25T02:30:00.000Z'], // 02:30 GMT
    [8, '2026-11-03T14:00:00.000Z'], // GMT
    [9, '2026-07-01T11:00:00.000Z'], // zoneless "T" form, BST
    [10, '2026-07-01T12:00:00.000Z'], // Z taken as is
    [11, '2026-07-01T10:00:00.000Z'], // +02:00 taken as is
    [12, '2026-07-01T17:00:00.250Z'], // -0500 with milliseconds
  ];

  it.each(['UTC', 'America/Los_Angeles', 'Asia/Kolkata'])('same instants whatever the machine zone (%s)', (machineZone) => {
    process.env.TZ = machineZone;
    const result = parseLoggerCsv(fixture('london-dst.csv'), london);
    expect(result.rows.map((r) => [r.line, iso(r.takenAt)])).toEqual(expected);
    expect(result.rejected).toEqual([
      {
        line: 3,
        reason: 'time "2026-03-29 01:30" does not exist in Europe/London (skipped when the clocks went forward)',
        raw: '2026-03-29 01:30,1.059',
      },
    ]);
  });

  it('another zone: America/New_York 2026-11-01 01:30 occurs twice, EDT (UTC−4) taken', () => {
    const result = parseLoggerCsv('time,value\n2026-11-01 01:30,1.01\n2026-03-08 02:30,1.01\n', {
      timeZone: 'America/New_York',
      defaultTempUnit: 'F',
    });
    expect(result.rows.map((r) => iso(r.takenAt))).toEqual(['2026-11-01T05:30:00.000Z']);
    expect(result.rejected.map((r) => r.line)).toEqual([3]);
  });
});

describe('toCsv', () => {
  const columns = ['name', 'value', 'note', 'when', 'flag', 'empty'];
  const rows = [
    { name: 'Wash 12', value: -0.003, note: 'comma, here', when: new Date('2026-11-03T08:00:00Z'), flag: true, empty: null },
    { name: '=SUM(A1:A9)', value: 1.05, note: 'say "hi"', when: undefined, flag: false, empty: '' },
    { name: '+44 20 7946 0000', value: 0, note: 'two\nlines', flag: null, empty: undefined },
    { name: '-negative text', value: 12.5, note: '@handle', flag: null },
    { name: '\tTabbed', value: -7, note: '\rCR first', flag: null },
  ];
  const text = toCsv(rows, columns);

  it('uses CRLF line ends and writes the header first', () => {
    expect(text.startsWith('name,value,note,when,flag,empty\r\n')).toBe(true);
    expect(text.endsWith('\r\n')).toBe(true);
  });

  it('quotes per RFC 4180: commas, doubled quotes, line breaks', () => {
    expect(text).toContain('"comma, here"');
    expect(text).toContain('"say ""hi"""');
    expect(text).toContain('"two\nlines"');
  });

  it('neutralises formula-like text but leaves numbers alone (OWASP CSV injection)', () => {
    const lines = text.split('\r\n');
    expect(lines[1]).toBe('Wash 12,-0.003,"comma, here",2026-11-03T08:00:00.000Z,true,');
    expect(lines[2].startsWith("'=SUM(A1:A9),1.05,")).toBe(true);
    expect(text).toContain("'+44 20 7946 0000");
    expect(text).toContain("'-negative text,12.5,'@handle");
    expect(text).toContain(`'\tTabbed,-7,"'\rCR first"`);
  });

  it('round trips through papaparse to the same values once the neutralising quote is removed', () => {
    const parsed = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    const unneutralise = (cell: string): string => (/^'[=+\-@\t\r]/.test(cell) ? cell.slice(1) : cell);
    const back = parsed.data.map((row) => Object.fromEntries(columns.map((c) => [c, unneutralise(row[c])])));
    expect(back).toEqual([
      { name: 'Wash 12', value: '-0.003', note: 'comma, here', when: '2026-11-03T08:00:00.000Z', flag: 'true', empty: '' },
      { name: '=SUM(A1:A9)', value: '1.05', note: 'say "hi"', when: '', flag: 'false', empty: '' },
      { name: '+44 20 7946 0000', value: '0', note: 'two\nlines', when: '', flag: '', empty: '' },
      { name: '-negative text', value: '12.5', note: '@handle', when: '', flag: '', empty: '' },
      { name: '\tTabbed', value: '-7', note: '\rCR first', when: '', flag: '', empty: '' },
    ]);
  });

  it('an empty table is just the header', () => {
    expect(toCsv([], ['a', 'b'])).toBe('a,b\r\n');
  });
});
