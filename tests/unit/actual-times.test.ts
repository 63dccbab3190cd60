/**
 * Runs at their real times: where a run is drawn and counted, the words for how far it strayed
 * from its booking, the questions before a start or finish, and the checks on a correction.
 * Expected values are worked by hand from the clock times in each case; the rules are common
 * practice on the still floor (start no earlier than the booking allows without a word, a finish
 * minutes after a start is a mis-tap). Europe/London in January is UTC+0.
 */
import { describe, expect, it } from 'vitest';
import {
  actualHours,
  actualSpan,
  correctionProblems,
  deviationWords,
  durationWords,
  finishQuestion,
  startQuestions,
  timingWords,
  type Run,
  type Still,
} from '../../src/lib/schedule';
import { runBlockLayout, runsByStill, type BoardRun } from '../../src/lib/board';
import { actualLine } from '../../src/components/runs/actual-words';
import { utc } from '../helpers/time';

const TZ = 'Europe/London';
const MIN = 60_000;

describe('durationWords', () => {
  it.each([
    { ms: 40_000, expected: '40 s' },
    { ms: 59_400, expected: '59 s' },
    { ms: 40 * MIN, expected: '40 min' },
    { ms: 60 * MIN, expected: '1 h' },
    { ms: 130 * MIN, expected: '2 h 10 min' },
    { ms: 65 * MIN + 20_000, expected: '1 h 5 min' },
    { ms: (26 * 60 + 10) * MIN, expected: '1 d 2 h' },
    { ms: -40 * MIN, expected: '40 min' },
  ])('returns "$expected" for $ms ms', ({ ms, expected }) => {
    expect(durationWords(ms)).toBe(expected);
  });
});

describe('deviation and timing words', () => {
  it.each([
    { actual: '2025-01-06T08:40', booked: '2025-01-06T08:00', expected: '40 min late' },
    { actual: '2025-01-06T10:55', booked: '2025-01-06T12:00', expected: '1 h 5 min early' },
    { actual: '2025-01-06T08:00:30', booked: '2025-01-06T08:00', expected: 'on time' },
  ])('$actual against $booked is "$expected"', ({ actual, booked, expected }) => {
    expect(deviationWords(utc(actual), utc(booked))).toBe(expected);
  });

  it('says how a done run strayed at both ends, a running one at its start, a planned one nothing', () => {
    const base = { startsAt: utc('2025-01-06T08:00'), endsAt: utc('2025-01-06T12:00') };
    expect(timingWords({ ...base, status: 'done', startedAt: utc('2025-01-06T08:40'), finishedAt: utc('2025-01-06T10:55') })).toBe(
      'started 40 min late, finished 1 h 5 min early',
    );
    expect(timingWords({ ...base, status: 'running', startedAt: utc('2025-01-06T07:50'), finishedAt: null })).toBe('started 10 min early');
    expect(timingWords({ ...base, status: 'planned' })).toBe('');
  });
});

describe('actualSpan: where a run is drawn and counted', () => {
  const booked = { startsAt: utc('2025-01-06T08:00'), endsAt: utc('2025-01-06T12:00') };
  it.each([
    { name: 'planned: its booking', run: { ...booked, status: 'planned' as const }, now: '2025-01-06T09:00', start: '08:00', end: '12:00' },
    {
      name: 'done: start to finish',
      run: { ...booked, status: 'done' as const, startedAt: utc('2025-01-06T08:40'), finishedAt: utc('2025-01-06T13:05') },
      now: '2025-01-06T15:00',
      start: '08:40',
      end: '13:05',
    },
    {
      name: 'running, before its booked end: to the booked end',
      run: { ...booked, status: 'running' as const, startedAt: utc('2025-01-06T08:40') },
      now: '2025-01-06T10:00',
      start: '08:40',
      end: '12:00',
    },
    {
      name: 'running past its booked end: to now',
      run: { ...booked, status: 'running' as const, startedAt: utc('2025-01-06T08:40') },
      now: '2025-01-06T13:30',
      start: '08:40',
      end: '13:30',
    },
    {
      name: 'done without a stamped start: booked start to finish',
      run: { ...booked, status: 'done' as const, startedAt: null, finishedAt: utc('2025-01-06T11:00') },
      now: '2025-01-06T15:00',
      start: '08:00',
      end: '11:00',
    },
  ])('$name', ({ run, now, start, end }) => {
    const span = actualSpan(run, utc(now));
    expect(span.start.toISOString()).toBe(`2025-01-06T${start}:00.000Z`);
    expect(span.end.toISOString()).toBe(`2025-01-06T${end}:00.000Z`);
  });
});

describe('actualHours: utilisation at actual times', () => {
  const still: Pick<Still, 'id' | 'operatingHours' | 'closures'> = {
    id: 1,
    operatingHours: [{ weekday: 1, open: '08:00', close: '18:00' }],
    closures: [],
  };
  const run = (over: Partial<Run> & { startedAt?: Date | null; finishedAt?: Date | null }): Run & { startedAt?: Date | null; finishedAt?: Date | null } => ({
    id: 1,
    stillId: 1,
    type: 'stripping',
    status: 'done',
    startsAt: utc('2025-01-06T08:00'),
    endsAt: utc('2025-01-06T12:00'),
    operatorId: null,
    chargeLitres: null,
    ferments: [],
    feeds: [],
    ...over,
  });
  const monday = { start: utc('2025-01-06T00:00'), end: utc('2025-01-07T00:00') };
  it('counts 08:30–13:00 (4.5 h) for a run booked 08:00–12:00', () => {
    expect(actualHours([run({ startedAt: utc('2025-01-06T08:30'), finishedAt: utc('2025-01-06T13:00') })], still, monday, TZ)).toBeCloseTo(4.5, 9);
  });
  it('clips to operating hours like booked hours: 16:00–19:00 counts 2 h before the 18:00 close', () => {
    expect(actualHours([run({ startedAt: utc('2025-01-06T16:00'), finishedAt: utc('2025-01-06T19:00') })], still, monday, TZ)).toBeCloseTo(2, 9);
  });
  it('counts a planned run at its booking and leaves a cancelled one out', () => {
    expect(
      actualHours(
        [run({ status: 'planned' }), run({ id: 2, status: 'cancelled', startsAt: utc('2025-01-06T13:00'), endsAt: utc('2025-01-06T15:00') })],
        still,
        monday,
        TZ,
      ),
    ).toBeCloseTo(4, 9);
  });
});

describe('startQuestions', () => {
  const now = utc('2025-01-06T05:50');
  const washes = new Map([
    [
      1,
      {
        code: 'FV3-0412',
        status: 'slowing' as const,
        confirmedAt: null,
        emptiedAt: null,
        readyAt: utc('2025-01-07T12:00'),
        readyP10: utc('2025-01-07T06:00'),
        readyP90: utc('2025-01-08T14:00'),
      },
    ],
    [
      2,
      { code: 'FV1-0400', status: 'finished' as const, confirmedAt: utc('2025-01-05T08:00'), emptiedAt: null, readyAt: null, readyP10: null, readyP90: null },
    ],
    [3, { code: 'FV2-0399', status: 'stalled' as const, confirmedAt: null, emptiedAt: null, readyAt: null, readyP10: null, readyP90: null }],
  ]);
  const ask = (over: { startsAt?: string; ferments?: number[]; feeds?: number[]; margin?: number }) =>
    startQuestions({
      run: {
        startsAt: utc(over.startsAt ?? '2025-01-06T08:00'),
        ferments: (over.ferments ?? []).map((fermentId) => ({ fermentId })),
        feeds: (over.feeds ?? []).map((runId) => ({ runId })),
      },
      now,
      marginMinutes: over.margin ?? 60,
      ferments: washes,
      feeders: new Map([[9, { status: 'running' as const, startsAt: utc('2025-01-06T02:00'), stillName: 'Wash Still 1' }]]),
      timeZone: TZ,
    });

  it('asks about a start 2 h 10 min before an 08:00 booking (margin 60 min)', () => {
    expect(ask({})).toEqual(['This is 2 h 10 min before the booked start (08:00).']);
  });
  it('asks nothing inside the margin, or once the booking has come', () => {
    expect(ask({ startsAt: '2025-01-06T06:40' })).toEqual([]);
    expect(ask({ startsAt: '2025-01-06T05:00' })).toEqual([]);
  });
  it('follows the margin setting: 2 h 10 min early is fine with a 3 h margin', () => {
    expect(ask({ margin: 180 })).toEqual([]);
  });
  it('names a wash that is not confirmed stable, with its ready window; a confirmed one is not asked about', () => {
    expect(ask({ startsAt: '2025-01-06T05:00', ferments: [1, 2] })).toEqual([
      'Wash FV3-0412 is not confirmed stable yet: ready window 7 Jan 06:00 – 8 Jan 14:00.',
    ]);
  });
  it('says a stalled wash has stalled, and a feeding run that is still running', () => {
    expect(ask({ startsAt: '2025-01-06T05:00', ferments: [3], feeds: [9] })).toEqual([
      'Wash FV2-0399 is not confirmed stable yet: it has stalled, its gravity holding above the finishing range.',
      'The stripping run on Wash Still 1 booked 6 Jan 02:00 that feeds this run is not finished yet (running).',
    ]);
  });
});

describe('finishQuestion', () => {
  const started = utc('2025-01-06T08:00');
  it.each([
    { now: '2025-01-06T08:00:40', expected: 'Finished 40 s after it started — is that right?' },
    { now: '2025-01-06T08:09:00', expected: 'Finished 9 min after it started — is that right?' },
    { now: '2025-01-06T08:10:00', expected: null },
    { now: '2025-01-06T12:00:00', expected: null },
  ])('at $now answers $expected', ({ now, expected }) => {
    expect(finishQuestion(started, utc(now))).toBe(expected);
  });
  it('asks nothing when no start was stamped', () => {
    expect(finishQuestion(null, started)).toBeNull();
  });
});

describe('correctionProblems', () => {
  const base = {
    status: 'done' as const,
    startsAt: utc('2025-01-06T08:00'),
    endsAt: utc('2025-01-06T12:00'),
    now: utc('2025-01-07T09:00'),
    timeZone: TZ,
  };
  it('accepts a start and finish after each other, in the past, near the booking', () => {
    expect(
      correctionProblems({ ...base, startedAt: utc('2025-01-06T08:40'), finishedAt: utc('2025-01-06T13:05'), changed: ['startedAt', 'finishedAt'] }),
    ).toEqual({});
  });
  it.each([
    {
      name: 'a finish before the start, named on the finish',
      startedAt: '2025-01-06T09:00',
      finishedAt: '2025-01-06T08:30',
      changed: ['finishedAt'] as const,
      expected: { finishedAt: 'The finish must come after the start (6 Jan 09:00).' },
    },
    {
      name: 'a start after the stored finish, named on the start',
      startedAt: '2025-01-06T13:00',
      finishedAt: '2025-01-06T12:30',
      changed: ['startedAt'] as const,
      expected: { startedAt: 'The start must come before the finish (6 Jan 12:30).' },
    },
    {
      name: 'a finish in the future beyond the 2 min clock skew',
      startedAt: '2025-01-06T08:00',
      finishedAt: '2025-01-07T09:03',
      changed: ['finishedAt'] as const,
      expected: { finishedAt: 'A run cannot have finished in the future.' },
    },
    {
      name: 'a start eight days from the booking',
      startedAt: '2024-12-29T08:00',
      finishedAt: '2025-01-06T12:00',
      changed: ['startedAt'] as const,
      expected: { startedAt: 'The start must be within 7 days of the booked start (6 Jan 08:00); check the date.' },
    },
  ])('refuses $name', ({ startedAt, finishedAt, changed, expected }) => {
    expect(correctionProblems({ ...base, startedAt: utc(startedAt), finishedAt: utc(finishedAt), changed })).toEqual(expected);
  });
  it('allows a finish a minute ahead of the server clock (skew)', () => {
    expect(correctionProblems({ ...base, startedAt: utc('2025-01-07T08:00'), finishedAt: utc('2025-01-07T09:01'), changed: ['finishedAt'] })).toEqual({});
  });
});

describe('the board and pages draw a started run at its actual times', () => {
  const still = {
    id: 1,
    name: 'Wash Still 1',
    kind: 'pot' as const,
    capacityLitres: 2500,
    heatingKw: 60,
    operatingHours: [],
    closures: [],
    cleaningAfterRunMinutes: 0,
    typicalMinutes: { stripping: 240, spirit: 420, redistillation: 360, cleaning: 60, maintenance: 120 },
    position: 0,
  };
  const run: BoardRun = {
    id: 7,
    stillId: 1,
    type: 'stripping',
    status: 'done',
    startsAt: utc('2025-01-06T08:00'),
    endsAt: utc('2025-01-06T12:00'),
    startedAt: utc('2025-01-06T08:40'),
    finishedAt: utc('2025-01-06T13:05'),
    operatorId: null,
    chargeLitres: null,
    chargeAbv: null,
    ferments: [],
    feeds: [],
    lowWinesLitres: null,
    version: 3,
    sequence: 3,
    notes: null,
  };
  const px = 10;
  const context = {
    stillById: new Map([[1, still]]),
    fermentById: new Map(),
    personById: new Map(),
    windowStart: utc('2025-01-06T00:00'),
    pxPerHour: px,
    timeZone: TZ,
    zoom: 'week' as const,
    units: 'metric' as const,
  };
  it('puts the block at 08:40–13:05 and the faint booking at 08:00–12:00, with the words', () => {
    const l = runBlockLayout(run, context);
    expect(l.x).toBeCloseTo((8 + 40 / 60) * px, 9);
    expect(l.width).toBeCloseTo((4 + 25 / 60) * px, 9);
    expect(l.booked).toEqual({ x: 8 * px, w: 4 * px });
    expect(l.timingText).toBe('started 40 min late, finished 1 h 5 min late');
    expect(l.timeText).toMatch(/^ran .*08:40 to .*13:05 \(booked .*08:00 to .*12:00\)$/);
  });
  it('keeps a planned run at its booking with no booking ghost', () => {
    const l = runBlockLayout({ ...run, status: 'planned', startedAt: null, finishedAt: null }, context);
    expect(l.x).toBe(8 * px);
    expect(l.booked).toBeNull();
    expect(l.timingText).toBe('');
  });
  it('shows a run that really ran inside the window even when its booking lies outside', () => {
    const moved = { ...run, startsAt: utc('2025-01-05T20:00'), endsAt: utc('2025-01-05T23:00') };
    const win = { start: utc('2025-01-06T00:00'), end: utc('2025-01-07T00:00') };
    expect(runsByStill([still], [moved], win).get(1)).toHaveLength(1);
  });
  it('writes the line under the booking on the day view, run page and run sheet', () => {
    const hm = (d: Date) => d.toISOString().slice(11, 16);
    expect(actualLine(run, hm)).toBe('Ran 08:40–13:05: started 40 min late, finished 1 h 5 min late');
    expect(actualLine({ ...run, status: 'running', finishedAt: null }, hm)).toBe('Started 08:40 (40 min late), still running');
    expect(actualLine({ ...run, status: 'planned' }, hm)).toBeNull();
  });
});
