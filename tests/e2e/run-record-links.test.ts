import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { launch, newPage, checkPage, signInUi, PHONE, DESKTOP } from '../helpers/browser';
import { TEST_PASSWORD, type Client } from '../helpers/api';
import { at, boardFixture, type BoardFixture } from '../helpers/board-fixture';
import { wallClock } from '../../src/lib/schedule';

const TZ = 'Europe/London';

/** Wait until every island on the page has hydrated (Astro drops the `ssr` attribute then). */
async function hydrated(page: Page) {
  await page.waitForFunction(() => document.querySelectorAll('astro-island[ssr]').length === 0);
}

describe('a finished run leads to its record', () => {
  let browser: Browser;
  let fx: BoardFixture;
  let planner: Client;
  let distiller: Client;
  /** Running on Wash Still 1: the distiller finishes it on the day view. */
  let runningId: number;
  /** Done on Wash Still 2 with its low wines recorded. */
  let recordedId: number;
  /** Done on the Small Still, nothing recorded yet. */
  let unrecordedId: number;
  let day: string;

  async function book(stillId: number, type: 'stripping' | 'spirit', hours: number): Promise<{ id: number; version: number }> {
    const start = at(0, -1);
    const r = await planner.post('/api/runs', {
      stillId,
      type,
      startsAt: start.toISOString(),
      endsAt: new Date(start.getTime() + hours * 3600e3).toISOString(),
      chargeLitres: stillId === fx.stills.small ? 250 : 2000,
    });
    expect(r.status, r.text).toBe(201);
    const started = await distiller.post(`/api/runs/${r.json.run.id}/start`, { version: r.json.run.version });
    expect(started.status, started.text).toBe(200);
    return { id: started.json.run.id, version: started.json.run.version };
  }

  beforeAll(async () => {
    browser = await launch();
    fx = await boardFixture('Run Record Links Distillery', TZ);
    planner = await fx.client('planner');
    distiller = await fx.client('distiller');
    day = wallClock(at(0, -1), TZ).ymd;
    runningId = (await book(fx.stills.ws1, 'stripping', 3)).id;
    const recorded = await book(fx.stills.ws2, 'stripping', 3);
    recordedId = recorded.id;
    const saved = await distiller.put(`/api/runs/${recordedId}/outcomes`, {
      version: recorded.version,
      fractions: [{ fraction: 'low_wines', volumeLitres: 500, alcoholmeterReading: 28, readingTempC: 20 }],
      finish: true,
    });
    expect(saved.status, saved.text).toBe(200);
    const unrecorded = await book(fx.stills.small, 'spirit', 3);
    unrecordedId = unrecorded.id;
    // Finished seconds after its start: the question that asks is accepted here.
    const finished = await distiller.post(`/api/runs/${unrecordedId}/finish`, { version: unrecorded.version, confirm: true });
    expect(finished.status, finished.text).toBe(200);
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('a distiller finishes a run on the day view (phone) and lands on its record form', async () => {
    const t = await newPage(browser, PHONE);
    await signInUi(t.page, fx.users.distiller.email, TEST_PASSWORD);
    await t.page.goto(`/board/day?date=${day}`);
    await hydrated(t.page);
    const item = t.page.getByTestId(`day-run-${runningId}`);
    await checkPage(t, 'run-record-links-day-phone');
    // Done runs link to their record, worded by whether anything is recorded yet.
    await expect(t.page.getByTestId(`day-run-${recordedId}`).getByRole('link', { name: 'Run record' }).getAttribute('href')).resolves.toBe(
      `/runs/${recordedId}/record`,
    );
    await expect(t.page.getByTestId(`day-run-${unrecordedId}`).getByRole('link', { name: 'Record what came off' }).getAttribute('href')).resolves.toBe(
      `/runs/${unrecordedId}/record`,
    );
    expect(await item.getByRole('link', { name: /Run record|Record what came off/ }).count()).toBe(0);
    // Finish asks for confirmation; the run started moments ago, so the server's question is shown and accepted.
    await item.getByRole('button', { name: 'Finish stripping run' }).click();
    const confirm = t.page.getByRole('dialog', { name: 'Finish the stripping run?' });
    await confirm.getByRole('button', { name: 'Finish now' }).click();
    await confirm.getByRole('alert').filter({ hasText: 'after it started — is that right?' }).waitFor();
    // The server asks by answering 409 confirm_required, which Chromium logs as a failed resource; that one is expected.
    t.errors.splice(0, t.errors.length, ...t.errors.filter((e) => !e.includes('status of 409')));
    await checkPage(t, 'run-record-links-finish-question-phone');
    await Promise.all([t.page.waitForURL(`**/runs/${runningId}/record`), confirm.getByRole('button', { name: 'Finish anyway' }).click()]);
    await t.page.getByRole('heading', { level: 1, name: /Stripping run on Wash Still 1/ }).waitFor();
    await hydrated(t.page);
    expect(await t.page.locator('.tag', { hasText: 'done' }).count()).toBeGreaterThan(0);
    await checkPage(t, 'run-record-links-record-after-finish-phone');
    // Back on the day view the finished run now asks for its record.
    await t.page.goto(`/board/day?date=${day}`);
    await expect(item.getByRole('link', { name: 'Record what came off' }).getAttribute('href')).resolves.toBe(`/runs/${runningId}/record`);
    await t.context.close();
  });

  it('a done run on the run page and on the board links to its record', async () => {
    const t = await newPage(browser, DESKTOP);
    await signInUi(t.page, fx.users.planner.email, TEST_PASSWORD);
    await t.page.goto(`/runs/${recordedId}`);
    await expect(t.page.getByRole('link', { name: 'Run record' }).getAttribute('href')).resolves.toBe(`/runs/${recordedId}/record`);
    await checkPage(t, 'run-record-links-run-page');
    await t.page.goto(`/runs/${unrecordedId}`);
    await expect(t.page.getByRole('link', { name: 'Record what came off' }).getAttribute('href')).resolves.toBe(`/runs/${unrecordedId}/record`);

    await t.page.goto(`/?zoom=week&date=${day}`);
    await t.page.waitForSelector(`[data-testid="run-${recordedId}"]`);
    await hydrated(t.page);
    // Keyboard: a done run is not movable, but it still opens with Enter.
    await t.page.getByTestId(`run-${recordedId}`).focus();
    await t.page.keyboard.press('Enter');
    const dialog = t.page.getByRole('dialog');
    await dialog.waitFor();
    const link = dialog.getByRole('link', { name: 'Run record' });
    await expect(link.getAttribute('href')).resolves.toBe(`/runs/${recordedId}/record`);
    await checkPage(t, 'run-record-links-board-dialog');
    await dialog.getByRole('button', { name: 'Close' }).click();
    await t.page.getByTestId(`run-${unrecordedId}`).click();
    await expect(t.page.getByRole('dialog').getByRole('link', { name: 'Record what came off' }).getAttribute('href')).resolves.toBe(
      `/runs/${unrecordedId}/record`,
    );
    await Promise.all([
      t.page.waitForURL(`**/runs/${unrecordedId}/record`),
      t.page.getByRole('dialog').getByRole('link', { name: 'Record what came off' }).click(),
    ]);
    await t.context.close();
  });

  it('the run sheet links done runs to their records', async () => {
    const t = await newPage(browser, DESKTOP);
    await signInUi(t.page, fx.users.distiller.email, TEST_PASSWORD);
    await t.page.goto(`/reports/run-sheet?date=${day}`);
    await expect(t.page.getByTestId(`run-record-link-${recordedId}`).textContent()).resolves.toBe('Run record');
    await expect(t.page.getByTestId(`run-record-link-${unrecordedId}`).textContent()).resolves.toBe('Record what came off');
    await expect(t.page.getByTestId(`run-record-link-${recordedId}`).getAttribute('href')).resolves.toBe(`/runs/${recordedId}/record`);
    await checkPage(t, 'run-record-links-run-sheet');
    await t.context.close();
  });

  it('staff, who cannot open a record, are not shown the link', async () => {
    const t = await newPage(browser, PHONE);
    await signInUi(t.page, fx.users.staff.email, TEST_PASSWORD);
    for (const path of [`/board/day?date=${day}`, `/runs/${recordedId}`, `/reports/run-sheet?date=${day}`]) {
      await t.page.goto(path);
      expect(await t.page.getByRole('link', { name: /Run record|Record what came off/ }).count(), path).toBe(0);
    }
    expect((await t.page.goto(`/runs/${recordedId}/record`))?.status()).toBe(403);
    await t.context.close();
  });
});
