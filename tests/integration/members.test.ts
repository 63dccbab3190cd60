/** Members, roles, workspace settings and deletion, audit log and the dev mailbox, over HTTP. */
import { describe, it, expect } from 'vitest';
import { eq, and } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { readMailbox } from '../../src/server/mail/fake-smtp';
import { createTestWorkspace } from '../helpers/api';

const MAILBOX = process.env.MAILBOX_DIR ?? '.data/mailbox';
const unique = (p: string) => `${p}-${Date.now().toString(36)}${Math.floor(Math.random() * 1e6).toString(36)}@test.example`;
const roleOf = async (workspaceId: number, userId: number) =>
  (
    await getDb()
      .select({ role: t.memberships.role })
      .from(t.memberships)
      .where(and(eq(t.memberships.workspaceId, workspaceId), eq(t.memberships.userId, userId)))
  )[0]?.role ?? null;

describe('members', () => {
  it('the last manager can be neither demoted nor removed (409 with a clear message)', async () => {
    const ws = await createTestWorkspace('Last manager');
    const mgr = await ws.client('manager');
    const demote = await mgr.patch(`/api/members/${ws.users.manager.id}`, { role: 'planner' });
    expect(demote.status).toBe(409);
    expect(demote.json.error.message).toMatch(/at least one manager/);
    expect((await mgr.del(`/api/members/${ws.users.manager.id}`)).status).toBe(409);
    expect(await roleOf(ws.workspaceId, ws.users.manager.id)).toBe('manager');
    // With a second manager, the first may step down.
    expect((await mgr.patch(`/api/members/${ws.users.planner.id}`, { role: 'manager' })).status).toBe(200);
    expect((await mgr.patch(`/api/members/${ws.users.manager.id}`, { role: 'planner' })).status).toBe(200);
    expect(await roleOf(ws.workspaceId, ws.users.manager.id)).toBe('planner');
  });

  it('removing a member ends their access to this distillery', async () => {
    const ws = await createTestWorkspace('Remove');
    const mgr = await ws.client('manager');
    const staff = await ws.client('staff');
    expect((await staff.get('/api/workspace')).status).toBe(200);
    expect((await mgr.del(`/api/members/${ws.users.staff.id}`)).status).toBe(200);
    expect(await roleOf(ws.workspaceId, ws.users.staff.id)).toBeNull();
    expect((await staff.get('/api/workspace')).status).toBe(401);
    const audit = await mgr.get(`/api/audit?action=member.removed`);
    expect(audit.json.rows).toEqual([expect.objectContaining({ action: 'member.removed', entityId: String(ws.users.staff.id) })]);
  });

  it('re-inviting an address withdraws the older link; inviting a member is a conflict', async () => {
    const ws = await createTestWorkspace('Reinvite');
    const mgr = await ws.client('manager');
    const email = unique('twice');
    const first = (await mgr.post('/api/members/invitations', { email, role: 'staff' })).json.invitationId;
    const second = (await mgr.post('/api/members/invitations', { email, role: 'planner' })).json.invitationId;
    const pending = (await mgr.get('/api/members')).json.invitations as Array<{ id: number }>;
    expect(pending.map((p) => p.id)).toEqual([second]);
    expect(pending.map((p) => p.id)).not.toContain(first);
    expect((await mgr.post('/api/members/invitations', { email: ws.users.staff.email.toUpperCase(), role: 'staff' })).status).toBe(409);
  });
});

describe('tenant isolation', () => {
  it("a manager of another distillery gets 404 on this one's members and invitations, and nothing changes", async () => {
    const a = await createTestWorkspace('Tenant A');
    const b = await createTestWorkspace('Tenant B');
    const mgrA = await a.client('manager');
    const mgrB = await b.client('manager');
    const { invitationId } = (await mgrA.post('/api/members/invitations', { email: unique('a-invitee'), role: 'staff' })).json;
    expect((await mgrB.patch(`/api/members/${a.users.staff.id}`, { role: 'manager' })).status).toBe(404);
    expect((await mgrB.del(`/api/members/${a.users.planner.id}`)).status).toBe(404);
    expect((await mgrB.del(`/api/members/invitations/${invitationId}`)).status).toBe(404);
    expect((await mgrB.post('/api/auth/switch-workspace', { workspaceId: a.workspaceId })).status).toBe(404);
    expect(await roleOf(a.workspaceId, a.users.staff.id)).toBe('staff');
    expect(await roleOf(a.workspaceId, a.users.planner.id)).toBe('planner');
    const [inv] = await getDb().select().from(t.invitations).where(eq(t.invitations.id, invitationId));
    expect(inv!.revokedAt).toBeNull();
    // B's lists show only B.
    const listB = (await mgrB.get('/api/members')).json;
    expect(listB.members.map((m: { userId: number }) => m.userId).sort()).toEqual(
      Object.values(b.users)
        .map((u) => u.id)
        .sort(),
    );
    expect(listB.invitations).toEqual([]);
    expect((await mgrB.get('/api/audit')).json.rows.every((r: { userId: number | null }) => Object.values(b.users).some((u) => u.id === r.userId))).toBe(true);
  });

  it("the mailbox page shows a manager only mail to their own distillery's people", async () => {
    const a = await createTestWorkspace('Mail A');
    const b = await createTestWorkspace('Mail B');
    const emailA = unique('mail-a');
    const emailB = unique('mail-b');
    await (await a.client('manager')).post('/api/members/invitations', { email: emailA, role: 'staff' });
    await (await b.client('manager')).post('/api/members/invitations', { email: emailB, role: 'staff' });
    for (let i = 0; i < 80 && !(readMailbox(MAILBOX).some((m) => m.to.includes(emailA)) && readMailbox(MAILBOX).some((m) => m.to.includes(emailB))); i++)
      await new Promise((r) => setTimeout(r, 250));
    const page = await (await a.client('manager')).get('/settings/mailbox', { accept: 'text/html' });
    expect(page.status).toBe(200);
    expect(page.text).toContain(emailA);
    expect(page.text).not.toContain(emailB);
    expect((await (await a.client('staff')).get('/settings/mailbox', { accept: 'text/html' })).status).toBe(403);
  });
});

describe('workspace settings and deletion', () => {
  const settings = (name: string) => ({
    name,
    timeZone: 'America/Chicago',
    units: 'us',
    calibrationTempC: 15.56,
    stableDays: 4,
    stableTolerance: 0.0015,
    wortCorrectionFactor: 1.03,
  });

  it('a manager saves settings (audited); invalid values are refused field by field', async () => {
    const ws = await createTestWorkspace('Settings');
    const mgr = await ws.client('manager');
    expect((await mgr.patch('/api/workspace', settings('Renamed Distillery'))).status).toBe(200);
    const w = (await mgr.get('/api/workspace')).json.workspace;
    expect(w).toMatchObject({ name: 'Renamed Distillery', timeZone: 'America/Chicago', units: 'us', calibrationTempC: 15.56, stableDays: 4 });
    const bad = await mgr.patch('/api/workspace', { ...settings('X Y'), timeZone: 'Mars/Olympus', calibrationTempC: 18 });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.json.error.fields).sort()).toEqual(['calibrationTempC', 'timeZone']);
    const audit = (await mgr.get('/api/audit?action=workspace.settings_changed')).json.rows;
    expect(audit[0].details.name).toEqual({ from: expect.stringContaining('Settings'), to: 'Renamed Distillery' });
    expect((await (await ws.client('planner')).patch('/api/workspace', settings('Nope'))).status).toBe(403);
  });

  it('audit filters by person and date range', async () => {
    const ws = await createTestWorkspace('Audit filters');
    const mgr = await ws.client('manager');
    await ws.client('staff');
    const all = (await mgr.get('/api/audit')).json;
    expect(all.rows.length).toBeGreaterThanOrEqual(2);
    const staffOnly = (await mgr.get(`/api/audit?userId=${ws.users.staff.id}`)).json.rows;
    expect(staffOnly.length).toBeGreaterThan(0);
    expect(staffOnly.every((r: { userId: number }) => r.userId === ws.users.staff.id)).toBe(true);
    expect((await mgr.get('/api/audit?from=2000-01-01&to=2000-01-31')).json.rows).toEqual([]);
    const today = new Date().toISOString().slice(0, 10);
    expect((await mgr.get(`/api/audit?from=${today}&to=${today}`)).json.rows.length).toBe(all.rows.length);
    expect((await mgr.get('/api/audit?from=yesterday')).status).toBe(400);
  });

  it('deleting needs the exact name and removes all of the distillery', async () => {
    const ws = await createTestWorkspace('Doomed');
    const mgr = await ws.client('manager');
    const name = (await mgr.get('/api/workspace')).json.workspace.name as string;
    const db = getDb();
    await db.insert(t.fermenters).values({ workspaceId: ws.workspaceId, name: 'FV 1', capacityLitres: 500 });
    expect((await mgr.del('/api/workspace', { confirmName: 'doomed' })).status).toBe(400);
    expect((await mgr.del('/api/workspace', { confirmName: name })).status).toBe(200);
    expect(await db.select().from(t.workspaces).where(eq(t.workspaces.id, ws.workspaceId))).toHaveLength(0);
    expect(await db.select().from(t.fermenters).where(eq(t.fermenters.workspaceId, ws.workspaceId))).toHaveLength(0);
    expect(await db.select().from(t.memberships).where(eq(t.memberships.workspaceId, ws.workspaceId))).toHaveLength(0);
    const [log] = await db
      .select()
      .from(t.auditLog)
      .where(and(eq(t.auditLog.action, 'workspace.deleted'), eq(t.auditLog.entityId, String(ws.workspaceId))));
    expect(log).toBeTruthy();
  });
});
