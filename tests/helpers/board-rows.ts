/** Small builders for board rows in unit tests: a still open round the clock, a planned stripping run, a finished wash. */
import type { BoardFerment, BoardRun, BoardStill } from '../../src/lib/board';
import { utc } from './time';

export const still = (id: number, over: Partial<BoardStill> = {}): BoardStill => ({
  id,
  name: `Still ${id}`,
  kind: 'pot',
  capacityLitres: 2500,
  heatingKw: 60,
  closures: [],
  cleaningAfterRunMinutes: 0,
  position: id,
  operatingHours: [0, 1, 2, 3, 4, 5, 6].map((weekday) => ({ weekday: weekday as 0, open: '00:00', close: '24:00' })),
  typicalMinutes: { stripping: 300, spirit: 480, redistillation: 420, cleaning: 120, maintenance: 240 },
  ...over,
});
export const run = (id: number, over: Partial<BoardRun> = {}): BoardRun => ({
  id,
  stillId: 1,
  type: 'stripping',
  status: 'planned',
  startsAt: utc('2026-12-03T06:00'),
  endsAt: utc('2026-12-03T12:00'),
  operatorId: null,
  chargeLitres: null,
  chargeAbv: null,
  ferments: [],
  feeds: [],
  lowWinesLitres: null,
  version: 1,
  sequence: 0,
  notes: null,
  ...over,
});
export const ferment = (id: number, over: Partial<BoardFerment> = {}): BoardFerment => ({
  id,
  code: `F-${id}`,
  volumeLitres: 2400,
  fermenterId: 1,
  washCategory: 'grain',
  pitchedAt: utc('2026-11-25T10:00'),
  emptiedAt: null,
  status: 'active',
  reason: '',
  readyAt: utc('2026-12-02T12:00'),
  readyP10: utc('2026-12-01T12:00'),
  readyP90: utc('2026-12-04T12:00'),
  confirmedAt: null,
  lastSg: 1.02,
  predictedFg: 1.005,
  ...over,
});
