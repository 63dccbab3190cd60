/**
 * Getting started and messages people understand, in Chromium at phone width: a new distillery
 * signs up with its time zone, US units and decimal comma, confirms from the e-mail the app sent,
 * lands on its checklist, adds a still and sees the step ticked. A refused field's message sits
 * beside the field, which is focused; a wrong password keeps the e-mail.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { like } from 'drizzle-orm';
import { launch, newPage, checkPage, PHONE } from '../helpers/browser';
import { BASE, createTestWorkspace, TEST_PASSWORD } from '../helpers/api';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { linkIn, unique, waitForMail } from '../helpers/mail';

/** The page's scripts have run and its islands have hydrated (Astro drops the `ssr` attribute then). */
async function ready(page: Page): Promise<void> {
  await page.waitForLoadState('networkidle');
  await page.waitForFunction(() => document.querySelectorAll('astro-island[ssr]').length === 0);
}

/** The focused element's id, and whether it is marked invalid and described by the given text. */
async function focusState(page: Page): Promise<{ id: string; invalid: string | null; describedBy: string }> {
  return page.evaluate(() => {
    const el = document.activeElement as HTMLElement | null;
    const ids = (el?.getAttribute('aria-describedby') ?? '').split(/\s+/).filter(Boolean);
    return {
      id: el?.id ?? '',
      invalid: el?.getAttribute('aria-invalid') ?? null,
      describedBy: ids.map((id) => document.getElementById(id)?.textContent?.trim() ?? '').join(' | '),
    };
  });
}

describe('getting started in Chromium', () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await launch();
    await getDb().delete(t.signInThrottle).where(like(t.signInThrottle.key, '%'));
  });
  afterAll(async () => {
    await getDb().delete(t.signInThrottle).where(like(t.signInThrottle.key, '%'));
    await browser?.close();
  });

  it('the sign-up form takes the time zone this device is in', async () => {
    const context = await browser.newContext({ viewport: PHONE, baseURL: BASE(), timezoneId: 'Pacific/Auckland' });
    const page = await context.newPage();
    await page.goto('/sign-up');
    await ready(page);
    await expect.poll(() => page.getByLabel('Time zone of the distillery').inputValue(), { timeout: 10000 }).toBe('Pacific/Auckland');
    await context.close();
  });

  it('a new distillery signs up with its zone, US units and decimal comma, lands on its checklist and ticks off a still', async () => {
    const email = unique('opener');
    const tr = await newPage(browser, PHONE);
    const { page } = tr;
    await page.goto('/sign-up');
    await ready(page);
    await page.getByLabel('Distillery name').fill('Fenwick Moss Distillery');
    await page.getByLabel('Your name').fill('Isla Fenwick');
    await page.getByLabel('E-mail').fill(email);
    await page.getByLabel('Time zone of the distillery').selectOption('America/Chicago');
    await page.getByLabel('US (US gallons, °F)').check();
    await page.getByLabel('Decimal comma (1.200,5)').check();
    await checkPage(tr, 'sign-up-choices-phone');
    await page.getByRole('button', { name: 'Send the confirmation link' }).click();
    await expect.poll(() => page.getByRole('status').textContent(), { timeout: 15000 }).toContain('Check');

    await page.goto(linkIn(await waitForMail(email, 'Confirm'), '/confirm').path);
    await ready(page);
    expect(await page.getByTestId('signup-choices').textContent()).toMatch(/America\/Chicago.*US \(US gallons, °F\).*decimal comma/s);
    // A short password: said once, beside the field, and the field is focused.
    await page.getByLabel('Choose a password').fill('short');
    await page.getByRole('button', { name: 'Confirm and open the distillery' }).click();
    await expect.poll(() => page.getByText('Use at least 10 characters.').count(), { timeout: 15000 }).toBe(1);
    expect(await page.locator('[data-form-status]').isVisible()).toBe(false);
    expect(await focusState(page)).toEqual({
      id: 'password',
      invalid: 'true',
      describedBy: 'At least 10 characters. A short sentence works well. | Use at least 10 characters.',
    });
    tr.errors.length = 0; // the browser logs the refused request (400) itself
    await page.getByLabel('Choose a password').fill('fenwick moss wash 2026');
    await Promise.all([page.waitForURL('**/setup'), page.getByRole('button', { name: 'Confirm and open the distillery' }).click()]);

    // The checklist: nothing done yet, the choices made at sign-up repeated.
    expect(await page.getByTestId('setup-progress').textContent()).toContain('0 of 6 done');
    expect(await page.getByTestId('setup-progress').textContent()).toContain('America/Chicago');
    expect(await page.getByTestId('setup-link').textContent()).toContain('Getting started (0/6)');
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBeLessThanOrEqual(1);
    await checkPage(tr, 'setup-new-phone');

    // Add a still from the checklist's link.
    await Promise.all([page.waitForURL('**/vessels**'), page.getByRole('link', { name: /^Add a still/ }).click()]);
    await ready(page);
    await page.getByRole('button', { name: 'Add a still' }).click();
    // Sent without a name: the message is beside the name, in words, and the name field has the cursor.
    await page.getByRole('button', { name: 'Add still' }).click();
    await expect.poll(() => focusState(page).then((f) => f.describedBy), { timeout: 15000 }).toContain('Give the still a name.');
    const focused = await focusState(page);
    expect(focused.id).toBe('sf-new-name');
    expect(focused.invalid).toBe('true');
    expect(await page.getByText('name: Give the still a name.').count()).toBe(0);
    expect(await page.getByText('Give the still a name.').count()).toBe(1);
    await page.screenshot({ path: 'tests/e2e/screenshots/still-name-error-phone.png', fullPage: true });
    tr.errors.length = 0; // the browser logs the refused request (400) itself

    await page.locator('#sf-new-name').fill('Wash still');
    await page.locator('#sf-new-cap').fill('300');
    await page.locator('#sf-new-kw').fill('40');
    await page.getByRole('button', { name: 'Add still' }).click();
    await expect.poll(() => page.getByRole('status').first().textContent(), { timeout: 15000 }).toContain('Wash still added');

    await page.goto('/setup');
    expect(await page.getByTestId('setup-progress').textContent()).toContain('1 of 6 done');
    expect(await page.locator('[data-step="still"]').getAttribute('data-done')).toBe('true');
    expect(await page.locator('[data-step="fermenter"]').getAttribute('data-done')).toBe('false');
    expect(await page.getByTestId('setup-link').textContent()).toContain('Getting started (1/6)');
    // The board says it too.
    await page.goto('/');
    expect(await page.getByTestId('setup-callout').textContent()).toContain('1 of 6');
    await tr.context.close();
  }, 120_000);

  it('a wrong password keeps the e-mail, clears the password and puts the cursor in it (with and without script)', async () => {
    const ws = await createTestWorkspace('Wrong Password Distillery');
    const email = ws.users.distiller.email;
    const tr = await newPage(browser, PHONE);
    await tr.page.goto('/sign-in');
    await ready(tr.page);
    await tr.page.getByLabel('E-mail').fill(email);
    await tr.page.getByLabel('Password').fill('not my password');
    await tr.page.getByRole('button', { name: 'Sign in' }).click();
    await expect.poll(() => tr.page.getByRole('alert').textContent(), { timeout: 15000 }).toContain('That e-mail and password do not match an account.');
    expect(await tr.page.getByLabel('E-mail').inputValue()).toBe(email);
    expect(await tr.page.getByLabel('Password').inputValue()).toBe('');
    expect((await focusState(tr.page)).id).toBe('password');
    await tr.page.screenshot({ path: 'tests/e2e/screenshots/sign-in-wrong-password-phone.png', fullPage: true });
    // The right password from there signs in.
    await tr.page.getByLabel('Password').fill(TEST_PASSWORD);
    await Promise.all([tr.page.waitForURL((u) => u.pathname === '/'), tr.page.getByRole('button', { name: 'Sign in' }).click()]);
    await tr.context.close();

    // Without a script the form posts plainly and comes back the same way.
    const plain = await browser.newContext({ viewport: PHONE, baseURL: BASE(), javaScriptEnabled: false });
    const page = await plain.newPage();
    await page.goto('/sign-in');
    await page.getByLabel('E-mail').fill(email);
    await page.getByLabel('Password').fill('not my password either');
    await Promise.all([page.waitForURL('**/sign-in?error=credentials**'), page.getByRole('button', { name: 'Sign in' }).click()]);
    expect(await page.getByRole('alert').textContent()).toContain('That e-mail and password do not match an account.');
    expect(await page.getByLabel('E-mail').inputValue()).toBe(email);
    expect(await page.getByLabel('Password').inputValue()).toBe('');
    expect((await focusState(page)).id).toBe('password');
    await plain.close();
  });
});
