import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { launch, newPage, checkPage, signInUi, PHONE, DESKTOP } from '../helpers/browser';
import { TEST_PASSWORD, type Client } from '../helpers/api';
import { addFerment, boardFixture, type BoardFixture } from '../helpers/board-fixture';
import { addDaysYmd, wallClock, weekdayOfYmd, zonedDateTime } from '../../src/lib/schedule';

const TZ = 'Europe/London';
const WIDE = { width: 2700, height: 1300 };

/** Tuesday of next week (local date), so a one-day move stays inside the same board week. */
function nextTuesday(): string {
  const today = wallClock(new Date(), TZ).ymd;
  const wd = weekdayOfYmd(today);
  return addDaysYmd(today, ((2 - wd + 7) % 7) + 7);
}

async function runOnBoard(c: Client, id: number) {
  const r = await c.get(`/api/runs/${id}`);
  return r.json.run as { id: number; stillId: number; startsAt: string; endsAt: string; version: number };
}

/** Wait until every island on the page has hydrated (Astro drops the `ssr` attribute then). */
async function hydrated(page: Page) {
  await page.waitForFunction(() => document.querySelectorAll('astro-island[ssr]').length === 0);
}

async function openBoard(page: Page, ymd: string) {
  await page.goto(`/?zoom=week&date=${ymd}`);
  await page.waitForSelector('[data-testid^="run-"]');
  await hydrated(page);
}

async function press(page: Page, key: string, times = 1) {
  for (let i = 0; i < times; i++) {
    await page.keyboard.press(key);
    await page.waitForTimeout(60);
  }
}

describe('the still board in Chromium', () => {
  let browser: Browser;
  let fx: BoardFixture;
  let planner: Client;
  let tuesday: string;
  beforeAll(async () => {
    browser = await launch();
    fx = await boardFixture('Board E2E Distillery', TZ);
    planner = await fx.client('planner');
    tuesday = nextTuesday();
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('drags a run with the mouse to another still and day, and finds it there after a reload', async () => {
    const start = zonedDateTime(tuesday, '06:00', TZ);
    const r = await planner.post('/api/runs', {
      stillId: fx.stills.ws1,
      type: 'maintenance',
      startsAt: start.toISOString(),
      endsAt: new Date(start.getTime() + 4 * 3600e3).toISOString(),
    });
    expect(r.status, r.text).toBe(201);
    const id = r.json.run.id;
    const t = await newPage(browser, WIDE);
    await signInUi(t.page, fx.users.planner.email, TEST_PASSWORD);
    await openBoard(t.page, tuesday);
    const block = t.page.getByTestId(`run-${id}`);
    const box = (await block.boundingBox())!;
    const x = box.x + Math.min(20, box.width / 2);
    const y = box.y + box.height / 2;
    await t.page.mouse.move(x, y);
    await t.page.mouse.down();
    // One day to the right (24 h × 12 px) and one still down (66 px).
    await t.page.mouse.move(x + 144, y + 30, { steps: 10 });
    await t.page.mouse.move(x + 288, y + 66, { steps: 10 });
    await t.page.mouse.up();
    await expect.poll(async () => (await runOnBoard(planner, id)).stillId, { timeout: 10_000 }).toBe(fx.stills.ws2);
    const moved = await runOnBoard(planner, id);
    expect(moved.startsAt).toBe(zonedDateTime(addDaysYmd(tuesday, 1), '06:00', TZ).toISOString());
    await t.page.reload();
    await t.page.waitForSelector(`[data-testid="run-${id}"]`);
    const lane = await t.page.getByTestId(`run-${id}`).evaluate((el) => el.closest('[data-testid^="lane-"]')?.getAttribute('data-testid'));
    expect(lane).toBe(`lane-${fx.stills.ws2}`);
    // More than six days ahead a moment reads with its date ('Wed 16 Dec 06:00'), nearer by its weekday.
    expect(await t.page.getByTestId(`run-${id}`).getAttribute('aria-label')).toMatch(/(Wednesday|Wed \d{1,2} [A-Z][a-z]{2}) 06:00/);
    await t.context.close();
  });

  it('moves a run with the keyboard and announces it in words; escape puts a run back', async () => {
    const start = zonedDateTime(tuesday, '12:00', TZ);
    const r = await planner.post('/api/runs', {
      stillId: fx.stills.ws2,
      type: 'cleaning',
      startsAt: start.toISOString(),
      endsAt: new Date(start.getTime() + 2 * 3600e3).toISOString(),
    });
    const id = r.json.run.id;
    const t = await newPage(browser, WIDE);
    await signInUi(t.page, fx.users.distiller.email, TEST_PASSWORD);
    await openBoard(t.page, tuesday);
    await t.page.getByTestId(`run-${id}`).focus();
    // Escape cancels: nothing saved.
    await press(t.page, 'Space');
    await press(t.page, 'ArrowRight');
    await press(t.page, 'Escape');
    await t.page.waitForTimeout(300);
    expect((await runOnBoard(planner, id)).version).toBe(r.json.run.version);
    // Three one-hour slots later and one still up, then drop.
    await t.page.getByTestId(`run-${id}`).focus();
    await press(t.page, 'Space');
    await press(t.page, 'ArrowRight', 3);
    await press(t.page, 'ArrowUp');
    await press(t.page, 'Space');
    await expect.poll(async () => (await runOnBoard(planner, id)).startsAt, { timeout: 10_000 }).toBe(zonedDateTime(tuesday, '15:00', TZ).toISOString());
    expect((await runOnBoard(planner, id)).stillId).toBe(fx.stills.ws1);
    await expect
      .poll(() => t.page.getByTestId('board-live').textContent())
      .toMatch(/Cleaning moved to Wash Still 1, (Tuesday|Tue \d{1,2} [A-Z][a-z]{2}) 15:00/);
    await t.context.close();
  });

  it("shows the booked-before-ready/stable badge while a run is dragged before its wash's ready window", async () => {
    // A wash pitched a day ago, still falling: its ready window lies days ahead.
    const fermentId = await addFerment(fx, { code: 'E2E-W', fermenter: 1, pitchedDaysAgo: 1, og: 1.062, k: 0.35 });
    const board = await planner.get(
      `/api/board?from=${encodeURIComponent(new Date().toISOString())}&to=${encodeURIComponent(new Date(Date.now() + 30 * 86400e3).toISOString())}`,
    );
    const f = board.json.ferments.find((x: { id: number }) => x.id === fermentId);
    expect(f.readyP90, JSON.stringify(f)).not.toBeNull();
    // Book it a day after the late edge of its window, then drag it back by days.
    const late = new Date(Date.parse(f.readyP90) + 86400e3);
    const ymd = wallClock(late, TZ).ymd;
    const startsAt = zonedDateTime(ymd, '10:00', TZ);
    const r = await planner.post('/api/runs', {
      stillId: fx.stills.small,
      type: 'stripping',
      startsAt: startsAt.toISOString(),
      endsAt: new Date(startsAt.getTime() + 3 * 3600e3).toISOString(),
      ferments: [{ fermentId, litres: 250 }],
    });
    expect(r.status, r.text).toBe(201);
    const id = r.json.run.id;
    const t = await newPage(browser, WIDE);
    await signInUi(t.page, fx.users.planner.email, TEST_PASSWORD);
    await openBoard(t.page, ymd);
    expect(await t.page.getByTestId(`run-${id}`).locator('[data-warning^="booked_before"]').count()).toBe(0);
    await t.page.getByTestId(`run-${id}`).focus();
    await press(t.page, 'Space');
    const daysBack = Math.ceil((startsAt.getTime() - Date.parse(f.readyP10)) / 86400e3) + 1;
    const monday = wallClock(zonedDateTime(ymd, '00:00', TZ), TZ).weekday;
    await press(t.page, 'Shift+ArrowLeft', Math.min(daysBack, (monday + 6) % 7));
    const preview = t.page.getByTestId('drop-preview');
    if (daysBack <= (monday + 6) % 7) {
      await expect.poll(() => preview.locator('[data-warning^="booked_before"]').count()).toBeGreaterThan(0);
    } else {
      // The window starts in an earlier week: drag to the Monday and check the badge there.
      await expect.poll(() => preview.locator('[data-warning^="booked_before"], [data-warning="ferment_not_pitched"]').count()).toBeGreaterThan(0);
    }
    await checkPage(t, 'board-dragging');
    await t.page.keyboard.press('Escape');
    await t.context.close();
  });

  it('moves a run off a stalled wash to the earliest feasible slot in one step', async () => {
    // Grain wash pitched at 1.065 and stuck at 1.022 (common practice: far above 1.002–1.008 is stuck, not done).
    const stuck = await addFerment(fx, { code: 'QR-112', fermenter: 2, pitchedDaysAgo: 9, og: 1.065, holdAt: 1.022 });
    const inThree = wallClock(new Date(Date.now() + 3 * 86400e3), TZ).ymd;
    const startsAt = zonedDateTime(inThree, '07:00', TZ);
    const r = await planner.post('/api/runs', {
      stillId: fx.stills.ws1,
      type: 'stripping',
      startsAt: startsAt.toISOString(),
      endsAt: new Date(startsAt.getTime() + 6 * 3600e3).toISOString(),
      ferments: [{ fermentId: stuck, litres: 2400 }],
      notes: 'S112',
    });
    expect(r.status, r.text).toBe(201);
    const id = r.json.run.id;
    const t = await newPage(browser, DESKTOP);
    await signInUi(t.page, fx.users.planner.email, TEST_PASSWORD);
    await t.page.goto(`/?zoom=week&date=${inThree}`);
    await hydrated(t.page);
    const risk = t.page.getByTestId(`risk-${id}`);
    await risk.waitFor();
    expect(await risk.textContent()).toContain('Wash QR-112 has stalled');
    await risk.getByRole('button', { name: 'Find earliest slots' }).click();
    const moveHere = risk.getByRole('button', { name: 'Move here' }).first();
    await moveHere.waitFor();
    await checkPage(t, 'board-desktop');
    await moveHere.click();
    await expect.poll(async () => (await runOnBoard(planner, id)).version, { timeout: 10_000 }).toBe(r.json.run.version + 1);
    const moved = await runOnBoard(planner, id);
    expect(Date.parse(moved.startsAt)).toBeGreaterThanOrEqual(Date.now() + 3 * 86400e3 - 120_000);
    await expect.poll(() => t.page.getByTestId('board-notice').count()).toBe(0);
    await t.context.close();
  });

  it('shows today on the floor on a phone with start and finish for distillers', async () => {
    const now = new Date();
    const start = new Date(Math.ceil(now.getTime() / 3600e3) * 3600e3);
    const today = wallClock(now, TZ).ymd;
    const endOfToday = zonedDateTime(addDaysYmd(today, 1), '00:00', TZ);
    const startsAt = start.getTime() + 3600e3 < endOfToday.getTime() ? start : new Date(endOfToday.getTime() - 2 * 3600e3);
    const r = await planner.post('/api/runs', {
      stillId: fx.stills.small,
      type: 'stripping',
      startsAt: startsAt.toISOString(),
      endsAt: new Date(startsAt.getTime() + 3600e3).toISOString(),
    });
    expect(r.status, r.text).toBe(201);
    const t = await newPage(browser, PHONE);
    await signInUi(t.page, fx.users.distiller.email, TEST_PASSWORD);
    await t.page.goto('/board/day');
    await hydrated(t.page);
    const item = t.page.getByTestId(`day-run-${r.json.run.id}`);
    await item.getByRole('button', { name: 'Start stripping run' }).click();
    // Start asks for confirmation first (and, when the booking is more than the margin away, says so).
    const confirm = t.page.getByRole('dialog', { name: 'Start the stripping run?' });
    await confirm.getByRole('button', { name: 'Start now' }).click();
    const anyway = confirm.getByRole('button', { name: 'Start anyway' });
    await Promise.race([
      anyway
        .waitFor({ timeout: 10_000 })
        .then(() => anyway.click())
        .catch(() => undefined),
      confirm.waitFor({ state: 'detached' }),
    ]);
    await expect.poll(async () => (await runOnBoard(planner, r.json.run.id)).version).toBe(r.json.run.version + 1);
    await t.page.getByTestId(`day-run-${r.json.run.id}`).getByRole('button', { name: 'Finish stripping run' }).waitFor();
    const overflow = await t.page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBeLessThanOrEqual(1);
    await checkPage(t, 'board-day-phone');
    await t.context.close();
  });
});
