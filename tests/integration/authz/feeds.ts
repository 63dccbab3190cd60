/** Calendar feeds and "my notifications". */
import type { RouteCase } from './types';
import { ROLES } from '../../../src/lib/vocabulary';

const ALL = ROLES;

export const cases: RouteCase[] = [
  // Every role may subscribe (feeds.own); the list is scoped by the session.
  { route: '/api/feeds', method: 'GET', allowed: ALL, crossTenant: false, path: () => '/api/feeds', allowedStatus: [200] },
  {
    route: '/api/feeds',
    method: 'POST',
    allowed: ALL,
    crossTenant: false,
    path: () => '/api/feeds',
    body: () => ({ scope: 'workspace', name: 'Matrix feed' }),
    allowedStatus: [201],
  },
  // The gate lets every role through; someone else's feed is then "not found" unless you manage feeds.
  {
    route: '/api/feeds/[id]',
    method: 'DELETE',
    allowed: ALL,
    isolated: true,
    path: (fx) => `/api/feeds/${fx.a.feedId}`,
    allowedStatus: [204, 404],
    note: "the manager's feed: 404 for other roles, 204 for the manager",
  },
  // The token is the capability: no session needed, and anyone holding it reads that one feed.
  {
    route: '/api/feeds/[token].ics',
    method: 'GET',
    public: true,
    allowed: ALL,
    crossTenant: false,
    path: (fx) => `/api/feeds/${fx.a.feedToken}.ics`,
    allowedStatus: [200, 304],
    note: 'tokenised calendar feed',
  },
  // Each person's own choices in the current distillery.
  { route: '/api/notifications', method: 'GET', allowed: ALL, crossTenant: false, path: () => '/api/notifications', allowedStatus: [200] },
  {
    route: '/api/notifications',
    method: 'PUT',
    allowed: ALL,
    crossTenant: false,
    path: () => '/api/notifications',
    body: () => ({ digest: false }),
    allowedStatus: [200],
  },
];
