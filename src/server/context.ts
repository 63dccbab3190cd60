/**
 * The one caller context. route() builds it once from the session (the middleware has already
 * checked the person's membership), and every server function that acts for someone takes it
 * first: `listFerments(ctx, filters)`, `createRun(ctx, input)`. Queries are scoped by
 * `ctx.ws.id`, never by an id sent in the request.
 */
import type { Role } from '../lib/vocabulary';
import type { WorkspaceSettings } from './workspaces';

/** Who is acting: the signed-in person, their role in this workspace, and their address (for the audit log). */
export interface Actor {
  userId: number;
  role: Role;
  ip: string;
}

/** The workspace (its settings: time zone, units, stable days ...) and the actor. */
export interface Ctx {
  ws: WorkspaceSettings;
  actor: Actor;
}

/** A signed-in person acting on their own account (no workspace role needed). */
export interface UserCtx {
  userId: number;
  email: string;
  name: string;
  sessionId: string;
  ip: string;
}

/** A context for work done by the system itself (scripts, background jobs, tests). */
export function systemCtx(ws: WorkspaceSettings, userId = 0, role: Role = 'manager'): Ctx {
  return { ws, actor: { userId, role, ip: 'system' } };
}
