/**
 * Runs at their real times in Chromium: the board draws a done run where it really ran with its
 * booking faintly beside it and says how far it strayed; the run page shows both and lets a
 * planner correct the times; the board dialog's Start asks for confirmation and shows the server's
 * question in words; the reports show booked against actual hours.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { launch, newPage, checkPage, signInUi, PHONE, DESKTOP } from '../helpers/browser';
import { TEST_PASSWORD, type Client } from '../helpers/api';
import { boardFixture, type BoardFixture } from '../helpers/board-fixture';
import { addDaysYmd, wallClock, zonedDateTime } from '../../src/lib/schedule';

const TZ = 'Europe/London';
const HOUR = 3_600_000;

async function hydrated(page: Page) {
  await page.waitForFunction(() => document.querySelectorAll('astro-island[ssr]').length === 0);
}

describe('runs at their real times in the browser', () => {
  let browser: Browser;
  let fx: BoardFixture;
  let planner: Client;
  let distiller: Client;
  let yesterday: string;
  let doneId: number;
  let laterId: number;

  beforeAll(async () => {
    browser = await launch();
    fx = await boardFixture('Actual Times E2E Distillery', TZ);
    planner = await fx.client('planner');
    distiller = await fx.client('distiller');
    yesterday = addDaysYmd(wallClock(new Date(), TZ).ymd, -1);
    // Booked yesterday 08:00–12:00; really ran 08:40–13:05.
    const startsAt = zonedDateTime(yesterday, '08:00', TZ);
    const booked = await planner.post('/api/runs', {
      stillId: fx.stills.ws1,
      type: 'stripping',
      startsAt: startsAt.toISOString(),
      endsAt: new Date(startsAt.getTime() + 4 * HOUR).toISOString(),
      chargeLitres: 2000,
    });
    expect(booked.status, booked.text).toBe(201);
    const started = await distiller.post(`/api/runs/${booked.json.run.id}/start`, { version: booked.json.run.version, confirm: true });
    const done = await distiller.post(`/api/runs/${booked.json.run.id}/finish`, { version: started.json.run.version, confirm: true });
    const fixed = await planner.patch(`/api/runs/${booked.json.run.id}/actual-times`, {
      version: done.json.run.version,
      startedAt: zonedDateTime(yesterday, '08:40', TZ).toISOString(),
      finishedAt: zonedDateTime(yesterday, '13:05', TZ).toISOString(),
      reason: 'From the still log',
    });
    expect(fixed.status, fixed.text).toBe(200);
    doneId = fixed.json.run.id;
    // A cleaning slot booked two days ahead on another still: starting it now is asked about.
    const later = await planner.post('/api/runs', {
      stillId: fx.stills.ws2,
      type: 'cleaning',
      startsAt: new Date(Math.ceil(Date.now() / HOUR) * HOUR + 48 * HOUR).toISOString(),
      durationMinutes: 120,
    });
    expect(later.status, later.text).toBe(201);
    laterId = later.json.run.id;
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('draws a done run where it really ran, the booking faintly beside it, and says how far it strayed', async () => {
    for (const [viewport, name] of [
      [DESKTOP, 'actual-times-board-desktop'],
      [PHONE, 'actual-times-board-phone'],
    ] as const) {
      const t = await newPage(browser, viewport);
      await signInUi(t.page, fx.users.planner.email, TEST_PASSWORD);
      await t.page.goto(`/?zoom=day&date=${yesterday}`);
      const block = t.page.getByTestId(`run-${doneId}`);
      await block.waitFor();
      await hydrated(t.page);
      const label = await block.getAttribute('aria-label');
      expect(label).toContain('started 40 min late, finished 1 h 5 min late');
      expect(label).toMatch(/ran .*08:40 to .*13:05 \(booked .*08:00 to .*12:00\)/);
      const ghost = t.page.getByTestId(`run-booking-${doneId}`);
      const [b, g] = [(await block.boundingBox())!, (await ghost.boundingBox())!];
      // Day zoom: 56 px an hour. The block starts 40 min after the booking and is 4 h 25 min long; the booking 4 h.
      expect(b.x - g.x).toBeCloseTo((40 / 60) * 56, 0);
      expect(g.width).toBeCloseTo(4 * 56, 0);
      await block.scrollIntoViewIfNeeded();
      await checkPage(t, name);
      await t.context.close();
    }
  });

  it('shows actual and booked times on the run page, and a planner corrects them there', async () => {
    const t = await newPage(browser, PHONE);
    await signInUi(t.page, fx.users.planner.email, TEST_PASSWORD);
    await t.page.goto(`/runs/${doneId}`);
    await hydrated(t.page);
    await expect(t.page.getByTestId('run-actual-times').textContent()).resolves.toContain('started 40 min late, finished 1 h 5 min late');
    await t.page.getByRole('button', { name: 'Correct the actual times' }).click();
    await t.page.getByLabel(/^Finished/).fill(`${yesterday}T12:30`);
    await checkPage(t, 'actual-times-correct-phone');
    await t.page.getByRole('button', { name: 'Save the corrected times' }).click();
    // The reason is required: the field says so.
    await t.page.getByText('Say why the times are corrected').first().waitFor();
    t.errors.splice(0, t.errors.length, ...t.errors.filter((e) => !e.includes('status of 400')));
    await t.page.getByLabel(/^Why/).fill('Finish read from the chart recorder');
    await Promise.all([t.page.waitForEvent('load'), t.page.getByRole('button', { name: 'Save the corrected times' }).click()]);
    await expect(t.page.getByTestId('run-actual-times').textContent()).resolves.toContain('finished 30 min late');
    await t.context.close();
  });

  it('asks before a start two days early on the board and shows the question in words', async () => {
    const t = await newPage(browser, DESKTOP);
    await signInUi(t.page, fx.users.distiller.email, TEST_PASSWORD);
    const day = wallClock(new Date(Date.now() + 48 * HOUR), TZ).ymd;
    await t.page.goto(`/?zoom=week&date=${day}`);
    await t.page.getByTestId(`run-${laterId}`).waitFor();
    await hydrated(t.page);
    await t.page.getByTestId(`run-${laterId}`).click();
    await t.page.getByRole('dialog').getByRole('button', { name: 'Start run' }).click();
    const confirm = t.page.getByRole('dialog', { name: 'Start the cleaning?' });
    await confirm.getByRole('button', { name: 'Start now' }).click();
    await confirm.getByRole('alert').filter({ hasText: 'before the booked start' }).waitFor();
    t.errors.splice(0, t.errors.length, ...t.errors.filter((e) => !e.includes('status of 409')));
    await checkPage(t, 'actual-times-start-question');
    // Back leaves the run as it was.
    await confirm.getByRole('button', { name: 'Back' }).click();
    const r = await distiller.get(`/api/runs/${laterId}`);
    expect(r.json.run.status).toBe('planned');
    await t.context.close();
  });
});
