import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import type { Browser } from 'playwright-core';
import { writeFileSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { launch, newPage, checkPage, signInUi, PHONE, DESKTOP } from '../helpers/browser';
import { createTestWorkspace, TEST_PASSWORD, type TestWorkspace } from '../helpers/api';

/** Water density, Tanaka et al. (2001), REFERENCES §2. */
function tanaka(tC: number): number {
  const a1 = -3.983035,
    a2 = 301.797,
    a3 = 522528.9,
    a4 = 69.34881,
    a5 = 999.97495;
  return a5 * (1 - ((tC + a1) ** 2 * (tC + a2)) / (a3 * (tC + a4)));
}

const DAY = 86_400_000;

/** Astro drops the ssr attribute from an island once React has hydrated it. */
async function hydrated(page: import('playwright-core').Page): Promise<void> {
  await page.waitForFunction(() => [...document.querySelectorAll('astro-island')].every((i) => !i.hasAttribute('ssr')));
}

describe('ferments in Chromium at phone width', () => {
  let browser: Browser;
  let ws: TestWorkspace;
  let fermentId: number;
  const pitched = new Date(Date.now() - 3 * DAY);
  beforeAll(async () => {
    browser = await launch();
    ws = await createTestWorkspace('Phone Ferments');
    const m = await ws.client('manager');
    const wt = await m.post('/api/wash-types', { name: 'All-grain wash', category: 'grain', terminalMin: 1.002, terminalMax: 1.008, typicalOg: 1.06 });
    await m.post('/api/wash-types', { name: 'Sugar wash', category: 'sugar', terminalMin: 0.99, terminalMax: 1.0, typicalOg: 1.08 });
    const fv = await m.post('/api/fermenters', { name: 'FV3', capacity: 3000 });
    await m.post('/api/fermenters', { name: 'FV4', capacity: 2500 });
    const p = await ws.client('planner');
    const f = await p.post('/api/ferments', {
      code: 'QX-201',
      washTypeId: wt.json.washType.id,
      fermenterId: fv.json.fermenter.id,
      volume: 2400,
      pitchedAt: pitched.toISOString(),
      og: 1.062,
      yeast: 'M strain',
    });
    fermentId = f.json.ferment.id;
    for (const [i, sg] of [1.062, 1.048, 1.034, 1.024].entries()) {
      await p.post(`/api/ferments/${fermentId}/readings`, {
        value: sg,
        unit: 'sg',
        method: 'hydrometer',
        sampleTemp: 20,
        takenAt: new Date(pitched.getTime() + i * 0.66 * DAY + 60_000).toISOString(),
      });
    }
    await p.post(`/api/ferments/${fermentId}/readings`, {
      value: 6.4,
      unit: 'brix',
      method: 'refractometer',
      takenAt: new Date(pitched.getTime() + 2.2 * DAY).toISOString(),
      // 6.4 °Bx reads as about 1.009 SG (Terrill 2011), more than 0.010 below the fitted fall: held unless confirmed.
      confirm: true,
    });
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('a distiller logs a hydrometer reading at 28 °C and sees the corrected SG in the table and on the chart', async () => {
    const t = await newPage(browser, PHONE);
    await signInUi(t.page, ws.users.distiller.email, TEST_PASSWORD);
    await t.page.goto('/ferments');
    await t.page.getByRole('link', { name: 'QX-201' }).waitFor();
    await checkPage(t, 'ferments-list-phone');
    await t.page.getByRole('link', { name: 'QX-201' }).click();
    await t.page.getByTestId('gravity-chart').locator('svg.recharts-surface').first().waitFor();
    await checkPage(t, 'ferment-detail-phone');
    await t.page.getByTestId('log-reading').click();
    await t.page.getByRole('button', { name: 'Save reading' }).waitFor();
    await hydrated(t.page);
    // The form starts on the instrument used last (here a refractometer): choose the hydrometer and SG.
    await t.page.getByText('Hydrometer', { exact: true }).click();
    await t.page.getByText('SG', { exact: true }).click();
    await checkPage(t, 'reading-log-phone');
    const value = t.page.getByLabel('Gravity (SG)');
    expect(await value.getAttribute('inputmode')).toBe('decimal');
    const box = await value.boundingBox();
    expect(box!.height).toBeGreaterThanOrEqual(44); // a thumb-sized target
    // A refused value first: field-level message, nothing saved.
    await value.fill('1.350');
    await t.page.getByLabel(/Sample temperature/).fill('28');
    await t.page.getByRole('button', { name: 'Save reading' }).click();
    await expect.poll(() => t.page.getByTestId('error-value').textContent()).toMatch(/between 0.980 and 1.200/);
    await value.fill('1.050');
    // Understood as typed, beside the field.
    expect(await t.page.getByTestId('value-understood').textContent()).toBe('= 1.050 SG');
    await t.page.getByRole('button', { name: 'Save reading' }).click();
    // 1.050 at 28 °C lies far above the fitted fall from 1.062 to 1.024: held, naming the value and unit entered.
    const doubt = t.page.getByTestId('reading-doubt');
    await doubt.waitFor();
    expect(await doubt.textContent()).toContain('You entered 1.050 SG');
    expect(await doubt.textContent()).toMatch(/SG off the fitted curve/);
    t.errors.length = 0; // the browser logs the refused requests' 400 and 409 statuses
    await checkPage(t, 'reading-doubt-phone');
    await Promise.all([t.page.waitForURL(/logged=/), doubt.getByRole('button', { name: /Save as entered/ }).click()]);
    const expected = ((1.05 * tanaka(20)) / tanaka(28)).toFixed(4); // Tanaka et al. 2001
    await expect.poll(() => t.page.getByTestId('logged-message').textContent()).toContain(expected);
    const row = t.page.getByTestId('readings-table').locator('tbody tr').first();
    expect(await row.textContent()).toContain(expected);
    expect(await row.textContent()).toContain('28.0 °C');
    await t.page.getByTestId('gravity-chart').locator('.recharts-scatter-symbol').first().waitFor();
    const points = await t.page.getByTestId('gravity-chart').locator('.recharts-scatter-symbol').count();
    expect(points).toBe(6);
    expect(await t.page.getByTestId('current-sg').textContent()).toBe(Number(expected).toFixed(3));
    const overflow = await t.page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBeLessThanOrEqual(1);
    await checkPage(t, 'ferment-after-log-phone');
    await t.context.close();
  });

  it('a planner uploads a CSV, sees the preview, imports it and sees the chart', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'plateau-csv-'));
    const file = path.join(dir, 'logger.csv');
    const start = pitched.getTime() + 2.5 * DAY;
    const lines = ['time,value,unit,method,temperature'];
    for (let i = 0; i < 12; i++) lines.push(`${new Date(start + i * 3_600_000).toISOString()},${(1.02 - i * 0.0004).toFixed(4)},sg,digital,`);
    lines.push(`${new Date(start + 13 * 3_600_000).toISOString()},=HYPERLINK("x"),sg,digital,`);
    writeFileSync(file, lines.join('\n') + '\n');
    const t = await newPage(browser, PHONE);
    await signInUi(t.page, ws.users.planner.email, TEST_PASSWORD);
    await t.page.goto(`/ferments/${fermentId}`);
    await t.page.getByTestId('gravity-chart').locator('svg.recharts-surface').first().waitFor();
    await hydrated(t.page);
    await t.page.getByLabel('CSV file').setInputFiles(file);
    await t.page.getByRole('button', { name: 'Upload and check' }).click();
    const preview = t.page.getByTestId('upload-preview');
    await preview.waitFor();
    expect(await preview.textContent()).toContain('12 to import');
    expect(await preview.textContent()).toContain('1 rejected');
    await preview.getByText('Rejected lines').click();
    expect(await preview.textContent()).toContain('Line 14');
    await checkPage(t, 'ferment-upload-preview-phone');
    await t.page.getByRole('button', { name: 'Import 12 readings' }).click();
    await expect.poll(() => t.page.getByTestId('upload-done').textContent()).toContain('Imported 12 readings');
    await expect.poll(() => t.page.getByRole('heading', { name: /Readings \(/ }).textContent()).toBe('Readings (18)');
    expect(await t.page.getByTestId('readings-table').locator('tbody tr').count()).toBe(18);
    const symbols = await t.page
      .getByTestId('gravity-chart')
      .locator('.recharts-scatter')
      .evaluateAll((els) => els.map((e) => e.querySelectorAll('.recharts-scatter-symbol').length));
    expect(symbols).toEqual([17, 1]); // hydrometer and logger points, refractometer point
    await checkPage(t, 'ferment-after-upload-phone');
    await t.context.close();
  });

  it('a planner starts a ferment; the form says which fermenters are free', async () => {
    const t = await newPage(browser, PHONE);
    await signInUi(t.page, ws.users.planner.email, TEST_PASSWORD);
    await t.page.goto('/ferments/new');
    await t.page.getByLabel('Code').waitFor();
    await hydrated(t.page);
    const options = await t.page.getByLabel('Fermenter').locator('option').allTextContents();
    expect(options.some((o) => o.includes('FV3') && o.includes('holds QX-201'))).toBe(true);
    expect(options.some((o) => o.includes('FV4') && o.includes('free'))).toBe(true);
    await checkPage(t, 'ferment-new-phone');
    await t.page.getByLabel('Code').fill('QX-202');
    await t.page.getByLabel('Volume (L)').fill('2000');
    await t.page.getByLabel('OG (SG)').fill('1.080');
    await Promise.all([t.page.waitForURL(/\/ferments\/\d+$/), t.page.getByRole('button', { name: 'Start ferment' }).click()]);
    expect(await t.page.getByRole('heading', { level: 1 }).textContent()).toBe('QX-202');
    await t.context.close();
  });

  it('the Stills & fermenters page: managers edit, others read', async () => {
    const t = await newPage(browser, DESKTOP);
    await signInUi(t.page, ws.users.manager.email, TEST_PASSWORD);
    await t.page.goto('/vessels');
    await t.page.getByLabel('New fermenter').waitFor();
    await hydrated(t.page);
    await t.page.getByLabel('New fermenter').fill('FV9');
    await t.page.getByLabel('Capacity (L)', { exact: true }).fill('1800');
    await t.page.getByRole('button', { name: 'Add fermenter' }).click();
    await expect.poll(() => t.page.getByRole('status').filter({ hasText: 'Added FV9' }).count()).toBe(1);
    await checkPage(t, 'vessels-manager-desktop');
    await t.context.close();
    const s = await newPage(browser, PHONE);
    await signInUi(s.page, ws.users.staff.email, TEST_PASSWORD);
    await s.page.goto('/vessels');
    await s.page.getByRole('heading', { name: 'Wash types' }).waitFor();
    expect(await s.page.getByRole('button', { name: 'Add fermenter' }).count()).toBe(0);
    expect(await s.page.locator('section[aria-labelledby="fermenters-heading"] table').textContent()).toContain('FV9');
    await checkPage(s, 'vessels-staff-phone');
    await s.context.close();
  });

  it('a stalled wash reads "not ready" in the list and on its page, not "met"', async () => {
    const p = await ws.client('planner');
    const grain = (await p.get('/api/wash-types')).json.washTypes.find((w: { category: string }) => w.category === 'grain').id;
    const start = new Date(Date.now() - 9 * DAY);
    const f = await p.post('/api/ferments', { code: 'QX-209', washTypeId: grain, fermenterId: null, volume: 2400, pitchedAt: start.toISOString(), og: 1.065 });
    const id = f.json.ferment.id;
    // Falls for four days, then holds at 1.022 for five: stuck far above the 1.002–1.008 finish (common practice).
    const sgs = [1.065, 1.05, 1.038, 1.029, 1.024, 1.022, 1.022, 1.022, 1.022, 1.022];
    for (const [i, sg] of sgs.entries()) {
      const r = await p.post(`/api/ferments/${id}/readings`, {
        value: sg,
        unit: 'sg',
        method: 'digital',
        takenAt: new Date(start.getTime() + i * DAY - 60_000 + (i === 0 ? 120_000 : 0)).toISOString(),
      });
      expect(r.status, r.text).toBe(201);
    }
    const t = await newPage(browser, DESKTOP);
    await signInUi(t.page, ws.users.staff.email, TEST_PASSWORD);
    await t.page.goto('/ferments');
    const row = t.page.getByRole('row').filter({ hasText: 'QX-209' });
    await row.waitFor();
    expect(await row.textContent()).toContain('not ready');
    expect(await row.textContent()).toContain('above range');
    expect(await row.textContent()).not.toContain('met ');
    await row.getByRole('link', { name: 'QX-209' }).click();
    await t.page.getByTestId('status-tag').waitFor();
    expect(await t.page.getByTestId('status-tag').textContent()).toBe('Stalled');
    expect(await t.page.locator('#verdict-heading + p + p').textContent()).toContain('not ready to distil');
    await t.context.close();
  });
});
