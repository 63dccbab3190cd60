/** Account pages in Chromium: each page gets the standard checks and a screenshot. */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import type { Browser } from 'playwright-core';
import { launch, newPage, checkPage, signInUi, PHONE, DESKTOP } from '../helpers/browser';
import { createTestWorkspace, TEST_PASSWORD, type TestWorkspace } from '../helpers/api';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { newToken, hashToken } from '../../src/server/auth/tokens';

describe('account pages in Chromium', () => {
  let browser: Browser;
  let ws: TestWorkspace;
  beforeAll(async () => {
    browser = await launch();
    ws = await createTestWorkspace('Account Pages Distillery');
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('the account page at phone width: rename, and sign out another session', async () => {
    await ws.client('planner'); // a second session elsewhere
    const tr = await newPage(browser, PHONE);
    await signInUi(tr.page, ws.users.planner.email, TEST_PASSWORD);
    await tr.page.goto('/account');
    const sessions = tr.page.getByTestId('session-list').getByRole('listitem');
    expect(await sessions.count()).toBe(2);
    await tr.page.getByLabel('Your name').fill('Tomasz Planner');
    await tr.page.getByRole('button', { name: 'Save name' }).click();
    await expect.poll(() => tr.page.getByText('Name saved.').count(), { timeout: 15000 }).toBe(1);
    const overflow = await tr.page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBeLessThanOrEqual(1);
    await checkPage(tr, 'account-phone');
    await tr.page.getByRole('button', { name: 'Sign out everywhere else' }).click();
    await expect.poll(() => sessions.count(), { timeout: 15000 }).toBe(1);
    await tr.context.close();
  });

  it('the members page: invite by e-mail, and the invitation is listed', async () => {
    const tr = await newPage(browser, DESKTOP);
    await signInUi(tr.page, ws.users.manager.email, TEST_PASSWORD);
    await tr.page.goto('/settings/members');
    await tr.page.getByLabel('E-mail').fill(`new-hand-${Date.now()}@test.example`);
    await tr.page.getByLabel('Role', { exact: true }).selectOption('planner');
    await tr.page.getByRole('button', { name: 'Send invitation' }).click();
    await expect.poll(() => tr.page.getByTestId('invitation-list').getByRole('listitem').count(), { timeout: 15000 }).toBe(1);
    await tr.page.waitForLoadState('networkidle');
    expect(await tr.page.getByTestId('members-table').getByRole('row').count()).toBe(5);
    await checkPage(tr, 'members-desktop');
    await tr.page.goto('/settings/audit');
    expect(await tr.page.getByTestId('audit-table').getByText('Invitation sent').count()).toBeGreaterThan(0);
    await checkPage(tr, 'audit-desktop');
    await tr.page.goto('/settings/mailbox');
    await checkPage(tr, 'mailbox-desktop');
    await tr.context.close();
  });

  it('signed-out pages: sign up, forgotten password, reset, invitation, confirmation', async () => {
    const db = getDb();
    const reset = newToken();
    await db.insert(t.emailTokens).values({
      purpose: 'password_reset',
      tokenHash: hashToken(reset),
      email: ws.users.staff.email,
      userId: ws.users.staff.id,
      expiresAt: new Date(Date.now() + 600_000),
    });
    const confirm = newToken();
    await db.insert(t.emailTokens).values({
      purpose: 'signup_confirm',
      tokenHash: hashToken(confirm),
      email: `founder-${Date.now()}@test.example`,
      payload: { name: 'Founder', workspaceName: 'Juniper Hill Distillery' },
      expiresAt: new Date(Date.now() + 600_000),
    });
    const invite = newToken();
    await db.insert(t.invitations).values({
      workspaceId: ws.workspaceId,
      email: `invitee-${Date.now()}@test.example`,
      role: 'distiller',
      tokenHash: hashToken(invite),
      invitedBy: ws.users.manager.id,
      expiresAt: new Date(Date.now() + 86400_000),
    });
    for (const [path, name, heading] of [
      ['/sign-up', 'sign-up-phone', 'Set up a distillery'],
      ['/forgot-password', 'forgot-password-phone', 'Forgotten your password?'],
      [`/reset-password/${reset}`, 'reset-password-phone', 'Choose a new password'],
      [`/invite/${invite}`, 'invite-phone', 'Join Account Pages Distillery'],
      [`/confirm/${confirm}`, 'confirm-phone', 'Open Juniper Hill Distillery'],
    ] as const) {
      const tr = await newPage(browser, PHONE);
      await tr.page.goto(path, { waitUntil: 'networkidle' });
      expect(await tr.page.getByRole('heading', { level: 1 }).textContent()).toContain(heading);
      await checkPage(tr, name);
      await tr.context.close();
    }
  });

  it('forgotten password form answers without saying whether the address exists', async () => {
    const tr = await newPage(browser, PHONE);
    await tr.page.goto('/forgot-password');
    await tr.page.getByLabel('E-mail').fill('nobody-here@test.example');
    await tr.page.getByRole('button', { name: 'Send the link' }).click();
    await expect.poll(() => tr.page.getByRole('status').textContent(), { timeout: 15000 }).toContain('If that address has a Plateau account');
    await tr.context.close();
  });
});
