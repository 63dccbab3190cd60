/** Accounts, sign-in, members, workspace settings, audit log, health. */
import type { RouteCase } from './types';
import { ROLES } from '../../../src/lib/vocabulary';

const ALL = ROLES;
const MANAGER = ['manager'] as const;

export const cases: RouteCase[] = [
  { route: '/api/health', method: 'GET', public: true, allowed: ALL, path: () => '/api/health' },

  // Public auth routes: empty bodies are refused as invalid (400), which records no sign-in failure.
  { route: '/api/auth/sign-in', method: 'POST', public: true, allowed: ALL, path: () => '/api/auth/sign-in', body: () => ({}), allowedStatus: [400] },
  { route: '/api/auth/sign-out', method: 'POST', public: true, allowed: ALL, path: () => '/api/auth/sign-out' },
  { route: '/api/auth/sign-up', method: 'POST', public: true, allowed: ALL, path: () => '/api/auth/sign-up', body: () => ({}), allowedStatus: [400] },
  { route: '/api/auth/confirm', method: 'POST', public: true, allowed: ALL, path: () => '/api/auth/confirm', body: () => ({}), allowedStatus: [400] },
  {
    route: '/api/auth/forgot-password',
    method: 'POST',
    public: true,
    allowed: ALL,
    path: () => '/api/auth/forgot-password',
    body: () => ({}),
    allowedStatus: [400],
  },
  {
    route: '/api/auth/reset-password',
    method: 'POST',
    public: true,
    allowed: ALL,
    path: () => '/api/auth/reset-password',
    body: () => ({}),
    allowedStatus: [400],
  },
  {
    route: '/api/auth/accept-invitation',
    method: 'POST',
    public: true,
    allowed: ALL,
    path: () => '/api/auth/accept-invitation',
    body: () => ({ token: 'not-a-real-invitation-token' }),
    allowedStatus: [410],
  },
  // Needs a session, any role; a member of B cannot switch into A.
  {
    route: '/api/auth/switch-workspace',
    method: 'POST',
    allowed: ALL,
    crossTenant: true,
    path: () => '/api/auth/switch-workspace',
    body: (fx) => ({ workspaceId: fx.a.workspaceId }),
    allowedStatus: [200],
  },

  // Your own account: any signed-in person.
  { route: '/api/account', method: 'GET', allowed: ALL, path: () => '/api/account', allowedStatus: [200] },
  { route: '/api/account', method: 'PATCH', allowed: ALL, path: () => '/api/account', body: () => ({ name: 'Same person' }), allowedStatus: [200] },
  {
    route: '/api/account/password',
    method: 'POST',
    allowed: ALL,
    path: () => '/api/account/password',
    body: () => ({ currentPassword: 'wrong password here', newPassword: 'another long password' }),
    allowedStatus: [400],
  },
  { route: '/api/account/sign-out-everywhere', method: 'POST', allowed: ALL, path: () => '/api/account/sign-out-everywhere', isolated: true },
  {
    route: '/api/account/sessions/[handle]',
    method: 'DELETE',
    allowed: ALL,
    path: (fx) => `/api/account/sessions/${fx.a.managerSessionHandle}`,
    note: "A's manager's session",
  },

  // Members and invitations: manager only.
  { route: '/api/members', method: 'GET', allowed: MANAGER, path: () => '/api/members', allowedStatus: [200] },
  {
    route: '/api/members/[id]',
    method: 'PATCH',
    allowed: MANAGER,
    path: (fx) => `/api/members/${fx.a.users.staff.id}`,
    body: () => ({ role: 'staff' }),
    allowedStatus: [200],
  },
  { route: '/api/members/[id]', method: 'DELETE', allowed: MANAGER, path: (fx) => `/api/members/${fx.a.users.staff.id}`, isolated: true, allowedStatus: [200] },
  {
    route: '/api/members/invitations',
    method: 'POST',
    allowed: MANAGER,
    path: () => '/api/members/invitations',
    body: () => ({ email: `matrix-${Date.now()}@test.example`, role: 'staff' }),
    allowedStatus: [201],
  },
  {
    route: '/api/members/invitations/[id]',
    method: 'DELETE',
    allowed: MANAGER,
    path: (fx) => `/api/members/invitations/${fx.a.invitationId}`,
    allowedStatus: [200],
  },

  // The distillery itself.
  { route: '/api/workspace', method: 'GET', allowed: ALL, path: () => '/api/workspace', allowedStatus: [200] },
  {
    route: '/api/workspace',
    method: 'PATCH',
    allowed: MANAGER,
    path: () => '/api/workspace',
    body: (fx) => ({
      name: fx.a.workspaceName,
      timeZone: 'Europe/London',
      units: 'metric',
      calibrationTempC: 20,
      stableDays: 3,
      stableTolerance: 0.001,
      wortCorrectionFactor: 1.04,
    }),
    allowedStatus: [200],
  },
  {
    route: '/api/workspace',
    method: 'DELETE',
    allowed: MANAGER,
    path: () => '/api/workspace',
    body: (fx) => ({ confirmName: fx.a.workspaceName }),
    isolated: true,
    allowedStatus: [200],
  },
  { route: '/api/audit', method: 'GET', allowed: MANAGER, path: () => '/api/audit', allowedStatus: [200] },
];
