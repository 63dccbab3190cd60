import type { RouteCase } from './types';

const EVERYONE = ['manager', 'planner', 'distiller', 'staff'] as const;
const BOOKERS = ['manager', 'planner'] as const;
const MOVERS = ['manager', 'planner', 'distiller'] as const;
const MANAGERS = ['manager'] as const;

let n = 0;
const unique = (prefix: string) => `${prefix}-${Date.now().toString(36)}-${++n}`;
/** A day `days` ahead of today (UTC), inside the booking horizon. */
const dayAhead = (days: number) => new Date(Date.now() + days * 86_400_000).toISOString().slice(0, 10);
const range = `from=${encodeURIComponent('2031-01-05T00:00:00Z')}&to=${encodeURIComponent('2031-01-12T00:00:00Z')}`;
/** A version no run has: allowed roles get 409 (stale) and nothing changes. */
const STALE = { version: 999_999 };
const hours = [1, 2, 3, 4, 5].map((weekday) => ({ weekday, open: '06:00', close: '22:00' }));
const typicalMinutes = { stripping: 300, spirit: 480, redistillation: 420, cleaning: 120, maintenance: 240 };

export const cases: RouteCase[] = [
  { route: '/api/board', method: 'GET', allowed: EVERYONE, path: () => `/api/board?${range}`, crossTenant: false },
  { route: '/api/board/suggestions', method: 'GET', allowed: MOVERS, path: (fx) => `/api/board/suggestions?runId=${fx.a.runId}`, crossTenant: true },
  {
    route: '/api/runs',
    method: 'POST',
    allowed: BOOKERS,
    path: () => '/api/runs',
    crossTenant: true,
    body: (fx) => ({ stillId: fx.a.stillId, type: 'cleaning', startsAt: `${dayAhead(30 + (n++ % 200))}T08:00:00Z`, durationMinutes: 60 }),
  },
  { route: '/api/runs/[id]', method: 'GET', allowed: EVERYONE, path: (fx) => `/api/runs/${fx.a.runId}` },
  {
    route: '/api/runs/[id]',
    method: 'PATCH',
    allowed: MOVERS,
    path: (fx) => `/api/runs/${fx.a.runId}`,
    body: () => ({ ...STALE, startsAt: `${dayAhead(60)}T08:00:00Z` }),
    note: 'a move (distillers may); a stale version answers 409 and changes nothing',
  },
  { route: '/api/runs/[id]/cancel', method: 'POST', allowed: BOOKERS, path: (fx) => `/api/runs/${fx.a.runId}/cancel`, body: () => STALE },
  { route: '/api/runs/[id]/start', method: 'POST', allowed: MOVERS, path: (fx) => `/api/runs/${fx.a.runId}/start`, body: () => STALE },
  { route: '/api/runs/[id]/finish', method: 'POST', allowed: MOVERS, path: (fx) => `/api/runs/${fx.a.runId}/finish`, body: () => STALE },
  {
    route: '/api/runs/[id]/actual-times',
    method: 'PATCH',
    allowed: BOOKERS,
    path: (fx) => `/api/runs/${fx.a.runId}/actual-times`,
    body: () => ({ ...STALE, startedAt: new Date().toISOString(), reason: 'authorization matrix' }),
    note: 'correcting actual times (managers and planners); a stale version answers 409 and changes nothing',
  },
  { route: '/api/stills', method: 'GET', allowed: EVERYONE, path: () => '/api/stills', crossTenant: false },
  {
    route: '/api/stills',
    method: 'POST',
    allowed: MANAGERS,
    path: () => '/api/stills',
    crossTenant: false,
    body: () => ({
      name: unique('Still'),
      kind: 'pot',
      capacityLitres: 800,
      heatingKw: 30,
      operatingHours: hours,
      cleaningAfterRunMinutes: 30,
      typicalMinutes,
    }),
  },
  { route: '/api/stills/[id]', method: 'PATCH', allowed: MANAGERS, path: (fx) => `/api/stills/${fx.a.stillId}`, body: () => ({ heatingKw: 31 }) },
  { route: '/api/stills/[id]', method: 'DELETE', allowed: MANAGERS, path: (fx) => `/api/stills/${fx.a.stillId}`, isolated: true },
  { route: '/api/stills/order', method: 'PUT', allowed: MANAGERS, path: () => '/api/stills/order', body: (fx) => ({ ids: [fx.a.stillId] }), crossTenant: true },
  { route: '/api/stills/closures', method: 'GET', allowed: EVERYONE, path: () => '/api/stills/closures', crossTenant: false },
  {
    route: '/api/stills/closures',
    method: 'POST',
    allowed: MANAGERS,
    path: () => '/api/stills/closures',
    crossTenant: true,
    body: (fx) => ({ stillId: fx.a.stillId, startsOn: dayAhead(40), endsOn: dayAhead(41), reason: 'Boiler service' }),
  },
  { route: '/api/stills/closures/[id]', method: 'DELETE', allowed: MANAGERS, path: (fx) => `/api/stills/closures/${fx.a.closureId}`, isolated: true },
];
