/**
 * Marking a fermenter emptied in Chromium: with JavaScript, a confirm step and a JSON post; without
 * it, the same form posts and comes back with a message. The "Is FV… empty?" question on a split
 * wash's run answers in place.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { eq } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { launch, newPage, checkPage, signInUi, PHONE, DESKTOP } from '../helpers/browser';
import { TEST_PASSWORD } from '../helpers/api';
import { addFerment, at, boardFixture, iso, type BoardFixture } from '../helpers/board-fixture';

async function hydrated(page: Page): Promise<void> {
  await page.waitForFunction(() => [...document.querySelectorAll('astro-island')].every((i) => !i.hasAttribute('ssr')));
}

const emptiedAt = async (id: number) => (await getDb().select({ e: t.ferments.emptiedAt }).from(t.ferments).where(eq(t.ferments.id, id)))[0]!.e;

describe('fermenters freed in Chromium', () => {
  let browser: Browser;
  let fx: BoardFixture;
  beforeAll(async () => {
    browser = await launch();
    fx = await boardFixture('Release e2e distillery');
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('a distiller dumps a wash with a note through the confirm step (desktop)', async () => {
    const f = await addFerment(fx, { code: 'E2E-DUMP', fermenter: 0, pitchedDaysAgo: 8 });
    const tr = await newPage(browser, DESKTOP);
    await signInUi(tr.page, fx.users.distiller.email, TEST_PASSWORD);
    await tr.page.goto(`/ferments/${f}`);
    await hydrated(tr.page);
    await tr.page.getByLabel('Dumped').check();
    await tr.page.getByRole('button', { name: 'Mark emptied' }).click();
    // The note is needed for a dump: the form says so and stays put.
    await expect.poll(() => tr.page.getByText('Why was it dumped? Say in a few words').count()).toBe(1);
    await tr.page.getByLabel('Why was it dumped?').fill('Soured: pH 3.1');
    await tr.page.getByRole('button', { name: 'Mark emptied' }).click();
    await tr.page.getByTestId('empty-confirm').waitFor();
    await checkPage(tr, 'fermenter-empty-confirm-desktop');
    expect(await emptiedAt(f)).toBeNull(); // nothing saved before the confirmation
    await Promise.all([tr.page.waitForURL(/emptied=/), tr.page.getByRole('button', { name: 'Yes, FV1 is empty' }).click()]);
    await tr.page.getByTestId('emptied-message').waitFor();
    expect(await tr.page.getByTestId('emptied-tag').textContent()).toContain('dumped');
    expect(await emptiedAt(f)).not.toBeNull();
    await checkPage(tr, 'fermenter-emptied-desktop');
    await tr.context.close();
  });

  it('without JavaScript the form posts, never as a GET, and comes back with a message (phone)', async () => {
    const f = await addFerment(fx, { code: 'E2E-NOJS', fermenter: 1, pitchedDaysAgo: 8 });
    const context = await browser.newContext({ viewport: PHONE, javaScriptEnabled: false, baseURL: process.env.PLATEAU_TEST_URL ?? 'http://127.0.0.1:4399' });
    const page = await context.newPage();
    const methods: string[] = [];
    page.on('request', (r) => {
      if (r.url().includes(`/ferments/${f}`) || r.url().includes(`/api/ferments/${f}/empty`)) methods.push(`${r.method()} ${new URL(r.url()).pathname}`);
    });
    // Sign in through the plain sign-in form (it works without JavaScript).
    await page.goto('/sign-in');
    await page.getByLabel('E-mail').fill(fx.users.distiller.email);
    await page.getByLabel('Password').fill(TEST_PASSWORD);
    await Promise.all([page.waitForURL((u) => !u.pathname.startsWith('/sign-in')), page.getByRole('button', { name: 'Sign in' }).click()]);
    await page.goto(`/ferments/${f}`);
    await page.getByLabel('Yes, FV2 is empty').check();
    await Promise.all([page.waitForURL(/emptied=/), page.getByRole('button', { name: 'Mark emptied' }).click()]);
    expect(methods).toContain(`POST /api/ferments/${f}/empty`);
    expect(methods.filter((m) => m.startsWith('GET') && m.includes('reason'))).toEqual([]);
    expect(await page.getByTestId('emptied-message').textContent()).toContain('FV2 is free');
    expect(await emptiedAt(f)).not.toBeNull();
    await page.screenshot({ path: 'tests/e2e/screenshots/fermenter-emptied-nojs-phone.png', fullPage: true });
    await context.close();
  });

  it('asks "Is FV3 empty?" on a split wash’s record page and answers in place (phone)', async () => {
    const f = await addFerment(fx, { code: 'E2E-SPLIT', fermenter: 2, pitchedDaysAgo: 8, volume: 2400 });
    const planner = await fx.client('planner');
    const distiller = await fx.client('distiller');
    const booked = await planner.post('/api/runs', {
      stillId: fx.stills.ws2,
      type: 'stripping',
      startsAt: iso(at(2, 6)),
      endsAt: iso(at(2, 10)),
      ferments: [{ fermentId: f, litres: 1200 }],
    });
    expect(booked.status, booked.text).toBe(201);
    const id = booked.json.run.id;
    const started = await distiller.post(`/api/runs/${id}/start`, { version: booked.json.run.version, confirm: true });
    expect(started.status, started.text).toBe(200);
    const finished = await distiller.post(`/api/runs/${id}/finish`, { version: started.json.run.version, confirm: true });
    expect(finished.status, finished.text).toBe(200);

    const tr = await newPage(browser, PHONE);
    await signInUi(tr.page, fx.users.distiller.email, TEST_PASSWORD);
    await tr.page.goto(`/runs/${id}/record`);
    await hydrated(tr.page);
    expect(await tr.page.getByTestId('empty-question').textContent()).toContain('FV3 still holds about 1,200 L of wash E2E-SPLIT');
    await checkPage(tr, 'fermenter-empty-question-phone');
    await tr.page.getByRole('button', { name: 'Yes, FV3 is empty' }).click();
    await expect.poll(() => tr.page.getByText('Marked E2E-SPLIT emptied').count()).toBe(1);
    expect(tr.page.url()).toContain(`/runs/${id}/record`); // answered in place
    expect(await emptiedAt(f)).not.toBeNull();
    await tr.context.close();
  });
});
