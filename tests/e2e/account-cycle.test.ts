/**
 * Sign-up, password reset and invitation end to end in Chromium, with the real e-mails the
 * app sent to the local fake SMTP server: the secure flows still work for the people they are for.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import type { Browser } from 'playwright-core';
import { like } from 'drizzle-orm';
import { launch, newPage, checkPage, signInUi, PHONE, DESKTOP } from '../helpers/browser';
import { createTestWorkspace, TEST_PASSWORD } from '../helpers/api';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { linkIn, unique, waitForMail } from '../helpers/mail';

describe('account flows end to end in Chromium', () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await launch();
    await getDb().delete(t.signInThrottle).where(like(t.signInThrottle.key, '%'));
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('a new distillery signs up on a phone, confirms from the e-mail and chooses the password there', async () => {
    const email = unique('founder');
    const tr = await newPage(browser, PHONE);
    await tr.page.goto('/sign-up');
    expect(await tr.page.getByLabel(/password/i).count()).toBe(0);
    await tr.page.getByLabel('Distillery name').fill('Saltmarsh Spirits');
    await tr.page.getByLabel('Your name').fill('Wren Adeyemi');
    await tr.page.getByLabel('E-mail').fill(email);
    await tr.page.getByRole('button', { name: 'Send the confirmation link' }).click();
    await expect.poll(() => tr.page.getByRole('status').textContent(), { timeout: 15000 }).toContain('Check');
    const confirm = linkIn(await waitForMail(email, 'Confirm'), '/confirm').path;
    await tr.page.goto(confirm);
    expect(await tr.page.getByLabel('Your name').inputValue()).toBe('Wren Adeyemi');
    await tr.page.getByLabel('Choose a password').fill('saltmarsh wash 2026');
    await checkPage(tr, 'confirm-choose-password-phone');
    await Promise.all([tr.page.waitForURL('**/setup'), tr.page.getByRole('button', { name: 'Confirm and open the distillery' }).click()]);
    expect(await tr.page.content()).toContain('Saltmarsh Spirits');
    await tr.context.close();
    const again = await newPage(browser, DESKTOP);
    await signInUi(again.page, email, 'saltmarsh wash 2026');
    expect(new URL(again.page.url()).pathname).toBe('/');
    await again.context.close();
  });

  it('a distiller resets a forgotten password from the e-mailed link', async () => {
    const ws = await createTestWorkspace('Reset Cycle Distillery');
    const email = ws.users.distiller.email;
    const tr = await newPage(browser, PHONE);
    await tr.page.goto('/forgot-password');
    await tr.page.getByLabel('E-mail').fill(email);
    await tr.page.getByRole('button', { name: 'Send the link' }).click();
    await expect.poll(() => tr.page.getByRole('status').textContent(), { timeout: 15000 }).toContain('If that address has a Plateau account');
    await tr.page.goto(linkIn(await waitForMail(email, 'new Plateau password'), '/reset-password').path);
    await tr.page.getByLabel('New password').fill('cold still new password');
    await tr.page.getByRole('button', { name: 'Save the new password' }).click();
    await tr.page.waitForURL('**/sign-in**');
    await signInUi(tr.page, email, 'cold still new password');
    expect(new URL(tr.page.url()).pathname).toBe('/');
    await tr.context.close();
  });

  it('an invited person follows the link, sets name and password, and lands in the distillery', async () => {
    const ws = await createTestWorkspace('Invite Cycle Distillery');
    const email = unique('newhand');
    const mgr = await newPage(browser, DESKTOP);
    await signInUi(mgr.page, ws.users.manager.email, TEST_PASSWORD);
    await mgr.page.goto('/settings/members');
    await mgr.page.getByLabel('E-mail').fill(email);
    await mgr.page.getByLabel('Role', { exact: true }).selectOption('distiller');
    await mgr.page.getByRole('button', { name: 'Send invitation' }).click();
    await expect.poll(() => mgr.page.getByTestId('invitation-list').getByRole('listitem').count(), { timeout: 15000 }).toBe(1);
    const invite = linkIn(await waitForMail(email, 'Join'), '/invite').path;
    // The manager's mailbox lists the invitation without its link.
    await mgr.page.goto('/settings/mailbox');
    expect(await mgr.page.content()).not.toContain(invite);
    await mgr.context.close();
    const tr = await newPage(browser, PHONE);
    await tr.page.goto(invite);
    await tr.page.getByLabel('Your name').fill('New Hand');
    await tr.page.getByLabel('Choose a password').fill('feints and tails 7');
    await Promise.all([tr.page.waitForURL((u) => u.pathname === '/'), tr.page.getByRole('button', { name: /^Join / }).click()]);
    await tr.context.close();
  });
});
