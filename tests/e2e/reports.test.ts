/**
 * A distiller records a spirit run's cuts on a phone and marks it done; the manager sees
 * utilisation and that run's recovery on /reports at tablet width and downloads a CSV.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import type { Browser } from 'playwright-core';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { launch, newPage, checkPage, signInUi, PHONE } from '../helpers/browser';
import { createTestWorkspace, TEST_PASSWORD, type TestWorkspace } from '../helpers/api';

const TABLET = { width: 768, height: 1024 };

describe('run record and reports in Chromium', () => {
  let browser: Browser;
  let ws: TestWorkspace;
  let spiritRunId: number;

  beforeAll(async () => {
    browser = await launch();
    ws = await createTestWorkspace('Glen Record Distillery', { timeZone: 'Europe/London' });
    const db = getDb();
    const w = ws.workspaceId;
    const every = [0, 1, 2, 3, 4, 5, 6].map((weekday) => ({ weekday, open: '00:00', close: '24:00' }));
    const [wash] = await db
      .insert(t.stills)
      .values({ workspaceId: w, name: 'Wash Still', kind: 'pot', capacityLitres: 2500, heatingKw: 60, operatingHours: every, typicalMinutes: {} })
      .$returningId();
    const [spirit] = await db
      .insert(t.stills)
      .values({
        workspaceId: w,
        name: 'Spirit Still',
        kind: 'pot',
        capacityLitres: 1200,
        heatingKw: 40,
        operatingHours: every,
        typicalMinutes: {},
        position: 1,
      })
      .$returningId();
    const now = Date.now();
    const [strip] = await db
      .insert(t.runs)
      .values({
        workspaceId: w,
        stillId: wash!.id,
        type: 'stripping',
        status: 'done',
        startsAt: new Date(now - 26 * 3600_000),
        endsAt: new Date(now - 20 * 3600_000),
        finishedAt: new Date(now - 20 * 3600_000),
        chargeLitres: 2400,
        chargeAbv: 7.5,
      })
      .$returningId();
    await db.insert(t.runOutcomes).values({
      workspaceId: w,
      runId: strip!.id,
      fraction: 'low_wines',
      volumeLitres: 640,
      alcoholmeterReading: 27.5,
      readingTempC: 20,
      abv20: 27.5,
      laa: 176,
    });
    const [run] = await db
      .insert(t.runs)
      .values({
        workspaceId: w,
        stillId: spirit!.id,
        type: 'spirit',
        status: 'running',
        startsAt: new Date(now - 5 * 3600_000),
        endsAt: new Date(now + 3600_000),
        startedAt: new Date(now - 5 * 3600_000),
        operatorId: ws.users.distiller.id,
        chargeLitres: 640,
      })
      .$returningId();
    await db.insert(t.runFeeds).values({ runId: run!.id, feedRunId: strip!.id, workspaceId: w, litres: 640 });
    spiritRunId = run!.id;
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('a distiller records the cuts on a phone and marks the run done', async () => {
    const tr = await newPage(browser, PHONE);
    await signInUi(tr.page, ws.users.distiller.email, TEST_PASSWORD);
    await tr.page.goto(`/runs/${spiritRunId}/record`);
    await expect.poll(() => tr.page.getByText('Heads are discarded (methanol)').count()).toBeGreaterThan(0);
    // Wait for the form island to hydrate before typing (Astro removes the ssr attribute then).
    await tr.page.waitForSelector('astro-island:not([ssr])');
    await tr.page.getByLabel('Strength (% vol at 20 °C)').fill('27.5');
    const cut = async (fraction: string, volume: string, reading: string, temp: string, note = '') => {
      const box = tr.page.locator(`fieldset[data-fraction="${fraction}"]`);
      await box.getByLabel(/^Volume/).fill(volume);
      await box.getByLabel(/^Alcoholmeter/).fill(reading);
      await box.getByLabel(/^at/).fill(temp);
      if (note) await box.getByLabel(/^Cut note/).fill(note);
    };
    // All read at 20 °C, so no correction: 10 × 0.80 + 150 × 0.70 + 60 × 0.35 + 40 × 0.20 = 8 + 105 + 21 + 8 = 142 LAA.
    await cut('heads', '10', '80', '20', 'Foreshots and heads to the discard drum');
    await cut('hearts', '150', '70', '45', 'Cut to tails at 64 % off the spout');
    await cut('tails', '60', '35', '20');
    await cut('feints', '40', '20', '20');
    // 45 °C is outside the alcoholometric tables: refused before anything is sent.
    await tr.page.getByRole('button', { name: 'Save record' }).click();
    await expect.poll(() => tr.page.getByText('Reading temperature must be between -20 and 40 °C.').count()).toBe(1);
    await tr.page.locator('fieldset[data-fraction="hearts"]').getByLabel(/^at/).fill('20');
    await expect.poll(() => tr.page.getByTestId('live-hearts').textContent()).toContain('105.0 LAA');
    // Charge 640 L × 27.5 % = 176 LAA; recovery 142 / 176 = 80.7 %
    await expect.poll(() => tr.page.getByTestId('collected-laa').textContent()).toContain('142.0 LAA');
    await expect.poll(() => tr.page.getByTestId('recovery').textContent()).toBe('80.7 %');
    const overflow = await tr.page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBeLessThanOrEqual(1);
    await checkPage(tr, 'run-record-phone');
    tr.page.once('dialog', (d) => void d.accept());
    await tr.page.getByRole('button', { name: 'Save and mark run done' }).click();
    await expect.poll(() => tr.page.getByRole('status').textContent()).toContain('The run is marked done');
    const [row] = await getDb()
      .select()
      .from(t.runs)
      .where((await import('drizzle-orm')).eq(t.runs.id, spiritRunId));
    expect(row!.status).toBe('done');
    await tr.context.close();
  });

  it('the manager sees utilisation and the recovery on /reports at tablet width, and downloads a CSV', async () => {
    const tr = await newPage(browser, TABLET);
    await signInUi(tr.page, ws.users.manager.email, TEST_PASSWORD);
    await tr.page.goto('/reports');
    const totals = tr.page.getByTestId('util-totals');
    await expect.poll(() => totals.textContent()).toContain('Utilisation');
    const row = tr.page.locator(`[data-testid="recovery-table"] tr[data-run="${spiritRunId}"]`);
    await expect.poll(() => row.textContent()).toContain('80.7 %');
    expect(await row.textContent()).toContain('142.0 LAA');
    // Charts hydrate when scrolled into view; each sits beside a table.
    await tr.page.getByRole('heading', { name: 'Yield per tonne of ingredients' }).scrollIntoViewIfNeeded();
    await tr.page.getByRole('heading', { name: 'Still utilisation' }).scrollIntoViewIfNeeded();
    await expect.poll(() => tr.page.locator('.recharts-surface').count()).toBeGreaterThan(0);
    const overflow = await tr.page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBeLessThanOrEqual(1);
    await checkPage(tr, 'reports-tablet');
    const [download] = await Promise.all([tr.page.waitForEvent('download'), tr.page.getByRole('link', { name: 'Runs with outcomes (CSV)' }).click()]);
    expect(download.suggestedFilename()).toMatch(/^plateau-runs-outcomes-\d{4}-\d{2}-\d{2}-to-\d{4}-\d{2}-\d{2}\.csv$/);
    const path = await download.path();
    const text = (await import('node:fs')).readFileSync(path!, 'utf8');
    expect(text).toContain('Hearts');
    expect(text).toContain("'Foreshots and heads to the discard drum".slice(1));
    await tr.context.close();
  });

  it('the printable run sheet opens for a day', async () => {
    const tr = await newPage(browser, TABLET);
    await signInUi(tr.page, ws.users.planner.email, TEST_PASSWORD);
    await tr.page.goto('/reports/run-sheet');
    await expect.poll(() => tr.page.getByRole('heading', { level: 1 }).textContent()).toContain('Run sheet');
    await tr.page.emulateMedia({ media: 'print' });
    expect(await tr.page.getByRole('navigation', { name: 'Main' }).isVisible()).toBe(false);
    await tr.page.emulateMedia({ media: 'screen' });
    await checkPage(tr, 'run-sheet-tablet');
    await tr.context.close();
  });
});
