/**
 * Debian's Chromium (playwright gives each launch a fresh, empty profile) through playwright-core, with the three checks every page gets:
 * Barlow really loaded, no console errors, no serious/critical axe-core violations.
 */
import { chromium, type Browser, type Page, type BrowserContext } from 'playwright-core';
import { AxeBuilder } from '@axe-core/playwright';
import { mkdirSync } from 'node:fs';
import path from 'node:path';
import { expect } from 'vitest';
import { BASE } from './api';

export const SCREENSHOT_DIR = 'tests/e2e/screenshots';
export const PHONE = { width: 390, height: 844 };
export const DESKTOP = { width: 1440, height: 900 };

export async function launch(): Promise<Browser> {
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
}

export interface Tracked {
  page: Page;
  context: BrowserContext;
  errors: string[];
}

/** A new page that records console errors and failed requests. */
export async function newPage(browser: Browser, viewport = DESKTOP): Promise<Tracked> {
  const context = await browser.newContext({ viewport, baseURL: BASE() });
  const page = await context.newPage();
  const errors: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error') errors.push(m.text());
  });
  page.on('pageerror', (e) => errors.push(String(e)));
  return { page, context, errors };
}

export async function signInUi(page: Page, email: string, password: string): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await Promise.all([page.waitForURL((u) => !u.pathname.startsWith('/sign-in')), page.getByRole('button', { name: 'Sign in' }).click()]);
}

/** The three checks: Barlow loaded, no console errors, axe clean of serious/critical issues. */
export async function checkPage(t: Tracked, name: string): Promise<void> {
  await t.page.evaluate(() => document.fonts.ready);
  const barlow = await t.page.evaluate(() => [...document.fonts].some((f) => f.family.replace(/"/g, '') === 'Barlow' && f.status === 'loaded'));
  expect(barlow, `${name}: Barlow font loaded`).toBe(true);
  const results = await new AxeBuilder({ page: t.page }).analyze();
  const bad = results.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
  expect(
    bad.map(
      (v) =>
        `${v.id}: ${v.help} (${v.nodes
          .map((n) => n.target.join(' '))
          .slice(0, 3)
          .join(', ')})`,
    ),
    `${name}: axe serious/critical`,
  ).toEqual([]);
  expect(t.errors, `${name}: console errors`).toEqual([]);
  await t.page.screenshot({ path: path.join(SCREENSHOT_DIR, `${name}.png`), fullPage: true });
}

/** Open `path` and wait until every React island on it has hydrated (typing before that is lost). */
export async function openHydrated(page: Page, path: string): Promise<void> {
  await page.goto(path);
  await page.waitForFunction(() => document.querySelectorAll('astro-island[ssr]').length === 0);
}
