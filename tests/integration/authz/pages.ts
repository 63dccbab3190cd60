/**
 * The declared authorization table for every page under src/pages (not src/pages/api).
 * tests/integration/authz-pages.test.ts discovers the .astro pages on disk and fails, by name,
 * for a page without exactly one case here. The export is `pageCases` (not `cases`), so the
 * API matrix, which collects `cases` from every file in this folder, does not pick these up.
 */
import { getDb } from '../../../src/db/client';
import * as t from '../../../src/db/schema';
import { newToken, hashToken } from '../../../src/server/auth/tokens';
import type { Fixture, Role } from './types';

const EVERYONE: readonly Role[] = ['manager', 'planner', 'distiller', 'staff'];

/** The API fixture plus what only pages need: live tokens of workspace A for the public link pages. */
export interface PageFixture extends Fixture {
  tokens: { invitation: string; passwordReset: string; signUpConfirm: string };
}

export interface PageCase {
  /** The page pattern exactly as derived from its file: src/pages/ferments/[id]/edit.astro -> '/ferments/[id]/edit'; index.astro -> its folder. */
  page: string;
  /** The concrete URL with workspace A's ids. */
  path: (fx: PageFixture) => string;
  /** Reachable without a session: the no-session call must answer 200 (private pages: 303 to /sign-in). */
  public?: true;
  /** Roles of workspace A that may open the page (answer `allowedStatus`, default 200); every other role must get the 403 page. */
  allowed: readonly Role[];
  /** What an allowed, signed-in role gets when it is not 200 (the sign-in page sends a signed-in person on). */
  allowedStatus?: number;
  /** A member of B (B's first allowed role) opens A's URL: expect the 404 page. Defaults to true when the page has an [id]. */
  crossTenant?: boolean;
  /**
   * Set to false only for a page that answers its refusal with its own 403 text instead of the shared
   * "not for your role" page (the status is checked all the same). Drop it once the page calls pageGate().
   */
  sharedRefusalPage?: false;
  note?: string;
}

/** Live single-use tokens of workspace A, made for the page matrix (only their hashes are stored). */
export async function addPageRows(fx: Fixture): Promise<PageFixture> {
  const db = getDb();
  const invitation = newToken();
  const passwordReset = newToken();
  const signUpConfirm = newToken();
  const week = new Date(Date.now() + 7 * 86400_000);
  await db.insert(t.invitations).values({
    workspaceId: fx.a.workspaceId,
    email: `page-invitee-${fx.a.workspaceId}@test.example`,
    role: 'distiller',
    tokenHash: hashToken(invitation),
    invitedBy: fx.a.users.manager.id,
    expiresAt: week,
  });
  await db
    .insert(t.emailTokens)
    .values({ purpose: 'password_reset', tokenHash: hashToken(passwordReset), email: fx.a.users.staff.email, userId: fx.a.users.staff.id, expiresAt: week });
  await db.insert(t.emailTokens).values({
    purpose: 'signup_confirm',
    tokenHash: hashToken(signUpConfirm),
    email: `page-signup-${fx.a.workspaceId}@test.example`,
    payload: { name: 'New Founder', workspaceName: 'New Still House' },
    expiresAt: week,
  });
  return { ...fx, tokens: { invitation, passwordReset, signUpConfirm } };
}

export const pageCases: PageCase[] = [
  // The board and what hangs off it: every member.
  { page: '/', allowed: EVERYONE, path: () => '/' },
  { page: '/board/day', allowed: EVERYONE, path: () => '/board/day' },
  { page: '/runs/[id]', allowed: EVERYONE, path: (fx) => `/runs/${fx.a.runId}` },
  { page: '/reports/run-sheet', allowed: EVERYONE, path: () => '/reports/run-sheet', note: 'the printable board' },
  { page: '/vessels', allowed: EVERYONE, path: () => '/vessels', note: 'read by all, changed by managers' },

  // Ferments: everyone reads, planners and managers write, distillers also log readings.
  { page: '/ferments', allowed: EVERYONE, path: () => '/ferments' },
  { page: '/ferments/[id]', allowed: EVERYONE, path: (fx) => `/ferments/${fx.a.fermentId}` },
  { page: '/ferments/new', allowed: ['manager', 'planner', 'distiller'], path: () => '/ferments/new', note: 'distillers start ferments on the floor' },
  { page: '/ferments/[id]/edit', allowed: ['manager', 'planner'], path: (fx) => `/ferments/${fx.a.fermentId}/edit` },
  { page: '/ferments/[id]/log', allowed: ['manager', 'planner', 'distiller'], path: (fx) => `/ferments/${fx.a.fermentId}/log` },

  // Runs: recording what a run gave is for those who operate the still.
  { page: '/runs/[id]/record', allowed: ['manager', 'planner', 'distiller'], path: (fx) => `/runs/${fx.a.runId}/record` },

  // Reports: managers and planners.
  { page: '/reports', allowed: ['manager', 'planner'], path: () => '/reports' },

  // Getting started: the people who set the distillery up.
  { page: '/setup', allowed: ['manager', 'planner'], path: () => '/setup', note: 'the getting-started checklist' },

  // Settings.
  { page: '/settings', allowed: EVERYONE, path: () => '/settings' },
  { page: '/settings/notifications', allowed: EVERYONE, path: () => '/settings/notifications', note: 'one’s own e-mails' },
  { page: '/settings/feeds', allowed: EVERYONE, path: () => '/settings/feeds', note: 'one’s own calendar feeds' },
  { page: '/settings/members', allowed: ['manager'], path: () => '/settings/members' },
  { page: '/settings/audit', allowed: ['manager'], path: () => '/settings/audit' },
  { page: '/settings/mailbox', allowed: ['manager'], path: () => '/settings/mailbox', note: 'exists in demo, development and test mode only' },
  { page: '/account', allowed: EVERYONE, path: () => '/account', note: 'needs a session, not a role' },

  // Public pages: reachable without a session.
  { page: '/sign-in', public: true, allowed: EVERYONE, allowedStatus: 302, path: () => '/sign-in', note: 'a signed-in person is sent to the board' },
  { page: '/sign-up', public: true, allowed: EVERYONE, allowedStatus: 302, path: () => '/sign-up', note: 'a signed-in person is sent to the board' },
  { page: '/forgot-password', public: true, allowed: EVERYONE, path: () => '/forgot-password' },
  { page: '/confirm/[token]', public: true, allowed: EVERYONE, path: (fx) => `/confirm/${fx.tokens.signUpConfirm}` },
  { page: '/reset-password/[token]', public: true, allowed: EVERYONE, path: (fx) => `/reset-password/${fx.tokens.passwordReset}` },
  { page: '/invite/[token]', public: true, allowed: EVERYONE, path: (fx) => `/invite/${fx.tokens.invitation}` },
];
