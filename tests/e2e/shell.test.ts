import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import type { Browser } from 'playwright-core';
import { launch, newPage, checkPage, signInUi, PHONE, DESKTOP } from '../helpers/browser';
import { createTestWorkspace, TEST_PASSWORD, type TestWorkspace } from '../helpers/api';

describe('application shell in Chromium', () => {
  let browser: Browser;
  let ws: TestWorkspace;
  beforeAll(async () => {
    browser = await launch();
    ws = await createTestWorkspace('Shell Test Distillery');
  });
  afterAll(async () => {
    await browser?.close();
  });

  it.each([
    ['desktop', DESKTOP],
    ['phone', PHONE],
  ] as const)('shows the distillery, the person and the navigation at %s width', async (name, viewport) => {
    const t = await newPage(browser, viewport);
    await signInUi(t.page, ws.users.manager.email, TEST_PASSWORD);
    await expect.poll(() => t.page.getByTestId('workspace-name').textContent()).toContain('Shell Test Distillery');
    const nav = t.page.getByRole('navigation', { name: 'Main' });
    for (const label of ['Board', 'Ferments', 'Stills & fermenters', 'Reports', 'Settings']) {
      await expect.poll(() => nav.getByRole('link', { name: label }).count()).toBe(1);
    }
    expect(await t.page.getByTestId('signed-in-as').textContent()).toContain('Manager');
    // Nothing sticks out sideways on a phone.
    const overflow = await t.page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBeLessThanOrEqual(1);
    await checkPage(t, `shell-${name}`);
    await t.context.close();
  });

  it('shows a friendly 404 page and a JSON 404 under /api', async () => {
    const t = await newPage(browser, PHONE);
    await signInUi(t.page, ws.users.staff.email, TEST_PASSWORD);
    const res = await t.page.goto('/no-such-page');
    expect(res?.status()).toBe(404);
    expect(await t.page.getByRole('heading', { level: 1 }).textContent()).toContain("can't find");
    t.errors.length = 0; // the browser logs the 404 status of the document itself
    await checkPage(t, 'not-found-phone');
    const api = await t.page.request.get('/api/no-such-route');
    expect(api.status()).toBe(404);
    expect((await api.json()).error.code).toBe('not_found');
    await t.context.close();
  });
});
