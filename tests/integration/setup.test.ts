/**
 * Getting started: a distillery opened through the real sign-up (e-mailed link, confirm page)
 * starts at 0 of 6, and each step ticks itself off as its data appears over the API. Only a
 * manager may put the checklist away; another distillery's data never ticks this one's steps.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq, like, or } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { Client, TEST_PASSWORD, createTestWorkspace } from '../helpers/api';
import { linkIn, unique, waitForMail } from '../helpers/mail';

const STEPS = ['still', 'fermenter', 'washType', 'people', 'ferment', 'feed'] as const;

async function clearSignUpThrottle() {
  await getDb()
    .delete(t.signInThrottle)
    .where(or(like(t.signInThrottle.key, 'sign_up%'), like(t.signInThrottle.key, 'confirm%'), like(t.signInThrottle.key, '%ip:%')));
}

/** A distillery opened the way a new customer opens one: sign-up, the e-mailed link, the password on the confirm page. */
async function signUpDistillery(name: string): Promise<{ manager: Client; workspaceId: number; email: string }> {
  const email = unique('setup');
  const asked = await new Client().post('/api/auth/sign-up', { workspaceName: name, name: 'Rhona Vale', email });
  expect(asked.status, asked.text).toBe(202);
  const { token } = linkIn(await waitForMail(email, 'Confirm'), '/confirm');
  const manager = new Client();
  const done = await manager.post('/api/auth/confirm', { token, password: TEST_PASSWORD });
  expect(done.status, done.text).toBe(200);
  expect(done.json.redirect).toBe('/setup');
  const me = await manager.get('/api/account');
  return { manager, workspaceId: me.json.memberships[0].workspaceId, email };
}

async function progress(c: Client) {
  const r = await c.get('/api/workspace/setup');
  expect(r.status, r.text).toBe(200);
  return r.json.setup as { steps: Record<(typeof STEPS)[number], boolean>; done: number; total: number; complete: boolean; showLink: boolean };
}

const still = {
  name: 'Wash still',
  kind: 'pot',
  capacityLitres: 1200,
  heatingKw: 60,
  operatingHours: [1, 2, 3, 4, 5].map((weekday) => ({ weekday, open: '06:00', close: '22:00' })),
  cleaningAfterRunMinutes: 60,
  typicalMinutes: { stripping: 300, spirit: 480, redistillation: 420, cleaning: 120, maintenance: 240 },
};

beforeAll(clearSignUpThrottle);
afterAll(clearSignUpThrottle);

describe('getting started', () => {
  it('a new distillery starts at 0 of 6 and each step ticks off as its data appears', async () => {
    const { manager } = await signUpDistillery('Corrie Bank Distillery');
    const start = await progress(manager);
    // The trade's default wash types come with every new distillery; they do not tick the step on their own.
    expect(start).toMatchObject({ done: 0, total: 6, complete: false, showLink: true });
    expect(Object.values(start.steps).every((v) => v === false)).toBe(true);
    // The page says so too, and the navigation carries the link.
    const page = await manager.get('/setup', { accept: 'text/html' });
    expect(page.status).toBe(200);
    expect(page.text).toContain('0 of 6 done');
    expect(page.text).toContain('Getting started (0/6)');

    const ticked: string[] = [];
    const expectTicked = async (step: (typeof STEPS)[number]) => {
      ticked.push(step);
      const p = await progress(manager);
      for (const s of STEPS) expect(p.steps[s], `${s} after ${ticked.join(', ')}`).toBe(ticked.includes(s));
      expect(p.done).toBe(ticked.length);
    };

    const s = await manager.post('/api/stills', still);
    expect(s.status, s.text).toBe(201);
    await expectTicked('still');

    const fv = await manager.post('/api/fermenters', { name: 'FV1', capacity: 1500 });
    expect(fv.status, fv.text).toBe(201);
    await expectTicked('fermenter');

    // Adjusting a default wash type's finishing range counts as making it the distillery's own.
    const types = (await manager.get('/api/wash-types')).json.washTypes as Array<{ id: number; category: string }>;
    const grain = types.find((w) => w.category === 'grain')!;
    const edited = await manager.patch(`/api/wash-types/${grain.id}`, { terminalMax: 1.01 });
    expect(edited.status, edited.text).toBe(200);
    await expectTicked('washType');

    const inv = await manager.post('/api/members/invitations', { email: unique('hand'), role: 'distiller' });
    expect(inv.status, inv.text).toBe(201);
    await expectTicked('people');

    const f = await manager.post('/api/ferments', {
      code: 'CB-001',
      washTypeId: grain.id,
      fermenterId: fv.json.fermenter.id,
      volume: 1400,
      pitchedAt: '2026-11-30T08:00',
      og: 1.06,
    });
    expect(f.status, f.text).toBe(201);
    await expectTicked('ferment');

    const feed = await manager.post('/api/feeds', { scope: 'workspace', name: 'Office calendar' });
    expect(feed.status, feed.text).toBe(201);
    await expectTicked('feed');

    const end = await progress(manager);
    expect(end).toMatchObject({ done: 6, complete: true, showLink: false });
    const board = await manager.get('/', { accept: 'text/html' });
    expect(board.text).not.toContain('data-testid="setup-link"');
    expect((await manager.get('/setup', { accept: 'text/html' })).text).toContain('6 of 6 done');
  });

  it('a wash type added by the distillery ticks its step; the defaults alone do not', async () => {
    const { manager } = await signUpDistillery('Lintmill Spirits');
    expect((await progress(manager)).steps.washType).toBe(false);
    const r = await manager.post('/api/wash-types', { name: 'Rye wash', category: 'grain', terminalMin: 1.004, terminalMax: 1.01, typicalOg: 1.065 });
    expect(r.status, r.text).toBe(201);
    expect((await progress(manager)).steps.washType).toBe(true);
  });

  it('another distillery’s stills, fermenters, ferments, feeds and people never tick mine', async () => {
    const mine = await signUpDistillery('Brackenfold Distillery');
    const before = await progress(mine.manager);
    expect(before.done).toBe(0);
    // A busy neighbour: four members, a still, a fermenter, a wash type of its own, a feed.
    const other = await createTestWorkspace('Neighbour');
    const neighbour = await other.client('manager');
    expect((await neighbour.post('/api/stills', still)).status).toBe(201);
    const theirFv = await neighbour.post('/api/fermenters', { name: 'FV9', capacity: 900 });
    expect(theirFv.status).toBe(201);
    const pear = await neighbour.post('/api/wash-types', { name: 'Pear wash', category: 'fruit', terminalMin: 0.99, terminalMax: 0.996 });
    expect(pear.status).toBe(201);
    const theirFerment = await neighbour.post('/api/ferments', {
      code: 'NB-1',
      washTypeId: pear.json.washType.id,
      fermenterId: theirFv.json.fermenter.id,
      volume: 800,
      pitchedAt: '2026-11-30T08:00',
      og: 1.05,
    });
    expect(theirFerment.status, theirFerment.text).toBe(201);
    expect((await neighbour.post('/api/feeds', { scope: 'workspace', name: 'Neighbour feed' })).status).toBe(201);
    expect((await neighbour.post('/api/members/invitations', { email: unique('other'), role: 'staff' })).status).toBe(201);
    const theirs = await progress(neighbour);
    expect(theirs.steps).toEqual({ still: true, fermenter: true, washType: true, people: true, ferment: true, feed: true });
    const after = await progress(mine.manager);
    expect(after.done).toBe(0);
    expect(Object.values(after.steps).every((v) => v === false)).toBe(true);
  });

  it('a manager puts the checklist away (200, audited); staff cannot (403); planners read it', async () => {
    const ws = await createTestWorkspace('Dismiss');
    const staff = await ws.client('staff');
    const planner = await ws.client('planner');
    const manager = await ws.client('manager');
    expect((await staff.post('/api/workspace/setup/dismiss', {})).status).toBe(403);
    expect((await planner.post('/api/workspace/setup/dismiss', {})).status).toBe(403);
    expect((await staff.get('/api/workspace/setup')).status).toBe(403);
    expect((await planner.get('/api/workspace/setup')).status).toBe(200);
    // The link shows for managers and planners while the list is open, never for staff.
    expect((await planner.get('/', { accept: 'text/html' })).text).toContain('data-testid="setup-link"');
    expect((await staff.get('/', { accept: 'text/html' })).text).not.toContain('data-testid="setup-link"');

    const bad = await manager.post('/api/workspace/setup/dismiss', { dismissed: 'perhaps' });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.json.error.fields)).toEqual(['dismissed']);

    const r = await manager.post('/api/workspace/setup/dismiss', {});
    expect(r.status, r.text).toBe(200);
    const [row] = await getDb().select({ at: t.workspaces.setupDismissedAt }).from(t.workspaces).where(eq(t.workspaces.id, ws.workspaceId));
    expect(row!.at).toBeInstanceOf(Date);
    const audit = await getDb().select().from(t.auditLog).where(eq(t.auditLog.workspaceId, ws.workspaceId));
    expect(audit.filter((a) => a.action === 'workspace.setup_dismissed' && a.userId === ws.users.manager.id)).toHaveLength(1);
    const p = await progress(planner);
    expect(p.showLink).toBe(false);
    expect((await planner.get('/', { accept: 'text/html' })).text).not.toContain('data-testid="setup-link"');
    // The page stays reachable, and a manager may bring the list back (a form post sends the word).
    expect((await planner.get('/setup', { accept: 'text/html' })).status).toBe(200);
    const back = await manager.post('/api/workspace/setup/dismiss', { dismissed: 'false' });
    expect(back.status, back.text).toBe(200);
    expect((await progress(planner)).showLink).toBe(true);
  });

  it('the demo distillery does not show the link: every step is done there', async () => {
    const { loadDemo } = await import('../../seed/load');
    await loadDemo({ quiet: true, tokenFile: null }); // loads it once; a no-op when it is there
    const demo = await new Client().signIn('mara@quillanridge.example', 'plateau-demo');
    const p = await progress(demo);
    expect(p).toMatchObject({ done: 6, complete: true, showLink: false });
    expect((await demo.get('/', { accept: 'text/html' })).text).not.toContain('data-testid="setup-link"');
  });
});
