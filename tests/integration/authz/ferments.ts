import type { RouteCase } from './types';

const EVERYONE = ['manager', 'planner', 'distiller', 'staff'] as const;
const PLANNERS = ['manager', 'planner'] as const;
const LOGGERS = ['manager', 'planner', 'distiller'] as const;
const MANAGERS = ['manager'] as const;

let n = 0;
const unique = (prefix: string) => `${prefix}-${Date.now().toString(36)}-${++n}`;
const CSV = 'time,value,unit,method\n2020-01-01T08:00:00Z,1.050,sg,digital\n';

export const cases: RouteCase[] = [
  { route: '/api/fermenters', method: 'GET', allowed: EVERYONE, path: () => '/api/fermenters' },
  { route: '/api/fermenters', method: 'POST', allowed: MANAGERS, path: () => '/api/fermenters', body: () => ({ name: unique('FV'), capacity: 1000 }) },
  { route: '/api/fermenters/[id]', method: 'PATCH', allowed: MANAGERS, path: (fx) => `/api/fermenters/${fx.a.fermenterId}`, body: () => ({ capacity: 3100 }) },
  { route: '/api/wash-types', method: 'GET', allowed: EVERYONE, path: () => '/api/wash-types' },
  {
    route: '/api/wash-types',
    method: 'POST',
    allowed: MANAGERS,
    path: () => '/api/wash-types',
    body: () => ({ name: unique('Wash'), category: 'grain', terminalMin: 1.002, terminalMax: 1.008, typicalOg: 1.06 }),
  },
  { route: '/api/wash-types/[id]', method: 'PATCH', allowed: MANAGERS, path: (fx) => `/api/wash-types/${fx.a.washTypeId}`, body: () => ({ typicalOg: 1.061 }) },
  { route: '/api/ferments', method: 'GET', allowed: EVERYONE, path: () => '/api/ferments?state=all' },
  {
    route: '/api/ferments',
    method: 'POST',
    allowed: LOGGERS,
    path: () => '/api/ferments',
    body: (fx) => ({ code: unique('AZ'), washTypeId: fx.a.washTypeId, fermenterId: null, volume: 1000, pitchedAt: '2025-01-01T08:00:00Z', og: 1.06 }),
  },
  { route: '/api/ferments/[id]', method: 'GET', allowed: EVERYONE, path: (fx) => `/api/ferments/${fx.a.fermentId}` },
  { route: '/api/ferments/[id]', method: 'PATCH', allowed: PLANNERS, path: (fx) => `/api/ferments/${fx.a.fermentId}`, body: () => ({ notes: 'checked' }) },
  {
    route: '/api/ferments/[id]/empty',
    method: 'POST',
    allowed: LOGGERS,
    path: (fx) => `/api/ferments/${fx.a.fermentId}/empty`,
    body: () => ({ reason: 'distilled' }),
    isolated: true,
  },
  { route: '/api/ferments/[id]/readings', method: 'GET', allowed: EVERYONE, path: (fx) => `/api/ferments/${fx.a.fermentId}/readings` },
  {
    route: '/api/ferments/[id]/readings',
    method: 'POST',
    allowed: LOGGERS,
    path: (fx) => `/api/ferments/${fx.a.fermentId}/readings`,
    body: () => ({ value: 1.01, unit: 'sg', method: 'digital' }),
  },
  { route: '/api/ferments/[id]/forecast', method: 'GET', allowed: EVERYONE, path: (fx) => `/api/ferments/${fx.a.fermentId}/forecast` },
  {
    route: '/api/ferments/[id]/uploads',
    method: 'POST',
    allowed: LOGGERS,
    path: (fx) => `/api/ferments/${fx.a.fermentId}/uploads`,
    body: () => CSV,
    note: 'preview only: staging writes reading_uploads, never readings',
  },
  {
    route: '/api/ferments/[id]/uploads/[uploadId]/commit',
    method: 'POST',
    allowed: LOGGERS,
    path: (fx) => `/api/ferments/${fx.a.fermentId}/uploads/${'A'.repeat(32)}/commit`,
    note: 'an unknown upload id: 404 once past the gate',
  },
  { route: '/api/readings/[id]', method: 'PATCH', allowed: LOGGERS, path: (fx) => `/api/readings/${fx.a.readingId}`, body: () => ({ note: 'rechecked' }) },
  { route: '/api/readings/[id]', method: 'DELETE', allowed: LOGGERS, path: (fx) => `/api/readings/${fx.a.readingId}`, isolated: true },
  {
    route: '/api/readings/[id]/accept',
    method: 'POST',
    allowed: LOGGERS,
    path: (fx) => `/api/readings/${fx.a.readingId}/accept`,
    body: () => ({}),
    note: 'the fixture reading is not held for review: 409 once past the gate',
  },
];
