import { eq, sql } from 'drizzle-orm';
import { getDb } from '../db/client';
import { workspaces } from '../db/schema';
import { audit } from './audit';
import type { Ctx } from './context';
import { defaultWashTypes } from './vessels';

/**
 * The getting-started checklist of a new distillery. Each step ticks itself off from the data
 * (nothing is stored per step): a still, a fermenter, a wash type of its own, someone invited,
 * a first ferment, a calendar feed.
 */
export const SETUP_STEPS = ['still', 'fermenter', 'washType', 'people', 'ferment', 'feed'] as const;
export type SetupStep = (typeof SETUP_STEPS)[number];

export interface SetupProgress {
  steps: Record<SetupStep, boolean>;
  done: number;
  total: number;
  complete: boolean;
  /** When a manager put the checklist away (null = shown until complete). */
  dismissedAt: Date | null;
  /** Shown in the navigation and on the board: neither complete nor put away. */
  showLink: boolean;
}

/**
 * One query, one EXISTS per step, every one scoped by this workspace. The wash-type step counts
 * a wash type the distillery added or changed: a new distillery starts with the trade's defaults
 * (see defaultWashTypes()), which do not count on their own.
 */
export async function setupProgress(ctx: Ctx): Promise<SetupProgress> {
  const ws = ctx.ws.id;
  const defaults = defaultWashTypes();
  const defaultTuples = sql.join(
    defaults.map((d) => sql`(${d.name}, ${d.category}, ${d.terminalMin}, ${d.terminalMax}, ${d.typicalOg ?? -1})`),
    sql`, `,
  );
  const [rows] = (await getDb().execute(sql`
    SELECT
      EXISTS (SELECT 1 FROM stills WHERE workspace_id = ${ws}) AS still,
      EXISTS (SELECT 1 FROM fermenters WHERE workspace_id = ${ws}) AS fermenter,
      EXISTS (
        SELECT 1 FROM wash_types w
        WHERE w.workspace_id = ${ws}
          AND (w.name, w.category, w.terminal_min, w.terminal_max, COALESCE(w.typical_og, -1)) NOT IN (${defaultTuples})
      ) AS washType,
      (EXISTS (SELECT 1 FROM invitations WHERE workspace_id = ${ws} AND revoked_at IS NULL)
        OR (SELECT COUNT(*) FROM memberships WHERE workspace_id = ${ws}) > 1) AS people,
      EXISTS (SELECT 1 FROM ferments WHERE workspace_id = ${ws}) AS ferment,
      EXISTS (SELECT 1 FROM calendar_feeds WHERE workspace_id = ${ws} AND revoked_at IS NULL) AS feed
  `)) as unknown as [Array<Record<string, unknown>>];
  const row = rows[0] ?? {};
  const steps = Object.fromEntries(SETUP_STEPS.map((s) => [s, Number(row[s] ?? 0) === 1])) as Record<SetupStep, boolean>;
  const done = SETUP_STEPS.filter((s) => steps[s]).length;
  const complete = done === SETUP_STEPS.length;
  // Read with the session for this request (the session lookup carries the workspace's settings).
  const dismissedAt = ctx.ws.setupDismissedAt;
  return { steps, done, total: SETUP_STEPS.length, complete, dismissedAt, showLink: !complete && !dismissedAt };
}

/** A manager puts the checklist away (or brings it back); audited. */
export async function setSetupDismissed(ctx: Ctx, dismissed: boolean): Promise<Date | null> {
  const at = dismissed ? new Date() : null;
  await getDb().transaction(async (tx) => {
    await tx.update(workspaces).set({ setupDismissedAt: at }).where(eq(workspaces.id, ctx.ws.id));
    await audit(
      {
        workspaceId: ctx.ws.id,
        userId: ctx.actor.userId,
        action: dismissed ? 'workspace.setup_dismissed' : 'workspace.setup_restored',
        entityType: 'workspace',
        entityId: ctx.ws.id,
        ip: ctx.actor.ip,
      },
      tx,
    );
  });
  return at;
}
