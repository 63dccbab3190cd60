/**
 * The declared authorization table for every API route. Each file in this folder
 * (except this one and fixture.ts) exports `cases: RouteCase[]`; tests/integration/authz-matrix.test.ts
 * collects them, discovers every route file under src/pages/api, and fails when a
 * route/method on disk has no case. See README.md in this folder.
 */
import type { Role } from '../../../src/lib/vocabulary';

export type { Role };
export type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';

/** A person of one workspace in the fixture. */
export interface FixtureUser {
  id: number;
  email: string;
}

/** Ids that exist in one workspace of the fixture (built fresh with getDb()). */
export interface WorkspaceIds {
  workspaceId: number;
  workspaceName: string;
  users: Record<Role, FixtureUser>;
  stillId: number;
  closureId: number;
  fermenterId: number;
  washTypeId: number;
  fermentId: number;
  readingId: number;
  runId: number;
  feedId: number;
  /** The plain token of the workspace-scope calendar feed (only its hash is stored). */
  feedToken: string;
  /** A pending invitation (not accepted, not expired). */
  invitationId: number;
  /** Public handle (not the secret id) of a live session of A's manager, for /api/account/sessions/[handle]. */
  managerSessionHandle: string;
}

/** Two workspaces, A and B, each with the same kinds of rows. Cases address A. */
export interface Fixture {
  a: WorkspaceIds;
  b: WorkspaceIds;
}

export interface RouteCase {
  /** URL pattern exactly as derived from the file path: src/pages/api/ferments/[id]/readings.ts -> '/api/ferments/[id]/readings'. */
  route: string;
  method: Method;
  /** Reachable without a session (sign-in, health, tokenised feeds...): the no-session call must not be 401/403. */
  public?: true;
  /** Roles of workspace A that pass the authorization gate (not 401/403). Every other role must get 403. */
  allowed: readonly Role[];
  /** The concrete URL to call, with workspace A's ids, e.g. (fx) => `/api/ferments/${fx.a.fermentId}`. */
  path: (fx: Fixture) => string;
  /** JSON body to send (optional). A valid body makes the test stronger; an invalid one still proves the gate (400 is "allowed"). */
  body?: (fx: Fixture) => unknown;
  /**
   * A member of workspace B (with B's first allowed role) calls A's path: expect 404 and no row of A changed.
   * Defaults to true when the route has a [param], false otherwise.
   */
  crossTenant?: boolean;
  /**
   * The call changes or deletes something the other cases rely on (deleting the workspace, removing a member,
   * changing a role): the case then runs against its own fresh fixture.
   */
  isolated?: true;
  /** Statuses an allowed call may answer (default: anything except 401 and 403). Use sparingly. */
  allowedStatus?: readonly number[];
  /** Free text shown in the test name. */
  note?: string;
}
