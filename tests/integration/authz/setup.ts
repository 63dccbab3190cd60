/** The getting-started checklist. */
import type { RouteCase } from './types';

export const cases: RouteCase[] = [
  {
    route: '/api/workspace/setup',
    method: 'GET',
    allowed: ['manager', 'planner'],
    path: () => '/api/workspace/setup',
    crossTenant: false,
    allowedStatus: [200],
  },
  {
    route: '/api/workspace/setup/dismiss',
    method: 'POST',
    allowed: ['manager'],
    path: () => '/api/workspace/setup/dismiss',
    body: () => ({ dismissed: true }),
    crossTenant: false,
    allowedStatus: [200],
  },
];
