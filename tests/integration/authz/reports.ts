import type { RouteCase } from './types';

const range = '?from=2031-01-06&to=2031-01-19';

export const cases: RouteCase[] = [
  { route: '/api/runs/[id]/outcomes', method: 'GET', allowed: ['manager', 'planner', 'distiller'], path: (fx) => `/api/runs/${fx.a.runId}/outcomes` },
  // The fixture's run is planned: allowed roles get 409 (start it first), which still proves the gate.
  {
    route: '/api/runs/[id]/outcomes',
    method: 'PUT',
    allowed: ['manager', 'planner', 'distiller'],
    path: (fx) => `/api/runs/${fx.a.runId}/outcomes`,
    body: () => ({
      version: 1,
      chargeLitres: 900,
      chargeAbv: 8,
      fractions: [{ fraction: 'low_wines', volumeLitres: 240, alcoholmeterReading: 28, readingTempC: 20 }],
    }),
  },
  { route: '/api/reports', method: 'GET', allowed: ['manager', 'planner'], path: () => `/api/reports${range}`, crossTenant: false },
  { route: '/api/exports/ferments', method: 'GET', allowed: ['manager', 'planner'], path: () => `/api/exports/ferments${range}`, crossTenant: false },
  // A still of workspace A named in B's query: B's member gets 404 (the still is looked up in B).
  {
    route: '/api/exports/runs',
    method: 'GET',
    allowed: ['manager', 'planner'],
    path: (fx) => `/api/exports/runs${range}&still=${fx.a.stillId}`,
    crossTenant: true,
    note: 'with a still filter',
  },
  { route: '/api/exports/utilisation', method: 'GET', allowed: ['manager', 'planner'], path: () => `/api/exports/utilisation${range}`, crossTenant: false },
  { route: '/api/exports/workspace', method: 'GET', allowed: ['manager'], path: () => '/api/exports/workspace', crossTenant: false },
];
