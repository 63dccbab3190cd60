/**
 * People and the distillery itself: members and roles, invitations, workspace settings,
 * deleting a workspace, and reading the audit log. Every query is scoped by the
 * workspace of the caller's context (ctx.ws.id), never by an id from the request alone.
 */
import { and, eq, isNull, gt, asc, desc, sql, gte, lt, type SQL } from 'drizzle-orm';
import { getDb } from '../db/client';
import { memberships, users, invitations, workspaces, sessions, auditLog } from '../db/schema';
import type { FermenterReleaseMoment, NumberFormat, Role, UnitSystem } from '../lib/vocabulary';
import type { Ctx } from './context';
import { HttpError, conflict, notFound } from './http';
import { audit } from './audit';
import { inRetriedTransaction, type Tx } from './tx';
import { enqueue } from './mail/outbox';
import { invitationMail } from './mail/templates';
import { newToken, hashToken } from './auth/tokens';
import { hashPassword } from './auth/password';
import { createSession } from './auth/session';
import { normaliseEmail } from './accounts';
import { publicUrl } from '../config';

export const INVITATION_DAYS = 7;
const LAST_MANAGER = 'A distillery needs at least one manager. Make someone else a manager first.';

export interface MemberRow {
  userId: number;
  name: string;
  email: string;
  role: Role;
  joinedAt: Date;
}
export interface PendingInvitation {
  id: number;
  email: string;
  role: Role;
  expiresAt: Date;
  invitedByName: string | null;
}

export async function listMembers(ctx: Ctx): Promise<MemberRow[]> {
  return getDb()
    .select({ userId: users.id, name: users.name, email: users.email, role: memberships.role, joinedAt: memberships.createdAt })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.workspaceId, ctx.ws.id))
    .orderBy(asc(users.name));
}

export async function listPendingInvitations(ctx: Ctx): Promise<PendingInvitation[]> {
  return getDb()
    .select({ id: invitations.id, email: invitations.email, role: invitations.role, expiresAt: invitations.expiresAt, invitedByName: users.name })
    .from(invitations)
    .leftJoin(users, eq(users.id, invitations.invitedBy))
    .where(and(eq(invitations.workspaceId, ctx.ws.id), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, new Date())))
    .orderBy(desc(invitations.createdAt));
}

/** Invite an address with a role: a 7-day single-use link by e-mail. Re-inviting replaces the older link. */
export async function invite(ctx: Ctx, input: { email: string; role: Role }): Promise<{ invitationId: number }> {
  const { ws, actor } = ctx;
  const email = normaliseEmail(input.email);
  const db = getDb();
  return db.transaction(async (tx) => {
    const [member] = await tx
      .select({ id: users.id })
      .from(users)
      .innerJoin(memberships, and(eq(memberships.userId, users.id), eq(memberships.workspaceId, ws.id)))
      .where(eq(users.email, email))
      .limit(1);
    if (member) throw conflict(`${email} is already a member of this distillery.`);
    const [named] = await tx.select({ name: workspaces.name }).from(workspaces).where(eq(workspaces.id, ws.id)).limit(1);
    const [inviter] = await tx.select({ name: users.name }).from(users).where(eq(users.id, actor.userId)).limit(1);
    await tx
      .update(invitations)
      .set({ revokedAt: new Date() })
      .where(and(eq(invitations.workspaceId, ws.id), eq(invitations.email, email), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)));
    const token = newToken();
    const [row] = await tx
      .insert(invitations)
      .values({
        workspaceId: ws.id,
        email,
        role: input.role,
        tokenHash: hashToken(token),
        invitedBy: actor.userId,
        expiresAt: new Date(Date.now() + INVITATION_DAYS * 86400_000),
      })
      .$returningId();
    const mail = invitationMail({
      workspaceName: named?.name ?? 'a distillery',
      inviterName: inviter?.name ?? 'A manager',
      role: input.role,
      link: publicUrl(`/invite/${token}`),
      days: INVITATION_DAYS,
    });
    await enqueue(tx, { workspaceId: ws.id, kind: 'invitation', to: email, ...mail });
    await audit(
      {
        workspaceId: ws.id,
        userId: actor.userId,
        action: 'member.invited',
        entityType: 'invitation',
        entityId: row!.id,
        details: { email, role: input.role },
        ip: actor.ip,
      },
      tx,
    );
    return { invitationId: row!.id };
  });
}

export async function revokeInvitation(ctx: Ctx, invitationId: number): Promise<void> {
  const { ws, actor } = ctx;
  const db = getDb();
  await db.transaction(async (tx) => {
    const [res] = await tx
      .update(invitations)
      .set({ revokedAt: new Date() })
      .where(and(eq(invitations.id, invitationId), eq(invitations.workspaceId, ws.id), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)));
    if ((res as { affectedRows?: number }).affectedRows !== 1) throw notFound('No such invitation.');
    await audit(
      { workspaceId: ws.id, userId: actor.userId, action: 'member.invitation_revoked', entityType: 'invitation', entityId: invitationId, ip: actor.ip },
      tx,
    );
  });
}

/**
 * Bump the workspace row, then lock the workspace's memberships and return the target's row
 * plus the manager count. Row locks alone are node-local on a Galera cluster: two managers
 * demoting each other through two nodes would each count two managers and both commit. The
 * bump makes both transactions write the same row, so the second to commit fails
 * certification (1213) and is replayed by inRetriedTransaction, now seeing the first's
 * change; on one MariaDB the bump's row lock serialises them the same way.
 */
async function lockMembers(tx: Tx, workspaceId: number, userId: number) {
  await tx
    .update(workspaces)
    .set({ updatedAt: sql`GREATEST(CURRENT_TIMESTAMP(3), ${workspaces.updatedAt} + INTERVAL 1000 MICROSECOND)` })
    .where(eq(workspaces.id, workspaceId));
  const rows = await tx
    .select({ userId: memberships.userId, role: memberships.role })
    .from(memberships)
    .where(eq(memberships.workspaceId, workspaceId))
    .for('update');
  const target = rows.find((r) => r.userId === userId);
  if (!target) throw notFound('No such member in this distillery.');
  return { target, managers: rows.filter((r) => r.role === 'manager').length };
}

/** Change a member's role. Refuses (409) to leave the distillery without a manager, even under concurrent changes. */
export async function changeRole(ctx: Ctx, userId: number, role: Role): Promise<void> {
  const { ws, actor } = ctx;
  await inRetriedTransaction(async (tx) => {
    const { target, managers } = await lockMembers(tx, ws.id, userId);
    if (target.role === role) return;
    if (target.role === 'manager' && managers <= 1) throw conflict(LAST_MANAGER);
    await tx
      .update(memberships)
      .set({ role })
      .where(and(eq(memberships.workspaceId, ws.id), eq(memberships.userId, userId)));
    await audit(
      {
        workspaceId: ws.id,
        userId: actor.userId,
        action: 'member.role_changed',
        entityType: 'user',
        entityId: userId,
        details: { from: target.role, to: role },
        ip: actor.ip,
      },
      tx,
    );
  });
}

/** Remove a member (their calendar feeds stop opening at once). Refuses (409) to remove the last manager. */
export async function removeMember(ctx: Ctx, userId: number): Promise<void> {
  const { ws, actor } = ctx;
  await inRetriedTransaction(async (tx) => {
    const { target, managers } = await lockMembers(tx, ws.id, userId);
    if (target.role === 'manager' && managers <= 1) throw conflict(LAST_MANAGER);
    await tx.delete(memberships).where(and(eq(memberships.workspaceId, ws.id), eq(memberships.userId, userId)));
    // Sessions that were looking at this distillery fall back to another of the person's distilleries.
    await tx
      .update(sessions)
      .set({ workspaceId: null })
      .where(and(eq(sessions.userId, userId), eq(sessions.workspaceId, ws.id)));
    await audit(
      {
        workspaceId: ws.id,
        userId: actor.userId,
        action: 'member.removed',
        entityType: 'user',
        entityId: userId,
        details: { role: target.role },
        ip: actor.ip,
      },
      tx,
    );
  });
}

// --- Accepting an invitation ------------------------------------------------

export interface InvitationView {
  id: number;
  workspaceId: number;
  workspaceName: string;
  email: string;
  role: Role;
  hasAccount: boolean;
  expiresAt: Date;
}

export async function findInvitation(token: string): Promise<InvitationView | null> {
  if (!token || token.length > 200) return null;
  const db = getDb();
  const [row] = await db
    .select({
      id: invitations.id,
      workspaceId: invitations.workspaceId,
      workspaceName: workspaces.name,
      email: invitations.email,
      role: invitations.role,
      expiresAt: invitations.expiresAt,
    })
    .from(invitations)
    .innerJoin(workspaces, eq(workspaces.id, invitations.workspaceId))
    .where(
      and(eq(invitations.tokenHash, hashToken(token)), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, new Date())),
    )
    .limit(1);
  if (!row) return null;
  const [u] = await db.select({ id: users.id }).from(users).where(eq(users.email, row.email)).limit(1);
  return { ...row, hasAccount: !!u };
}

/**
 * Accept an invitation. An address that has an account must be signed in as that person;
 * a new address sets a name and password here. Either way the invitation is spent once.
 */
export async function acceptInvitation(
  token: string,
  input: { signedInUserId: number | null; name?: string; password?: string; ip: string; userAgent: string | null },
): Promise<{ workspaceId: number; userId: number; newSession: { id: string; token: string } | null }> {
  const inv = await findInvitation(token);
  if (!inv)
    throw new HttpError(410, 'link_expired', 'This invitation has expired, been withdrawn or already been used. Ask the distillery manager for a new one.');
  const db = getDb();
  const [existing] = await db.select({ id: users.id, email: users.email }).from(users).where(eq(users.email, inv.email)).limit(1);
  let passwordHash: string | null = null;
  if (existing) {
    if (input.signedInUserId == null) throw new HttpError(401, 'sign_in_required', `Sign in as ${inv.email} to accept this invitation.`);
    if (input.signedInUserId !== existing.id)
      throw new HttpError(403, 'wrong_person', `This invitation is for ${inv.email}. Sign out and sign in as that person to accept it.`);
  } else {
    if (!input.name || !input.password)
      throw new HttpError(400, 'invalid', 'Enter your name and choose a password.', {
        ...(input.name ? {} : { name: 'Enter your name.' }),
        ...(input.password ? {} : { password: 'Choose a password.' }),
      });
    passwordHash = await hashPassword(input.password);
  }
  const userId = await db.transaction(async (tx) => {
    const [res] = await tx
      .update(invitations)
      .set({ acceptedAt: new Date() })
      .where(and(eq(invitations.id, inv.id), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, new Date())));
    if ((res as { affectedRows?: number }).affectedRows !== 1) throw new HttpError(410, 'link_expired', 'This invitation has already been used.');
    let uid = existing?.id;
    if (!uid) {
      const [u] = await tx
        .insert(users)
        .values({ email: inv.email, name: input.name!, passwordHash: passwordHash!, emailVerifiedAt: new Date() })
        .$returningId();
      uid = u!.id;
    }
    await tx
      .insert(memberships)
      .values({ workspaceId: inv.workspaceId, userId: uid, role: inv.role })
      .onDuplicateKeyUpdate({ set: { role: sql`role` } });
    await audit(
      {
        workspaceId: inv.workspaceId,
        userId: uid,
        action: 'member.invitation_accepted',
        entityType: 'invitation',
        entityId: inv.id,
        details: { email: inv.email, role: inv.role },
        ip: input.ip,
      },
      tx,
    );
    return uid;
  });
  let newSession: { id: string; token: string } | null = null;
  if (!existing) newSession = await createSession(userId, inv.workspaceId, input.userAgent);
  return { workspaceId: inv.workspaceId, userId, newSession };
}

// --- Workspace settings and deletion ---------------------------------------

export interface SettingsInput {
  name: string;
  timeZone: string;
  units: UnitSystem;
  calibrationTempC: number;
  stableDays: number;
  stableTolerance: number;
  wortCorrectionFactor: number;
  numberFormat?: NumberFormat;
  atRiskThreshold?: number;
  startEarlyMarginMinutes?: number;
  releaseFermentersOn?: FermenterReleaseMoment;
  bookingHorizonDays?: number;
}

export async function updateWorkspaceSettings(ctx: Ctx, input: SettingsInput): Promise<void> {
  const { ws, actor } = ctx;
  const db = getDb();
  await db.transaction(async (tx) => {
    const [before] = await tx.select().from(workspaces).where(eq(workspaces.id, ws.id)).for('update').limit(1);
    if (!before) throw notFound();
    const changed: Record<string, { from: unknown; to: unknown }> = {};
    for (const k of Object.keys(input) as Array<keyof SettingsInput>) {
      if (input[k] === undefined) continue;
      if (before[k] !== input[k]) changed[k] = { from: before[k], to: input[k] };
    }
    if (!Object.keys(changed).length) return;
    await tx.update(workspaces).set(input).where(eq(workspaces.id, ws.id));
    await audit(
      {
        workspaceId: ws.id,
        userId: actor.userId,
        action: 'workspace.settings_changed',
        entityType: 'workspace',
        entityId: ws.id,
        details: changed,
        ip: actor.ip,
      },
      tx,
    );
  });
}

/** Delete the distillery and everything in it (the foreign keys cascade). The name must be typed exactly. */
export async function deleteWorkspace(ctx: Ctx, confirmName: string): Promise<void> {
  const { ws, actor } = ctx;
  const db = getDb();
  const [row] = await db.select({ name: workspaces.name }).from(workspaces).where(eq(workspaces.id, ws.id)).limit(1);
  if (!row) throw notFound();
  if (confirmName.trim() !== row.name)
    throw new HttpError(400, 'invalid', 'Type the distillery name exactly as shown to delete it.', { confirmName: 'The name does not match.' });
  await db.transaction(async (tx) => {
    // Kept outside the workspace (workspace_id NULL) so the deletion itself stays on record.
    await audit(
      {
        workspaceId: null,
        userId: actor.userId,
        action: 'workspace.deleted',
        entityType: 'workspace',
        entityId: ws.id,
        details: { name: row.name },
        ip: actor.ip,
      },
      tx,
    );
    await tx.delete(workspaces).where(eq(workspaces.id, ws.id));
  });
}

// --- Audit log ---------------------------------------------------------------

export const AUDIT_PAGE_SIZE = 50;
export interface AuditFilters {
  action?: string;
  userId?: number;
  from?: Date;
  to?: Date;
  page?: number;
}
export interface AuditRow {
  id: number;
  createdAt: Date;
  action: string;
  userId: number | null;
  userName: string | null;
  entityType: string | null;
  entityId: string | null;
  details: unknown;
  ip: string | null;
}

export async function listAudit(ctx: Ctx, f: AuditFilters): Promise<{ rows: AuditRow[]; page: number; hasMore: boolean; actions: string[] }> {
  const db = getDb();
  const workspaceId = ctx.ws.id;
  const where: SQL[] = [eq(auditLog.workspaceId, workspaceId)];
  if (f.action) where.push(eq(auditLog.action, f.action));
  if (f.userId) where.push(eq(auditLog.userId, f.userId));
  if (f.from) where.push(gte(auditLog.createdAt, f.from));
  if (f.to) where.push(lt(auditLog.createdAt, f.to));
  const page = Math.max(1, f.page ?? 1);
  const rows = await db
    .select({
      id: auditLog.id,
      createdAt: auditLog.createdAt,
      action: auditLog.action,
      userId: auditLog.userId,
      userName: users.name,
      entityType: auditLog.entityType,
      entityId: auditLog.entityId,
      details: auditLog.details,
      ip: auditLog.ip,
    })
    .from(auditLog)
    .leftJoin(users, eq(users.id, auditLog.userId))
    .where(and(...where))
    .orderBy(desc(auditLog.createdAt), desc(auditLog.id))
    .limit(AUDIT_PAGE_SIZE + 1)
    .offset((page - 1) * AUDIT_PAGE_SIZE);
  const actions = (
    await db.selectDistinct({ action: auditLog.action }).from(auditLog).where(eq(auditLog.workspaceId, workspaceId)).orderBy(asc(auditLog.action))
  ).map((r) => r.action);
  return { rows: rows.slice(0, AUDIT_PAGE_SIZE), page, hasMore: rows.length > AUDIT_PAGE_SIZE, actions };
}
