/**
 * The demo distillery: Quillan Ridge Distillery, an invented licensed craft distillery,
 * with invented people. Every date is relative to "now" so the demo never goes stale.
 * The reading series are drawn from a first-order decay toward a terminal gravity with a
 * lag (the common empirical model), sampled twice a day (fewer on Sundays), with small
 * noise and hydrometer rounding to 0.001, then shaped into each state the board knows.
 */
import { TZDate } from '@date-fns/tz';
import { addDays, addHours, startOfDay } from 'date-fns';
import { mulberry32 } from '../src/lib/forecast/prng';

export const DEMO_TZ = 'Europe/London';
export const DEMO_PASSWORD = 'plateau-demo';
export const DEMO_WORKSPACE = 'Quillan Ridge Distillery';

export const DEMO_PEOPLE = [
  { email: 'mara@quillanridge.example', name: 'Mara Quist', role: 'manager' },
  { email: 'tomas@quillanridge.example', name: 'Tomas Lind', role: 'planner' },
  { email: 'ines@quillanridge.example', name: 'Ines Okafor', role: 'distiller' },
  { email: 'ollie@quillanridge.example', name: 'Ollie Brandt', role: 'staff' },
  { email: 'priya@quillanridge.example', name: 'Priya Hale', role: 'distiller' },
] as const;

const weekdays = (open: string, close: string, days = [1, 2, 3, 4, 5]) => days.map((weekday) => ({ weekday, open, close }));

export const DEMO_STILLS = [
  {
    name: 'Wash Still 1',
    kind: 'pot',
    capacityLitres: 2500,
    heatingKw: 60,
    hours: weekdays('06:00', '22:00'),
    cleaning: 60,
    typical: { stripping: 300, spirit: 480, redistillation: 420, cleaning: 120, maintenance: 240 },
  },
  {
    name: 'Wash Still 2',
    kind: 'pot',
    capacityLitres: 2500,
    heatingKw: 60,
    hours: weekdays('06:00', '22:00'),
    cleaning: 60,
    typical: { stripping: 300, spirit: 480, redistillation: 420, cleaning: 120, maintenance: 240 },
  },
  {
    name: 'Spirit Still',
    kind: 'pot',
    capacityLitres: 1200,
    heatingKw: 36,
    hours: weekdays('06:00', '20:00', [1, 2, 3, 4, 5, 6]),
    cleaning: 45,
    typical: { stripping: 240, spirit: 480, redistillation: 420, cleaning: 90, maintenance: 240 },
  },
  {
    name: 'Column',
    kind: 'column',
    capacityLitres: 1800,
    heatingKw: 48,
    hours: weekdays('07:00', '19:00'),
    cleaning: 0,
    typical: { stripping: 240, spirit: 360, redistillation: 360, cleaning: 120, maintenance: 300 },
  },
] as const;

export const DEMO_FERMENTERS = [
  ['FV1', 3000],
  ['FV2', 3000],
  ['FV3', 3000],
  ['FV4', 3000],
  ['FV5', 2500],
  ['FV6', 2500],
  ['FV7', 2000],
  ['FV8', 2000],
] as const;

export const DEMO_WASH_TYPES = [
  { name: 'Sugar wash', category: 'sugar', terminalMin: 0.99, terminalMax: 1.0, typicalOg: 1.08 },
  { name: 'All-grain malt wash', category: 'grain', terminalMin: 1.002, terminalMax: 1.008, typicalOg: 1.06 },
  { name: 'Molasses rum wash', category: 'molasses', terminalMin: 1.01, terminalMax: 1.02, typicalOg: 1.09 },
  { name: 'Apple wash', category: 'fruit', terminalMin: 0.99, terminalMax: 0.996, typicalOg: 1.055 },
] as const;

type Category = (typeof DEMO_WASH_TYPES)[number]['category'];

export interface DemoReading {
  takenAt: Date;
  sg: number;
  tempC: number;
  ph: number | null;
  by: number;
}
export interface DemoFerment {
  code: string;
  category: Category;
  fermenter: string | null;
  volume: number;
  pitchedAt: Date;
  og: number;
  yeast: string;
  notes: string;
  emptiedAt: Date | null;
  readings: DemoReading[];
  ingredients: Array<[string, number]>;
}

/** The demo is the same every time it loads: a seeded PRNG. */
const prng = mulberry32;

/** Local wall-clock time in the demo zone, `days` from today at hh:mm. */
export function localAt(now: Date, days: number, hh: number, mm = 0): Date {
  const today = startOfDay(new TZDate(now.getTime(), DEMO_TZ));
  const d = addDays(today, days);
  return new Date(new TZDate(d.getFullYear(), d.getMonth(), d.getDate(), hh, mm, 0, DEMO_TZ).getTime());
}

interface Shape {
  og: number;
  fg: number;
  k: number;
  lagDays: number;
  /** After the curve, drift by this much per day (souring: negative). */
  driftPerDay?: number;
  driftFromDay?: number;
}

function series(pitchedAt: Date, until: Date, shape: Shape, seed: number, opts: { phStart?: number; phDrop?: number } = {}): DemoReading[] {
  const rnd = prng(seed);
  const out: DemoReading[] = [{ takenAt: addHours(pitchedAt, 0.25), sg: shape.og, tempC: 22, ph: opts.phStart ?? null, by: 2 }];
  for (let day = 0; ; day++) {
    for (const hour of [8, 16]) {
      const t = new Date(startOfDay(new TZDate(pitchedAt.getTime(), DEMO_TZ)).getTime() + (day * 24 + hour) * 3600e3);
      if (t <= addHours(pitchedAt, 2)) continue;
      if (t > until) return out;
      const local = new TZDate(t.getTime(), DEMO_TZ);
      if (local.getDay() === 0 && hour === 16) continue; // Sundays: one reading
      if (local.getDay() === 6 && hour === 8 && rnd() < 0.5) continue;
      const days = (t.getTime() - pitchedAt.getTime()) / 86400e3;
      let sg = days <= shape.lagDays ? shape.og : shape.fg + (shape.og - shape.fg) * Math.exp(-shape.k * (days - shape.lagDays));
      if (shape.driftPerDay && days > (shape.driftFromDay ?? 0)) sg += shape.driftPerDay * (days - (shape.driftFromDay ?? 0));
      sg += (rnd() - 0.5) * 0.0008;
      const rounded = Math.round(sg * 1000) / 1000;
      const ph = opts.phStart != null ? Math.round((opts.phStart - (opts.phDrop ?? 0.08) * Math.min(days, 10) + (rnd() - 0.5) * 0.04) * 100) / 100 : null;
      out.push({ takenAt: t, sg: rounded, tempC: Math.round((19 + rnd() * 8) * 10) / 10, ph, by: rnd() < 0.5 ? 2 : 4 });
    }
  }
}

/** Every state the board knows, plus older emptied ferments that charged past runs. */
export function demoFerments(now: Date): DemoFerment[] {
  const p = (days: number, hh = 10) => localAt(now, days, hh);
  const list: DemoFerment[] = [];
  const add = (f: Omit<DemoFerment, 'readings'>, shape: Shape, seed: number, ph?: { phStart: number; phDrop?: number }) => {
    const until = f.emptiedAt ?? now;
    list.push({ ...f, readings: series(f.pitchedAt, until, shape, seed, ph) });
  };
  const grainRecipe: Array<[string, number]> = [
    ['Distilling malt', 720],
    ['Water (for reference, not counted)', 0],
  ];
  const sugarRecipe: Array<[string, number]> = [['Cane sugar', 560]];
  // Older washes (five to eight weeks ago), emptied after holding steady: the history the
  // forecasts of the same wash types learn from.
  add(
    {
      code: 'QR-094',
      category: 'grain',
      fermenter: null,
      volume: 2400,
      pitchedAt: p(-56),
      og: 1.061,
      yeast: "Distiller's M strain",
      notes: '',
      emptiedAt: p(-45, 6),
      ingredients: grainRecipe,
    },
    { og: 1.061, fg: 1.005, k: 0.85, lagDays: 0.4 },
    94,
  );
  add(
    {
      code: 'QR-095',
      category: 'sugar',
      fermenter: null,
      volume: 2400,
      pitchedAt: p(-54),
      og: 1.079,
      yeast: 'Turbo-style blend',
      notes: '',
      emptiedAt: p(-43, 6),
      ingredients: sugarRecipe,
    },
    { og: 1.079, fg: 0.995, k: 0.7, lagDays: 0.3 },
    95,
  );
  add(
    {
      code: 'QR-096',
      category: 'grain',
      fermenter: null,
      volume: 2400,
      pitchedAt: p(-49),
      og: 1.063,
      yeast: "Distiller's M strain",
      notes: '',
      emptiedAt: p(-38, 6),
      ingredients: grainRecipe,
    },
    { og: 1.063, fg: 1.005, k: 0.8, lagDays: 0.5 },
    96,
  );
  add(
    {
      code: 'QR-097',
      category: 'sugar',
      fermenter: null,
      volume: 2400,
      pitchedAt: p(-47),
      og: 1.081,
      yeast: 'Turbo-style blend',
      notes: '',
      emptiedAt: p(-36, 6),
      ingredients: sugarRecipe,
    },
    { og: 1.081, fg: 0.996, k: 0.65, lagDays: 0.3 },
    97,
  );
  add(
    {
      code: 'QR-098',
      category: 'sugar',
      fermenter: null,
      volume: 2400,
      pitchedAt: p(-42),
      og: 1.08,
      yeast: 'Turbo-style blend',
      notes: '',
      emptiedAt: p(-31, 6),
      ingredients: sugarRecipe,
    },
    { og: 1.08, fg: 0.995, k: 0.75, lagDays: 0.3 },
    98,
  );
  add(
    {
      code: 'QR-099',
      category: 'grain',
      fermenter: null,
      volume: 2400,
      pitchedAt: p(-40),
      og: 1.06,
      yeast: "Distiller's M strain",
      notes: '',
      emptiedAt: p(-29, 6),
      ingredients: grainRecipe,
    },
    { og: 1.06, fg: 1.004, k: 0.9, lagDays: 0.4 },
    99,
  );
  // Past, emptied into stripping runs.
  add(
    {
      code: 'QR-101',
      category: 'grain',
      fermenter: null,
      volume: 2400,
      pitchedAt: p(-24),
      og: 1.062,
      yeast: "Distiller's M strain",
      notes: 'Unpeated malt.',
      emptiedAt: p(-17, 6),
      ingredients: grainRecipe,
    },
    { og: 1.062, fg: 1.005, k: 0.9, lagDays: 0.4 },
    101,
  );
  add(
    {
      code: 'QR-102',
      category: 'sugar',
      fermenter: null,
      volume: 2400,
      pitchedAt: p(-23),
      og: 1.08,
      yeast: 'Turbo-style blend',
      notes: '',
      emptiedAt: p(-15, 6),
      ingredients: sugarRecipe,
    },
    { og: 1.08, fg: 0.995, k: 0.6, lagDays: 0.3 },
    102,
  );
  add(
    {
      code: 'QR-103',
      category: 'grain',
      fermenter: null,
      volume: 2400,
      pitchedAt: p(-19),
      og: 1.06,
      yeast: "Distiller's M strain",
      notes: '',
      emptiedAt: p(-11, 6),
      ingredients: grainRecipe,
    },
    { og: 1.06, fg: 1.006, k: 0.8, lagDays: 0.5 },
    103,
  );
  add(
    {
      code: 'QR-104',
      category: 'molasses',
      fermenter: null,
      volume: 2000,
      pitchedAt: p(-18),
      og: 1.085,
      yeast: 'Rum yeast R2',
      notes: 'Blackstrap, 18 % w/v.',
      emptiedAt: p(-9, 6),
      ingredients: [['Blackstrap molasses', 420]],
    },
    { og: 1.085, fg: 1.015, k: 0.55, lagDays: 0.5 },
    104,
  );
  add(
    {
      code: 'QR-105',
      category: 'grain',
      fermenter: null,
      volume: 2400,
      pitchedAt: p(-14),
      og: 1.064,
      yeast: "Distiller's M strain",
      notes: '',
      emptiedAt: p(-5, 6),
      ingredients: grainRecipe,
    },
    { og: 1.064, fg: 1.004, k: 0.85, lagDays: 0.4 },
    105,
  );
  // Live ferments, one for each state.
  add(
    {
      code: 'QR-110',
      category: 'sugar',
      fermenter: 'FV1',
      volume: 2600,
      pitchedAt: p(-10),
      og: 1.08,
      yeast: 'Turbo-style blend',
      notes: 'Finished: ready for Wash Still 1.',
      emptiedAt: null,
      ingredients: sugarRecipe,
    },
    { og: 1.08, fg: 0.996, k: 0.75, lagDays: 0.3 },
    110,
  );
  add(
    {
      code: 'QR-111',
      category: 'grain',
      fermenter: 'FV2',
      volume: 2500,
      pitchedAt: p(-9),
      og: 1.06,
      yeast: "Distiller's M strain",
      notes: '',
      emptiedAt: null,
      ingredients: grainRecipe,
    },
    { og: 1.06, fg: 1.005, k: 0.9, lagDays: 0.4 },
    111,
  );
  add(
    {
      code: 'QR-112',
      category: 'grain',
      fermenter: 'FV3',
      volume: 2500,
      pitchedAt: p(-9),
      og: 1.065,
      yeast: "Distiller's M strain",
      notes: 'Temperature dropped to 17 °C on day 2 — check the jacket.',
      emptiedAt: null,
      ingredients: grainRecipe,
    },
    { og: 1.065, fg: 1.022, k: 0.8, lagDays: 0.5 },
    112,
  );
  add(
    {
      code: 'QR-113',
      category: 'grain',
      fermenter: 'FV4',
      volume: 2500,
      pitchedAt: p(-11),
      og: 1.058,
      yeast: "Distiller's M strain",
      notes: 'Slight sour nose on day 6.',
      emptiedAt: null,
      ingredients: grainRecipe,
    },
    { og: 1.058, fg: 1.003, k: 0.8, lagDays: 0.4, driftPerDay: -0.0009, driftFromDay: 5 },
    113,
    { phStart: 4.6, phDrop: 0.12 },
  );
  add(
    {
      code: 'QR-114',
      category: 'molasses',
      fermenter: 'FV5',
      volume: 2200,
      pitchedAt: p(-8),
      og: 1.09,
      yeast: 'Rum yeast R2',
      notes: '',
      emptiedAt: null,
      ingredients: [['Blackstrap molasses', 470]],
    },
    { og: 1.09, fg: 1.03, k: 0.9, lagDays: 0.4 },
    114,
  );
  add(
    {
      code: 'QR-115',
      category: 'sugar',
      fermenter: 'FV6',
      volume: 2300,
      pitchedAt: p(-5),
      og: 1.078,
      yeast: 'Turbo-style blend',
      notes: '',
      emptiedAt: null,
      ingredients: sugarRecipe,
    },
    { og: 1.078, fg: 0.995, k: 0.55, lagDays: 0.3 },
    115,
  );
  add(
    {
      code: 'QR-116',
      category: 'grain',
      fermenter: 'FV7',
      volume: 1900,
      pitchedAt: p(-3),
      og: 1.062,
      yeast: "Distiller's M strain",
      notes: '',
      emptiedAt: null,
      ingredients: grainRecipe,
    },
    { og: 1.062, fg: 1.005, k: 0.6, lagDays: 0.5 },
    116,
  );
  add(
    {
      code: 'QR-117',
      category: 'fruit',
      fermenter: 'FV8',
      volume: 1800,
      pitchedAt: p(-2),
      og: 1.055,
      yeast: 'Cider strain C1',
      notes: 'Pressed apples, bittersweet mix.',
      emptiedAt: null,
      ingredients: [['Apple juice (as fruit)', 2300]],
    },
    { og: 1.055, fg: 0.994, k: 0.45, lagDays: 0.6 },
    117,
  );
  add(
    {
      code: 'QR-118',
      category: 'sugar',
      fermenter: null,
      volume: 2400,
      pitchedAt: localAt(now, 0, new TZDate(now.getTime(), DEMO_TZ).getHours() >= 3 ? new TZDate(now.getTime(), DEMO_TZ).getHours() - 2 : 0),
      og: 1.082,
      yeast: 'Turbo-style blend',
      notes: 'Just pitched.',
      emptiedAt: null,
      ingredients: sugarRecipe,
    },
    { og: 1.082, fg: 0.995, k: 0.6, lagDays: 0.5 },
    118,
  );
  add(
    {
      code: 'QR-119',
      category: 'grain',
      fermenter: null,
      volume: 2400,
      pitchedAt: p(-6),
      og: 1.061,
      yeast: "Distiller's M strain",
      notes: 'Slowing; nearly there.',
      emptiedAt: null,
      ingredients: grainRecipe,
    },
    { og: 1.061, fg: 1.005, k: 0.65, lagDays: 0.4 },
    119,
  );
  return list;
}

export interface DemoRun {
  key: string;
  still: string;
  type: 'stripping' | 'spirit' | 'redistillation' | 'cleaning' | 'maintenance';
  status: 'planned' | 'confirmed' | 'running' | 'done' | 'cancelled';
  startsAt: Date;
  endsAt: Date;
  operator: string | null;
  ferments: Array<[string, number]>;
  feeds: Array<[string, number]>;
  chargeLitres: number | null;
  chargeAbv: number | null;
  notes: string;
  outcomes?: Array<{ fraction: 'low_wines' | 'heads' | 'hearts' | 'tails' | 'feints'; litres: number; reading: number; tempC: number }>;
}

export function demoRuns(now: Date): DemoRun[] {
  const at = (days: number, hh: number, mm = 0) => localAt(now, days, hh, mm);
  const ines = 'ines@quillanridge.example';
  const priya = 'priya@quillanridge.example';
  const runs: DemoRun[] = [];
  const r = (x: Omit<DemoRun, 'feeds' | 'chargeAbv' | 'notes'> & Partial<Pick<DemoRun, 'feeds' | 'chargeAbv' | 'notes'>>) =>
    runs.push({ feeds: [], chargeAbv: null, notes: '', ...x });
  // Past three weeks (done), each stripping run charged from an emptied ferment.
  r({
    key: 'S101',
    still: 'Wash Still 1',
    type: 'stripping',
    status: 'done',
    startsAt: at(-17, 7),
    endsAt: at(-17, 13),
    operator: ines,
    ferments: [['QR-101', 2400]],
    chargeLitres: 2400,
    chargeAbv: 7.5,
    outcomes: [{ fraction: 'low_wines', litres: 640, reading: 27.5, tempC: 22 }],
  });
  r({
    key: 'S102',
    still: 'Wash Still 2',
    type: 'stripping',
    status: 'done',
    startsAt: at(-15, 7),
    endsAt: at(-15, 13),
    operator: priya,
    ferments: [['QR-102', 2400]],
    chargeLitres: 2400,
    chargeAbv: 11.2,
    outcomes: [{ fraction: 'low_wines', litres: 900, reading: 28.5, tempC: 21 }],
  });
  r({
    key: 'P101',
    still: 'Spirit Still',
    type: 'spirit',
    status: 'done',
    startsAt: at(-14, 7),
    endsAt: at(-14, 16),
    operator: ines,
    ferments: [],
    feeds: [
      ['S101', 640],
      ['S102', 480],
    ],
    chargeLitres: 1120,
    chargeAbv: 28,
    outcomes: [
      { fraction: 'heads', litres: 18, reading: 81, tempC: 20 },
      { fraction: 'hearts', litres: 290, reading: 70.5, tempC: 21.5 },
      { fraction: 'tails', litres: 95, reading: 35, tempC: 22 },
      { fraction: 'feints', litres: 60, reading: 20, tempC: 22 },
    ],
  });
  r({
    key: 'S103',
    still: 'Wash Still 1',
    type: 'stripping',
    status: 'done',
    startsAt: at(-11, 7),
    endsAt: at(-11, 13),
    operator: priya,
    ferments: [['QR-103', 2400]],
    chargeLitres: 2400,
    chargeAbv: 7.1,
    outcomes: [{ fraction: 'low_wines', litres: 610, reading: 26.8, tempC: 20 }],
  });
  r({
    key: 'C101',
    still: 'Wash Still 1',
    type: 'cleaning',
    status: 'done',
    startsAt: at(-10, 8),
    endsAt: at(-10, 10),
    operator: priya,
    ferments: [],
    chargeLitres: null,
  });
  r({
    key: 'S104',
    still: 'Column',
    type: 'stripping',
    status: 'done',
    startsAt: at(-9, 8),
    endsAt: at(-9, 13),
    operator: ines,
    ferments: [['QR-104', 1800]],
    chargeLitres: 1800,
    chargeAbv: 9.2,
    outcomes: [{ fraction: 'low_wines', litres: 560, reading: 28, tempC: 21 }],
  });
  r({
    key: 'M101',
    still: 'Spirit Still',
    type: 'maintenance',
    status: 'done',
    startsAt: at(-8, 8),
    endsAt: at(-8, 12),
    operator: null,
    ferments: [],
    chargeLitres: null,
    notes: 'Pressure relief valve inspection.',
  });
  r({
    key: 'S105',
    still: 'Wash Still 2',
    type: 'stripping',
    status: 'done',
    startsAt: at(-5, 7),
    endsAt: at(-5, 13),
    operator: ines,
    ferments: [['QR-105', 2400]],
    chargeLitres: 2400,
    chargeAbv: 7.9,
    outcomes: [{ fraction: 'low_wines', litres: 660, reading: 28.1, tempC: 20.5 }],
  });
  r({
    key: 'P102',
    still: 'Spirit Still',
    type: 'spirit',
    status: 'done',
    startsAt: at(-4, 7),
    endsAt: at(-4, 16),
    operator: priya,
    ferments: [],
    feeds: [
      ['S103', 610],
      ['S105', 500],
    ],
    chargeLitres: 1110,
    chargeAbv: 27.5,
    outcomes: [
      { fraction: 'heads', litres: 17, reading: 80, tempC: 20 },
      { fraction: 'hearts', litres: 282, reading: 70, tempC: 20 },
      { fraction: 'tails', litres: 98, reading: 34, tempC: 21 },
    ],
  });
  // Today and the next three weeks.
  r({
    key: 'S110',
    still: 'Wash Still 1',
    type: 'stripping',
    status: 'confirmed',
    startsAt: at(1, 7),
    endsAt: at(1, 13),
    operator: ines,
    ferments: [['QR-110', 2400]],
    chargeLitres: 2400,
    chargeAbv: 11,
  });
  r({
    key: 'S111',
    still: 'Wash Still 2',
    type: 'stripping',
    status: 'planned',
    startsAt: at(2, 7),
    endsAt: at(2, 13),
    operator: priya,
    ferments: [['QR-111', 2400]],
    chargeLitres: 2400,
  });
  r({
    key: 'S112',
    still: 'Wash Still 1',
    type: 'stripping',
    status: 'planned',
    startsAt: at(3, 7),
    endsAt: at(3, 13),
    operator: ines,
    ferments: [['QR-112', 2400]],
    chargeLitres: 2400,
    notes: 'Booked on the original forecast.',
  });
  r({
    key: 'S114',
    still: 'Column',
    type: 'stripping',
    status: 'planned',
    startsAt: at(2, 8),
    endsAt: at(2, 13),
    operator: priya,
    ferments: [['QR-114', 1800]],
    chargeLitres: 1800,
  });
  r({
    key: 'S115',
    still: 'Wash Still 2',
    type: 'stripping',
    status: 'planned',
    startsAt: at(4, 7),
    endsAt: at(4, 13),
    operator: ines,
    ferments: [['QR-115', 2300]],
    chargeLitres: 2300,
  });
  r({
    key: 'S116',
    still: 'Wash Still 1',
    type: 'stripping',
    status: 'planned',
    startsAt: at(6, 7),
    endsAt: at(6, 13),
    operator: priya,
    ferments: [
      ['QR-116', 1900],
      ['QR-119', 600],
    ],
    chargeLitres: 2500,
    notes: 'Two washes in one charge.',
  });
  r({
    key: 'S117',
    still: 'Column',
    type: 'stripping',
    status: 'planned',
    startsAt: at(8, 8),
    endsAt: at(8, 13),
    operator: ines,
    ferments: [['QR-117', 1800]],
    chargeLitres: 1800,
  });
  r({
    key: 'P110',
    still: 'Spirit Still',
    type: 'spirit',
    status: 'planned',
    startsAt: at(5, 7),
    endsAt: at(5, 16),
    operator: ines,
    ferments: [],
    feeds: [
      ['S110', 700],
      ['S111', 450],
    ],
    chargeLitres: 1150,
  });
  r({
    key: 'C110',
    still: 'Wash Still 2',
    type: 'cleaning',
    status: 'planned',
    startsAt: at(9, 8),
    endsAt: at(9, 10),
    operator: priya,
    ferments: [],
    chargeLitres: null,
  });
  r({
    key: 'M110',
    still: 'Column',
    type: 'maintenance',
    status: 'planned',
    startsAt: at(12, 8),
    endsAt: at(12, 13),
    operator: null,
    ferments: [],
    chargeLitres: null,
    notes: 'Annual column packing inspection.',
  });
  r({
    key: 'S118',
    still: 'Wash Still 2',
    type: 'stripping',
    status: 'planned',
    startsAt: at(10, 7),
    endsAt: at(10, 13),
    operator: ines,
    ferments: [['QR-118', 2400]],
    chargeLitres: 2400,
  });
  r({
    key: 'P111',
    still: 'Spirit Still',
    type: 'spirit',
    status: 'planned',
    startsAt: at(13, 7),
    endsAt: at(13, 16),
    operator: priya,
    ferments: [],
    feeds: [
      ['S115', 600],
      ['S116', 550],
    ],
    chargeLitres: 1150,
  });
  r({
    key: 'R110',
    still: 'Spirit Still',
    type: 'redistillation',
    status: 'planned',
    startsAt: at(19, 7),
    endsAt: at(19, 14),
    operator: ines,
    ferments: [],
    chargeLitres: 900,
    notes: 'Gin: botanical run on neutral spirit.',
  });
  return runs;
}
