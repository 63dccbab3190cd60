import { afterAll, beforeAll, describe, it, expect, vi } from 'vitest';
import {
  axisDayLabel,
  axisTicks,
  boardKeyboardCoordinates,
  boardWindow,
  canvasWidth,
  closedSpans,
  dayWidth,
  dropGhostBox,
  fermentBooking,
  fermentDraftRun,
  firstBookableHour,
  firstHit,
  initialScrollLeft,
  initials,
  pageName,
  rangeLabel,
  readyWindowSpans,
  runBlockLayout,
  runsByStill,
  slotWidth,
  vesselBarLayout,
  HEADER_HEIGHT,
  LABEL_WIDTH,
  ROW_HEIGHT,
  ZOOMS,
  type VesselBar,
} from '../../src/lib/board';
import { ferment, run, still } from '../helpers/board-rows';

const H = 3_600_000;
const utc = (s: string) => new Date(`${s}Z`);
const TZ = 'Europe/London';
const week = boardWindow('2026-12-03', 'week', TZ); // Mon 30 Nov 00:00 UTC to Mon 7 Dec
const px = ZOOMS.week.pxPerHour; // 12 px an hour

// Moments within six days of now read as a weekday and time, farther ones with their date: the
// layouts below read the clock, so it is held in the week drawn.
beforeAll(() => {
  vi.useFakeTimers({ toFake: ['Date'], now: utc('2026-12-02T12:00') });
});
afterAll(() => {
  vi.useRealTimers();
});

describe('board sizes', () => {
  it('draws a winter week 168 h × 12 px wide', () => expect(canvasWidth(week, px)).toBe(2016));
  it.each([
    ['day', 28, 1344],
    ['week', 12, 288],
    ['six-weeks', 9.6, 38.4],
  ] as const)('steps a %s view by %d px a slot and %d px a day', (zoom, slot, day) => {
    expect(slotWidth(ZOOMS[zoom])).toBeCloseTo(slot);
    expect(dayWidth(ZOOMS[zoom])).toBeCloseTo(day);
  });
  it.each([
    ['Ines Okafor', 'IO'],
    ['Mara van der Quist', 'MVD'],
    ['tomas', 'T'],
  ])('gives %s the initials %s', (name, expected) => expect(initials(name)).toBe(expected));
  it('puts the drop preview on its row, under the header, at least 8 px wide', () => {
    expect(dropGhostBox({ startsAt: utc('2026-11-30T01:00'), endsAt: utc('2026-11-30T01:00') }, 2, week.start, px)).toEqual({
      left: LABEL_WIDTH + 12,
      top: HEADER_HEIGHT + 2 * ROW_HEIGHT + 4,
      width: 8,
      height: ROW_HEIGHT - 10,
    });
  });
});

describe('runsByStill', () => {
  it('lists every still and leaves out cancelled runs and runs outside the window', () => {
    const m = runsByStill(
      [still(1), still(2)],
      [run(1), run(2, { status: 'cancelled' }), run(3, { startsAt: utc('2026-12-08T06:00'), endsAt: utc('2026-12-08T08:00') }), run(4, { stillId: 9 })],
      week,
    );
    expect([...m.keys()]).toEqual([1, 2]);
    expect(m.get(1)!.map((r) => r.id)).toEqual([1]);
    expect(m.get(2)).toEqual([]);
  });
});

describe('closedSpans', () => {
  it('shades the hours a still is shut', () => {
    const daytime = still(1, { operatingHours: [0, 1, 2, 3, 4, 5, 6].map((weekday) => ({ weekday: weekday as 0, open: '06:00', close: '18:00' })) });
    const spans = closedSpans([daytime], boardWindow('2026-12-03', 'day', TZ), TZ, 10).get(1)!;
    expect(spans).toEqual([
      { x: 0, w: 60 },
      { x: 180, w: 60 },
    ]);
  });
  it('shades nothing on a still open round the clock', () => expect(closedSpans([still(1)], week, TZ, px).get(1)).toEqual([]));
});

describe('readyWindowSpans', () => {
  it('draws each wash once per row, from P10 to P90 with its most likely time marked, emptied washes left out', () => {
    const fermentById = new Map([ferment(1), ferment(2, { emptiedAt: utc('2026-12-02T00:00') })].map((f) => [f.id, f]));
    const runs = new Map([
      [
        1,
        [
          run(1, {
            ferments: [
              { fermentId: 1, litres: 1000 },
              { fermentId: 2, litres: 100 },
            ],
          }),
          run(2, { ferments: [{ fermentId: 1, litres: 1000 }] }),
        ],
      ],
    ]);
    expect(readyWindowSpans(runs, fermentById, week.start, px).get(1)).toEqual([{ key: '1-1', x: 36 * px, w: 72 * px, mid: 24 * px, code: 'F-1' }]);
  });
});

describe('runBlockLayout', () => {
  const context = {
    stillById: new Map([[1, still(1, { cleaningAfterRunMinutes: 60 })]]),
    fermentById: new Map([[1, ferment(1)]]),
    personById: new Map([[7, { id: 7, name: 'Ines Okafor' }]]) as never,
    windowStart: week.start,
    pxPerHour: px,
    timeZone: TZ,
    units: 'metric' as const,
  };
  it.each([
    ['week', 'IO'],
    ['day', 'Ines Okafor'],
  ] as const)('places a run and names its operator on a %s view as %s', (zoom, operatorText) => {
    const layout = runBlockLayout(run(1, { operatorId: 7, ferments: [{ fermentId: 1, litres: 2400 }] }), { ...context, zoom });
    expect(layout).toMatchObject({
      x: 78 * px,
      width: 6 * px,
      cleaningWidth: px,
      fermentCodes: 'F-1',
      operatorText,
      placement: 'inside',
      timeText: 'Thursday 06:00 to Thursday 12:00',
    });
    expect(layout.chargeText).toContain('2');
  });
  it('has no charge, operator or placement without washes', () => {
    expect(runBlockLayout(run(1), { ...context, zoom: 'week' })).toMatchObject({ fermentCodes: '', chargeText: '', operatorText: '', placement: 'unknown' });
  });
});

describe('vesselBarLayout', () => {
  const bar = (over: Partial<VesselBar>): VesselBar =>
    ({
      fermenterId: 1,
      fermentId: 1,
      code: 'F-1',
      status: 'active',
      pitchedAt: utc('2026-11-30T00:00'),
      readyP10: utc('2026-12-01T00:00'),
      readyP90: utc('2026-12-02T00:00'),
      freeAt: null,
      freedBy: null,
      ...over,
    }) as VesselBar;
  it('runs to the end of the ready window when no run is booked', () => {
    const b = vesselBarLayout(bar({}), week, px, TZ)!;
    expect(b).toMatchObject({ x: 0, width: 48 * px, window: { x: 24 * px, w: 24 * px } });
    expect(b.label).toBe('F-1: pitched Monday 00:00, ready window Tuesday 00:00 to Wednesday 00:00, no run booked yet');
  });
  it('names the run that empties it', () => {
    expect(vesselBarLayout(bar({ freeAt: utc('2026-12-03T06:00'), freedBy: 'run' } as Partial<VesselBar>), week, px, TZ)!.label).toContain(
      'taken by a run Thursday 06:00',
    );
  });
  it('is not drawn outside the window', () => {
    expect(vesselBarLayout(bar({ pitchedAt: utc('2026-12-08T00:00'), readyP10: null, readyP90: null }), week, px, TZ)).toBeNull();
  });
});

describe('axis', () => {
  it.each([
    ['day', '2026-12-03', 'Thu 3 Dec'],
    ['week', '2026-12-03', 'Mon 30 Nov – Sun 6 Dec'],
    ['six-weeks', '2026-12-03', 'Mon 30 Nov – Sun 10 Jan'],
  ] as const)('heads a %s view of %s "%s"', (zoom, anchor, expected) => expect(rangeLabel(boardWindow(anchor, zoom, TZ))).toBe(expected));
  it.each([
    ['day', 'day'],
    ['week', 'week'],
    ['six-weeks', 'six weeks'],
  ] as const)('calls a %s page "%s"', (zoom, expected) => expect(pageName(zoom)).toBe(expected));
  it('drops the weekday on the six-week axis', () => {
    expect(axisDayLabel(week.days[0]!, 'six-weeks')).toBe('30 Nov');
    expect(axisDayLabel(week.days[0]!, 'week')).toBe('Mon 30 Nov');
  });
  it.each([
    ['day', 23, '01:00'],
    ['week', 3, '06'],
    ['six-weeks', 0, undefined],
  ] as const)('ticks a %s view %i times a day, first "%s"', (zoom, count, first) => {
    const ticks = axisTicks(week.days[0]!, zoom, TZ, 10);
    expect(ticks).toHaveLength(count);
    expect(ticks[0]?.label).toBe(first);
  });
});

describe('initialScrollLeft', () => {
  it.each([
    ['a day at 05:00', boardWindow('2026-12-03', 'day', TZ), utc('2026-12-10T12:00'), 5 * ZOOMS.day.pxPerHour],
    ['the current week at today, 20 px in', week, utc('2026-12-03T12:00'), 72 * px - 20],
    ['another week at its start', week, utc('2026-12-10T12:00'), 0],
    ['six weeks at their start', boardWindow('2026-12-03', 'six-weeks', TZ), utc('2026-12-03T12:00'), 0],
  ])('scrolls %s', (_what, win, now, expected) =>
    expect(initialScrollLeft(win, now, win.zoom === 'day' ? ZOOMS.day.pxPerHour : win.zoom === 'week' ? px : ZOOMS['six-weeks'].pxPerHour)).toBe(expected),
  );
});

describe('boardKeyboardCoordinates', () => {
  const sizes = { slotPx: 12, dayPx: 288, rowPx: ROW_HEIGHT };
  const key = (code: string, shiftKey = false) => ({ code, shiftKey });
  it.each([
    ['ArrowRight', false, { x: 112, y: 50 }],
    ['ArrowRight', true, { x: 388, y: 50 }],
    ['ArrowLeft', false, { x: 88, y: 50 }],
    ['ArrowLeft', true, { x: -188, y: 50 }],
    ['ArrowDown', false, { x: 100, y: 116 }],
    ['ArrowUp', false, { x: 100, y: -16 }],
    ['KeyA', false, undefined],
  ])('moves %s (shift %s) to %j', (code, shift, expected) => {
    const k = boardKeyboardCoordinates(() => sizes);
    expect(k.getter(key(code, shift), { currentCoordinates: { x: 100, y: 50 } })).toEqual(expected);
  });
  it('counts steps from where the drag began, whatever the current coordinates drift to', () => {
    const k = boardKeyboardCoordinates(() => sizes);
    k.getter(key('ArrowRight'), { currentCoordinates: { x: 100, y: 50 } });
    expect(k.getter(key('ArrowRight'), { currentCoordinates: { x: 113.4, y: 51 } })).toEqual({ x: 124, y: 50 });
    expect(k.getter(key('ArrowDown'), { currentCoordinates: { x: 0, y: 0 } })).toEqual({ x: 124, y: 116 });
  });
  it('starts afresh after a reset and reads the step sizes on every key', () => {
    let current = sizes;
    const k = boardKeyboardCoordinates(() => current);
    k.getter(key('ArrowRight'), { currentCoordinates: { x: 100, y: 50 } });
    k.reset();
    current = { ...sizes, slotPx: 28 };
    expect(k.getter(key('ArrowRight'), { currentCoordinates: { x: 10, y: 20 } })).toEqual({ x: 38, y: 20 });
  });
});

describe('firstHit', () => {
  const none = () => [] as string[];
  it.each([
    ['the first detector when it finds something', [() => ['row'], () => ['other']], ['row']],
    ['the next when the first finds nothing', [none, () => ['other']], ['other']],
    ['nothing when none finds anything', [none, none], []],
  ] as const)('returns %s', (_what, detectors, expected) => {
    const [first, ...rest] = detectors as unknown as Array<() => string[]>;
    expect(firstHit(first!, ...rest)({})).toEqual(expected);
  });
  it('does not ask the fallback when the first detector hits', () => {
    let asked = false;
    firstHit(
      () => ['row'],
      () => {
        asked = true;
        return [];
      },
    )({});
    expect(asked).toBe(false);
  });
});

describe('drafts', () => {
  it('makes a wash a stripping run of what the still takes, its typical length', () => {
    const draft = fermentDraftRun(ferment(1, { volumeLitres: 3000 }), still(2), utc('2026-12-03T06:00'));
    expect(draft).toMatchObject({ id: -1, stillId: 2, type: 'stripping', status: 'planned', chargeLitres: 2500, ferments: [{ fermentId: 1, litres: 2500 }] });
    expect(draft.endsAt.toISOString()).toBe('2026-12-03T11:00:00.000Z');
  });
  it('runs a draft at least an hour', () => {
    const draft = fermentDraftRun(ferment(1), still(2, { typicalMinutes: { ...still(2).typicalMinutes, stripping: 20 } }), utc('2026-12-03T06:00'));
    expect(draft.endsAt.getTime() - draft.startsAt.getTime()).toBe(H);
  });
  it('books a run from the next whole hour on the board', () => {
    expect(firstBookableHour(utc('2026-12-03T06:40'), week.start, px, TZ).toISOString()).toBe('2026-12-03T06:00:00.000Z');
    expect(firstBookableHour(utc('2026-11-20T06:40'), week.start, px, TZ).toISOString()).toBe(week.start.toISOString());
  });
  it('books a wash on the first still that takes it, from when it is no longer at risk', () => {
    const stills = [still(1, { capacityLitres: 1000 }), still(2)];
    // Median 2 Dec 12:00, P90 4 Dec 12:00: the 80 % quantile lies 48 h × 0.8416/1.2816 (normal table) = 31.5 h on,
    // 3 Dec 19:31; bookings start on the hour.
    expect(fermentBooking(ferment(1), stills, utc('2026-12-01T00:00'), week.start, px, TZ)).toEqual({
      stillId: 2,
      startsAt: utc('2026-12-03T20:00'),
      ferments: [{ fermentId: 1, litres: 2400 }],
    });
    expect(fermentBooking(ferment(1, { volumeLitres: 9000 }), stills, utc('2026-12-01T00:00'), week.start, px, TZ)?.stillId).toBe(1);
    expect(fermentBooking(ferment(1), [], utc('2026-12-01T00:00'), week.start, px, TZ)).toBeNull();
  });
  it('books a wash inside the still hours, off a closure, with room for the run and its cleaning before closing', () => {
    // Weekdays 06:00–18:00, closed Friday 4 Dec. A 2400 L run: heat-up 2400 kg × 4.18 kJ/(kg·K) × (94 − 20) K / (60 kW × 0.85)
    // ≈ 242 min, plus 300 typical minutes, about 9 h 03 min; then 60 min of cleaning, so it must start by 07:57.
    const dayShift = still(2, {
      operatingHours: ([1, 2, 3, 4, 5] as const).map((weekday) => ({ weekday, open: '06:00', close: '18:00' })),
      closures: [{ startsOn: '2026-12-04', endsOn: '2026-12-04', reason: 'Boiler inspection' }],
      cleaningAfterRunMinutes: 60,
    });
    const booking = fermentBooking(ferment(1), [dayShift], utc('2026-12-01T00:00'), week.start, px, TZ)!;
    // Not at risk from 3 Dec 19:31, after Thursday's closing; Friday is closed, the weekend has no hours: Monday 06:00.
    expect(booking.startsAt.toISOString()).toBe('2026-12-07T06:00:00.000Z');
    // Maintenance booked Monday 06:00–07:00 moves it to 07:00; until 08:00, the run and its cleaning no longer fit Monday.
    const busy = (end: string) => run(9, { stillId: 2, type: 'maintenance', startsAt: utc('2026-12-07T06:00'), endsAt: utc(end) });
    const book = (end: string) => fermentBooking(ferment(1), [dayShift], utc('2026-12-01T00:00'), week.start, px, TZ, { runs: [busy(end)] })!;
    expect(book('2026-12-07T07:00').startsAt.toISOString()).toBe('2026-12-07T07:00:00.000Z');
    expect(book('2026-12-07T08:00').startsAt.toISOString()).toBe('2026-12-08T06:00:00.000Z');
  });
});
