/** Each role sees only the settings actions it may take, in Chromium; then signs out. */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import type { Browser } from 'playwright-core';
import { launch, newPage, checkPage, signInUi, DESKTOP } from '../helpers/browser';
import { createTestWorkspace, TEST_PASSWORD, type TestWorkspace } from '../helpers/api';
import type { Role } from '../../src/lib/vocabulary';

const EXPECT: Record<Role, { form: boolean; members: boolean; audit: boolean; mailbox: boolean; remove: boolean }> = {
  manager: { form: true, members: true, audit: true, mailbox: true, remove: true },
  planner: { form: false, members: false, audit: false, mailbox: false, remove: false },
  distiller: { form: false, members: false, audit: false, mailbox: false, remove: false },
  staff: { form: false, members: false, audit: false, mailbox: false, remove: false },
};

describe('settings by role in Chromium', () => {
  let browser: Browser;
  let ws: TestWorkspace;
  beforeAll(async () => {
    browser = await launch();
    ws = await createTestWorkspace('Roles Distillery');
  });
  afterAll(async () => {
    await browser?.close();
  });

  it.each(Object.keys(EXPECT) as Role[])('%s sees only what the role may do, then signs out', async (role) => {
    const t = await newPage(browser, DESKTOP);
    await signInUi(t.page, ws.users[role].email, TEST_PASSWORD);
    await t.page.goto('/settings', { waitUntil: 'networkidle' });
    const e = EXPECT[role];
    const links = t.page.getByTestId('settings-links');
    expect(await t.page.getByTestId('settings-form').count()).toBe(e.form ? 1 : 0);
    expect(await t.page.getByTestId('settings-readonly').count()).toBe(e.form ? 0 : 1);
    expect(await links.getByRole('link', { name: 'Members and invitations' }).count()).toBe(e.members ? 1 : 0);
    expect(await links.getByRole('link', { name: 'Audit log' }).count()).toBe(e.audit ? 1 : 0);
    expect(await links.getByRole('link', { name: /Mailbox/ }).count()).toBe(e.mailbox ? 1 : 0);
    expect(await links.getByRole('link', { name: 'Calendar feeds' }).count()).toBe(1);
    expect(await t.page.getByRole('button', { name: 'Delete the distillery' }).count()).toBe(e.remove ? 1 : 0);
    if (!e.members) {
      const res = await t.page.goto('/settings/members');
      expect(res?.status()).toBe(403);
      expect(await t.page.getByRole('button', { name: 'Send invitation' }).count()).toBe(0);
      t.errors.length = 0; // the browser logs the 403 of the document itself
      await t.page.goto('/settings');
    }
    if (role === 'manager' || role === 'staff') await checkPage(t, `settings-${role}`);
    await Promise.all([t.page.waitForURL(/\/sign-in/), t.page.getByRole('button', { name: 'Sign out' }).click()]);
    await t.page.goto('/settings');
    expect(new URL(t.page.url()).pathname).toBe('/sign-in');
    await t.context.close();
  });
});
