import type { AstroGlobal } from 'astro';
import { z } from 'zod';
import { ACTIONS, can, type Action } from './authz';
import { HttpError } from './http';
import type { Role } from '../lib/vocabulary';
import type { WorkspaceSettings } from './workspaces';
import type { Ctx, UserCtx } from './context';

/**
 * The page gate: pages are authorized like API routes. A page calls `pageGate(Astro, action)`
 * first thing in its frontmatter, then `pageRow()` for its [id]:
 *
 *   const gate = await pageGate(Astro, 'ferments.write');
 *   if (!gate.ok) return gate.response;          // 303 sign-in, or the 403 "not for your role" page
 *   const found = await pageRow(Astro, (id) => getFerment(gate.ctx, id));
 *   if (!found.ok) return found.response;        // the 404 page: bad id, or not in this distillery
 *
 * Same order as route(): no session, role, then the row. A refused role or id is never a 500.
 */

export interface PageAccess {
  user: NonNullable<App.Locals['user']>;
  workspace: WorkspaceSettings;
  role: Role;
  /** The one caller context server functions take first (see context.ts). */
  ctx: Ctx;
}

export type Refused = { ok: false; response: Response };
export type Gate = ({ ok: true } & PageAccess) | Refused;

/** What each action lets a person do, in words the 403 page can say ("Reports are for …"). */
export const ACTION_WORDS: Record<Action, { what: string; verb: 'is' | 'are' }> = {
  'board.read': { what: 'The board', verb: 'is' },
  'ferments.read': { what: 'Ferments', verb: 'are' },
  'ferments.write': { what: 'Editing ferments', verb: 'is' },
  'ferments.start': { what: 'Starting ferments', verb: 'is' },
  'ferments.empty': { what: 'Marking a fermenter emptied', verb: 'is' },
  'readings.write': { what: 'Logging readings', verb: 'is' },
  'runs.book': { what: 'Booking runs', verb: 'is' },
  'runs.move': { what: 'Moving runs', verb: 'is' },
  'runs.operate': { what: 'Recording what a run gave', verb: 'is' },
  'runs.correct_times': { what: 'Correcting when a run started or finished', verb: 'is' },
  'feeds.own': { what: 'Calendar feeds', verb: 'are' },
  'feeds.manage': { what: 'Managing everyone’s calendar feeds', verb: 'is' },
  'reports.read': { what: 'Reports', verb: 'are' },
  'exports.full': { what: 'The full export of the distillery', verb: 'is' },
  'vessels.manage': { what: 'Changing stills and fermenters', verb: 'is' },
  'washtypes.manage': { what: 'Changing wash types', verb: 'is' },
  'settings.manage': { what: 'Distillery settings', verb: 'are' },
  'members.manage': { what: 'Members and invitations', verb: 'are' },
  'audit.read': { what: 'The audit log', verb: 'is' },
  'mailbox.read': { what: 'The test mailbox', verb: 'is' },
  'setup.read': { what: 'The getting-started checklist', verb: 'is' },
};

const ROLE_PLURAL: Record<Role, string> = { manager: 'managers', planner: 'planners', distiller: 'distillers', staff: 'staff' };

/** "managers and planners", "managers, planners and distillers". */
export function whoMay(action: Action): string {
  const names = (ACTIONS[action] as readonly Role[]).map((r) => ROLE_PLURAL[r]);
  return names.length <= 1 ? (names[0] ?? 'nobody') : `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}

/** The action named in /403?need=…, validated; anything else reads as "no action given". */
export const NeedQuery = z.enum(Object.keys(ACTIONS) as [Action, ...Action[]]);

/** Answer the "not for your role" page (src/pages/403.astro, status 403) in place of this page. */
export function notForYourRole(Astro: AstroGlobal, action: Action): Promise<Response> {
  return Astro.rewrite(`/403?need=${encodeURIComponent(action)}`);
}

/** Answer the 404 page (Astro gives a rewrite to /404 the status 404). */
export function notFoundPage(Astro: AstroGlobal): Promise<Response> {
  return Astro.rewrite('/404');
}

/** A signed-in person with a distillery whose role may take `action`, or the answer to send instead. */
export async function pageGate(Astro: AstroGlobal, action: Action): Promise<Gate> {
  const { user, workspace, role } = Astro.locals;
  // The middleware already sends visitors without a session to sign in; kept here so a page is safe on its own.
  if (!user) return { ok: false, response: Astro.redirect(`/sign-in?next=${encodeURIComponent(Astro.url.pathname + Astro.url.search)}`, 303) };
  // Signed in but no longer a member of any distillery: their account page is all there is.
  if (!workspace || !role) return { ok: false, response: Astro.redirect('/account', 303) };
  if (!can(role, action)) return { ok: false, response: await notForYourRole(Astro, action) };
  return { ok: true, user, workspace, role, ctx: { ws: workspace, actor: { userId: user.id, role, ip: Astro.clientAddress ?? 'unknown' } } };
}

/** Pages that need a session but no role (the person's own account). */
export function signedInGate(Astro: AstroGlobal): { ok: true; user: PageAccess['user']; me: UserCtx } | Refused {
  const { user, sessionId } = Astro.locals;
  if (!user || !sessionId) return { ok: false, response: Astro.redirect(`/sign-in?next=${encodeURIComponent(Astro.url.pathname + Astro.url.search)}`, 303) };
  return { ok: true, user, me: { userId: user.id, email: user.email, name: user.name, sessionId, ip: Astro.clientAddress ?? 'unknown' } };
}

/** A page's id parameter: a positive integer (at most 15 digits, so it is exact). */
export const PageId = z
  .string()
  .regex(/^\d{1,15}$/)
  .transform(Number)
  .pipe(z.number().int().positive().max(Number.MAX_SAFE_INTEGER));

export function pageId(param: string | undefined): number | null {
  const parsed = PageId.safeParse(param);
  return parsed.success ? parsed.data : null;
}

/**
 * Load the row a page shows by its [id] (or another param), scoped to this workspace by the loader.
 * An id that is not a positive integer, a loader answering null, or a 404 HttpError: the 404 page.
 */
export async function pageRow<T>(
  Astro: AstroGlobal,
  load: (id: number) => Promise<T | null>,
  param: string | undefined = Astro.params.id,
): Promise<{ ok: true; id: number; row: T } | Refused> {
  const id = pageId(param);
  if (id === null) return { ok: false, response: await notFoundPage(Astro) };
  let row: T | null;
  try {
    row = await load(id);
  } catch (err) {
    if (err instanceof HttpError && err.status === 404) return { ok: false, response: await notFoundPage(Astro) };
    throw err;
  }
  if (row === null || row === undefined) return { ok: false, response: await notFoundPage(Astro) };
  return { ok: true, id, row };
}
