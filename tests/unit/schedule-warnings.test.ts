import { describe, expect, it } from 'vitest';
import { computeRunWarnings, type FermentState, type Run, type Still, type WarningCode } from '../../src/lib/schedule';

// Europe/London in December is on GMT (UTC+0), so every wall-clock time in
// these cases reads the same as its UTC instant. 3 Dec 2026 is a Thursday.
const TZ = 'Europe/London';
const at = (iso: string) => new Date(`${iso}Z`);

const still: Still = {
  id: 1,
  name: 'Still 1',
  capacityLitres: 1000,
  heatingKw: 30,
  // Monday to Saturday, 06:00–22:00.
  operatingHours: ([1, 2, 3, 4, 5, 6] as const).map((weekday) => ({ weekday, open: '06:00', close: '22:00' })),
  closures: [{ startsOn: '2026-12-24', endsOn: '2026-12-26', reason: 'Christmas' }],
  cleaningAfterRunMinutes: 60,
  typicalMinutes: { stripping: 300, spirit: 420, redistillation: 360, cleaning: 60, maintenance: 120 },
};

const finishedWash = (over: Partial<FermentState> = {}): FermentState => ({
  id: 12,
  code: 'F-12',
  volumeLitres: 2000,
  pitchedAt: at('2026-11-26T10:00'),
  emptiedAt: null,
  status: 'finished',
  readyAt: at('2026-11-30T06:00'),
  readyP10: at('2026-11-29T18:00'),
  readyP90: at('2026-11-30T18:00'),
  confirmedAt: at('2026-11-30T12:00'),
  ...over,
});

// An unconfirmed wash with a ready window 3 Dec 06:00 – 4 Dec 18:00 and a median at 3 Dec 12:00.
const fermenting = (over: Partial<FermentState> = {}): FermentState =>
  finishedWash({
    status: 'slowing',
    readyP10: at('2026-12-03T06:00'),
    readyAt: at('2026-12-03T12:00'),
    readyP90: at('2026-12-04T18:00'),
    confirmedAt: null,
    ...over,
  });

const run = (over: Partial<Run> = {}): Run => ({
  id: 100,
  stillId: 1,
  type: 'stripping',
  status: 'planned',
  startsAt: at('2026-12-03T14:00'),
  endsAt: at('2026-12-03T20:00'),
  operatorId: 7,
  chargeLitres: null,
  ferments: [{ fermentId: 12, litres: 900 }],
  feeds: [],
  ...over,
});

interface Scenario {
  run: Run;
  others?: Run[];
  ferment?: FermentState;
}

const warningsFor = ({ run: r, others = [], ferment = finishedWash() }: Scenario) =>
  computeRunWarnings(r, {
    still,
    runs: [r, ...others],
    ferments: new Map([[ferment.id, ferment]]),
    timeZone: TZ,
    now: at('2026-12-01T08:00'),
  });

// A feeding stripping run on Still 2 for the spirit-run cases.
const feeder = (over: Partial<Run> = {}): Run =>
  run({ id: 90, stillId: 2, operatorId: 8, startsAt: at('2026-12-03T06:00'), endsAt: at('2026-12-03T14:00'), lowWinesLitres: 300, ...over });
const spirit = (over: Partial<Run> = {}): Run =>
  run({ type: 'spirit', ferments: [], feeds: [{ runId: 90, litres: 250 }], startsAt: at('2026-12-03T15:00'), endsAt: at('2026-12-03T21:00'), ...over });

// Each rule: a case where it fires (with its severity) and a near miss where it must not.
const cases: Array<{ code: WarningCode; severity: string; fires: Scenario; nearMiss: Scenario; why: string }> = [
  {
    code: 'booked_before_ready',
    severity: 'danger',
    why: 'start before P10 vs start after the 80 % quantile of the ready time',
    fires: { run: run({ startsAt: at('2026-12-03T05:00'), endsAt: at('2026-12-03T11:00') }), ferment: fermenting() },
    nearMiss: { run: run({ startsAt: at('2026-12-04T08:00'), endsAt: at('2026-12-04T14:00') }), ferment: fermenting() },
  },
  {
    code: 'booked_before_stable',
    severity: 'warning',
    why: 'a finished wash confirmed only after the start vs one confirmed before it',
    fires: { run: run(), ferment: finishedWash({ confirmedAt: at('2026-12-03T15:00') }) },
    nearMiss: { run: run(), ferment: finishedWash() },
  },
  {
    code: 'ferment_stalled',
    severity: 'danger',
    why: 'stalled vs slowing',
    fires: { run: run(), ferment: fermenting({ status: 'stalled' }) },
    nearMiss: { run: run(), ferment: fermenting({ status: 'slowing' }) },
  },
  {
    code: 'ferment_souring',
    severity: 'danger',
    why: 'souring vs active',
    fires: { run: run(), ferment: fermenting({ status: 'souring' }) },
    nearMiss: { run: run(), ferment: fermenting({ status: 'active' }) },
  },
  {
    code: 'over_capacity',
    severity: 'danger',
    why: '1001 L vs exactly the 1000 L capacity',
    fires: { run: run({ chargeLitres: 1001 }) },
    nearMiss: { run: run({ chargeLitres: 1000 }) },
  },
  {
    code: 'over_capacity',
    severity: 'danger',
    why: 'charge taken from the ferment litres when no charge is stated',
    fires: { run: run({ ferments: [{ fermentId: 12, litres: 1000.5 }] }) },
    nearMiss: { run: run({ ferments: [{ fermentId: 12, litres: 999.5 }] }) },
  },
  {
    code: 'ferment_overallocated',
    severity: 'danger',
    why: '900 + 1101 L of a 2000 L wash vs 900 + 1100 L',
    fires: { run: run(), others: [run({ id: 101, stillId: 2, operatorId: 8, ferments: [{ fermentId: 12, litres: 1101 }] })] },
    nearMiss: { run: run(), others: [run({ id: 101, stillId: 2, operatorId: 8, ferments: [{ fermentId: 12, litres: 1100 }] })] },
  },
  {
    code: 'ferment_overallocated',
    severity: 'danger',
    why: 'a cancelled run counts for nothing',
    fires: { run: run(), others: [run({ id: 101, stillId: 2, operatorId: 8, ferments: [{ fermentId: 12, litres: 1500 }] })] },
    nearMiss: { run: run(), others: [run({ id: 101, stillId: 2, operatorId: 8, status: 'cancelled', ferments: [{ fermentId: 12, litres: 1500 }] })] },
  },
  {
    code: 'outside_hours',
    severity: 'warning',
    why: 'ends 22:30 vs ends exactly at the 22:00 close',
    fires: { run: run({ startsAt: at('2026-12-03T16:30'), endsAt: at('2026-12-03T22:30') }) },
    nearMiss: { run: run({ startsAt: at('2026-12-03T16:00'), endsAt: at('2026-12-03T22:00') }) },
  },
  {
    code: 'outside_hours',
    severity: 'warning',
    why: 'Sunday (closed weekday) vs Saturday',
    fires: { run: run({ startsAt: at('2026-12-06T08:00'), endsAt: at('2026-12-06T14:00') }) },
    nearMiss: { run: run({ startsAt: at('2026-12-05T08:00'), endsAt: at('2026-12-05T14:00') }) },
  },
  {
    code: 'on_closure',
    severity: 'danger',
    why: 'Christmas Eve closure vs the day before',
    fires: { run: run({ startsAt: at('2026-12-24T08:00'), endsAt: at('2026-12-24T14:00') }) },
    nearMiss: { run: run({ startsAt: at('2026-12-23T08:00'), endsAt: at('2026-12-23T14:00') }) },
  },
  {
    code: 'operator_double_booked',
    severity: 'danger',
    why: 'same operator overlapping on Still 2 vs merely touching',
    fires: { run: run(), others: [run({ id: 101, stillId: 2, ferments: [], startsAt: at('2026-12-03T19:00'), endsAt: at('2026-12-03T21:00') })] },
    nearMiss: { run: run(), others: [run({ id: 101, stillId: 2, ferments: [], startsAt: at('2026-12-03T20:00'), endsAt: at('2026-12-03T22:00') })] },
  },
  {
    code: 'operator_double_booked',
    severity: 'danger',
    why: 'overlap with a live run vs with a cancelled one',
    fires: { run: run(), others: [run({ id: 101, stillId: 2, ferments: [], startsAt: at('2026-12-03T15:00'), endsAt: at('2026-12-03T16:00') })] },
    nearMiss: {
      run: run(),
      others: [run({ id: 101, stillId: 2, ferments: [], status: 'cancelled', startsAt: at('2026-12-03T15:00'), endsAt: at('2026-12-03T16:00') })],
    },
  },
  {
    code: 'ferment_not_pitched',
    severity: 'danger',
    why: 'never pitched vs pitched days before',
    fires: { run: run(), ferment: finishedWash({ pitchedAt: null, status: 'insufficient_data', confirmedAt: null }) },
    nearMiss: { run: run() },
  },
  {
    code: 'ferment_not_pitched',
    severity: 'danger',
    why: 'pitched an hour after the run starts vs an hour before',
    fires: { run: run(), ferment: fermenting({ pitchedAt: at('2026-12-03T15:00') }) },
    nearMiss: { run: run(), ferment: fermenting({ pitchedAt: at('2026-12-03T13:00') }) },
  },
  {
    code: 'ferment_emptied',
    severity: 'danger',
    why: 'emptied the day before vs emptied as this run starts',
    fires: { run: run(), ferment: finishedWash({ emptiedAt: at('2026-12-02T10:00') }) },
    nearMiss: { run: run(), ferment: finishedWash({ emptiedAt: at('2026-12-03T14:00') }) },
  },
  {
    code: 'spirit_before_feed',
    severity: 'danger',
    why: 'feeding run ends 16:00, after the 15:00 start, vs ends 15:00',
    fires: { run: spirit(), others: [feeder({ endsAt: at('2026-12-03T16:00') })] },
    nearMiss: { run: spirit(), others: [feeder({ endsAt: at('2026-12-03T15:00') })] },
  },
  {
    code: 'spirit_over_feed',
    severity: 'warning',
    why: '250 L here + 100 L in another spirit run from 300 L of low wines vs 200 + 100',
    fires: { run: spirit(), others: [feeder(), spirit({ id: 102, stillId: 3, operatorId: 9, feeds: [{ runId: 90, litres: 100 }] })] },
    nearMiss: {
      run: spirit({ feeds: [{ runId: 90, litres: 200 }] }),
      others: [feeder(), spirit({ id: 102, stillId: 3, operatorId: 9, feeds: [{ runId: 90, litres: 100 }] })],
    },
  },
  {
    code: 'spirit_over_feed',
    severity: 'warning',
    why: 'a cancelled feeding run gives no low wines',
    fires: { run: spirit(), others: [feeder({ status: 'cancelled' })] },
    nearMiss: { run: spirit(), others: [feeder()] },
  },
];

describe('computeRunWarnings: each rule fires, and not on a near miss', () => {
  it.each(cases)('$code ($why)', ({ code, severity, fires, nearMiss }) => {
    const fired = warningsFor(fires).filter((w) => w.code === code);
    expect(fired.length).toBeGreaterThan(0);
    expect(fired[0].severity).toBe(severity);
    expect(fired[0].message.length).toBeGreaterThan(10);
    expect(warningsFor(nearMiss).map((w) => w.code)).not.toContain(code);
  });
});

describe('computeRunWarnings: readiness ladder against the forecast window', () => {
  // Window: P10 3 Dec 06:00, median 3 Dec 12:00, P90 4 Dec 18:00. At the default 80 % threshold a run is at risk
  // before the 80 % quantile: 30 h × z(0.8)/z(0.9) = 30 h × 0.8416/1.2816 (normal table) = 19.7 h after the median, 4 Dec 07:42.
  it.each([
    { start: '2026-12-03T05:00', code: 'booked_before_ready', severity: 'danger' },
    { start: '2026-12-03T08:00', code: 'booked_before_ready', severity: 'warning' },
    { start: '2026-12-03T14:00', code: 'booked_before_ready', severity: 'warning' },
    { start: '2026-12-04T07:30', code: 'booked_before_ready', severity: 'warning' },
    { start: '2026-12-04T08:00', code: 'booked_before_stable', severity: 'info' },
    { start: '2026-12-05T08:00', code: 'booked_before_stable', severity: 'info' },
  ])('a run starting $start gets $code ($severity)', ({ start, code, severity }) => {
    const startsAt = at(start);
    const r = run({ startsAt, endsAt: new Date(startsAt.getTime() + 4 * 3_600_000) });
    const readiness = warningsFor({ run: r, ferment: fermenting() }).filter((w) => w.code.startsWith('booked_before'));
    expect(readiness).toEqual([expect.objectContaining({ code, severity, fermentId: 12 })]);
  });

  it("says why in the product's words: booked early, unless the run was not at risk when booked", () => {
    const [w] = warningsFor({ run: run(), ferment: fermenting() });
    expect(w.message).toBe(
      'Booked before its wash is likely ready: wash F-12 is less than 80 % likely to be confirmed stable by the start (ready window 3 Dec 06:00 – 4 Dec 18:00)',
    );
    const [late] = warningsFor({ run: run({ bookedAtRisk: false }), ferment: fermenting() });
    expect(late.message).toMatch(/^Wash late: wash F-12 /);
    const [early] = warningsFor({ run: run({ bookedAtRisk: true }), ferment: fermenting() });
    expect(early.message).toMatch(/^Booked before its wash is likely ready: /);
  });

  it('follows the threshold setting', () => {
    const r = run({ startsAt: at('2026-12-04T08:00'), endsAt: at('2026-12-04T12:00') });
    const at95 = computeRunWarnings(r, {
      still,
      runs: [r],
      ferments: new Map([[12, fermenting()]]),
      timeZone: TZ,
      now: at('2026-12-01T08:00'),
      atRiskThreshold: 0.95,
    });
    expect(at95).toEqual([expect.objectContaining({ code: 'booked_before_ready', severity: 'warning' })]);
    expect(at95[0]!.message).toContain('less than 95 % likely');
  });

  it('a wash with no forecast yet is not confirmed stable', () => {
    const ferment = fermenting({ status: 'insufficient_data', readyAt: null, readyP10: null, readyP90: null });
    expect(warningsFor({ run: run(), ferment })).toEqual([expect.objectContaining({ code: 'booked_before_stable', severity: 'warning' })]);
  });
});

describe('computeRunWarnings: what counts', () => {
  it('a run booked well on a confirmed wash has no warnings', () => {
    expect(warningsFor({ run: run() })).toEqual([]);
  });

  it('a cancelled run has no warnings, however bad', () => {
    const bad = run({ status: 'cancelled', chargeLitres: 5000, startsAt: at('2026-12-24T23:00'), endsAt: at('2026-12-25T05:00') });
    expect(warningsFor({ run: bad, ferment: fermenting({ status: 'stalled' }) })).toEqual([]);
  });

  it('a run already done keeps booking warnings but not forecast ones', () => {
    const done = run({ status: 'done', chargeLitres: 1200, startsAt: at('2026-11-30T08:00'), endsAt: at('2026-11-30T14:00') });
    const codes = warningsFor({ run: done, ferment: fermenting({ status: 'stalled' }) }).map((w) => w.code);
    expect(codes).toEqual(['over_capacity']);
  });

  it('uses the dragged version of the run, not its stored copy', () => {
    const stored = run({ ferments: [{ fermentId: 12, litres: 1500 }] });
    const dragged = run({ ferments: [{ fermentId: 12, litres: 900 }] });
    const other = run({ id: 101, stillId: 2, operatorId: 8, ferments: [{ fermentId: 12, litres: 1000 }] });
    const w = computeRunWarnings(dragged, {
      still,
      runs: [stored, other],
      ferments: { 12: finishedWash() },
      timeZone: TZ,
      now: at('2026-12-01T08:00'),
    });
    expect(w.map((x) => x.code)).not.toContain('ferment_overallocated');
  });

  it('reports the other run when the operator is double-booked', () => {
    const other = run({ id: 101, stillId: 2, ferments: [], startsAt: at('2026-12-03T19:00'), endsAt: at('2026-12-03T21:00') });
    const w = warningsFor({ run: run(), others: [other] }).find((x) => x.code === 'operator_double_booked');
    expect(w?.runId).toBe(101);
  });

  it('an unassigned run is never double-booked', () => {
    const other = run({ id: 101, stillId: 2, operatorId: null, ferments: [] });
    expect(warningsFor({ run: run({ operatorId: null }), others: [other] })).toEqual([]);
  });
});
