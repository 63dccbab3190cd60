/**
 * Drag smoothness on a full board: builds the board benchmark's workspace (12 stills, about
 * 500 runs over six weeks, 100 ferments), opens the six-week board in Debian's Chromium
 * (1600×1000), counts the run blocks on screen, then drags one run across the board with the
 * mouse in 90 steps while recording every animation frame (requestAnimationFrame). Prints the
 * frame intervals: median, p95, max and the share of frames over 33 ms (below 30 fps).
 *
 *   DB_NAME=plateau_bench node --import tsx scripts/bench/board-frames.ts --url http://127.0.0.1:4321
 *
 * The app must be running (a production build) against the same database.
 */
import { chromium } from 'playwright-core';
import { closeDb } from '../../src/db/client';
import { build, PASSWORD } from './board';

const args = process.argv.slice(2);
const i = args.indexOf('--url');
const BASE = (i >= 0 ? args[i + 1]! : 'http://127.0.0.1:4321').replace(/\/$/, '');
if (!['127.0.0.1', 'localhost'].includes(new URL(BASE).hostname)) {
  console.error('Loopback only.');
  process.exit(2);
}

const pct = (v: number[], p: number) => {
  const s = [...v].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor((p / 100) * s.length))]!;
};

const data = await build();
const browser = await chromium.launch({
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
try {
  const page = await (await browser.newContext({ viewport: { width: 1600, height: 1000 }, baseURL: BASE })).newPage();
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(data.email);
  await page.getByLabel('Password').fill(PASSWORD);
  await Promise.all([page.waitForURL((u) => !u.pathname.startsWith('/sign-in')), page.getByRole('button', { name: 'Sign in' }).click()]);
  // The data start on a Monday: the six-week view from there holds all of it.
  const first = data.from.toISOString().slice(0, 10);
  await page.goto(`/?zoom=six-weeks&date=${first}`);
  await page.waitForSelector('[data-run-id]');
  await page.waitForTimeout(1000);
  const blocks = await page.locator('[data-run-id]').count();
  const block = page.locator('[data-run-id]').nth(Math.floor(blocks / 3));
  await block.scrollIntoViewIfNeeded();
  const box = (await block.boundingBox())!;
  // Strings, not functions: the TypeScript loader would inject helpers the page does not have.
  await page.evaluate(`(() => {
    window.__frames = []; window.__recording = true;
    const tick = (t) => { if (!window.__recording) return; window.__frames.push(t); requestAnimationFrame(tick); };
    requestAnimationFrame(tick);
  })()`);
  const x = box.x + Math.min(10, box.width / 2);
  const y = box.y + box.height / 2;
  const t0 = Date.now();
  await page.mouse.move(x, y);
  await page.mouse.down();
  for (let s = 1; s <= 90; s++) await page.mouse.move(x + s * 6, y + Math.sin(s / 10) * 120);
  await page.keyboard.press('Escape'); // cancel: the run goes back, nothing is saved
  await page.mouse.up();
  const dragMs = Date.now() - t0;
  const frames = (await page.evaluate('(() => { window.__recording = false; return window.__frames; })()')) as number[];
  const gaps = frames.slice(1).map((f, k) => f - frames[k]!);
  console.log(`Board: ${data.runCount} runs in the workspace, ${blocks} run blocks on the six-week board.`);
  console.log(`Drag of one run across the board, 90 pointer moves in ${dragMs} ms; ${gaps.length} frames:`);
  console.log(
    `  frame interval median ${pct(gaps, 50).toFixed(1)} ms, p95 ${pct(gaps, 95).toFixed(1)} ms, max ${Math.max(...gaps).toFixed(1)} ms; over 33 ms: ${((100 * gaps.filter((g) => g > 33).length) / gaps.length).toFixed(1)} %`,
  );
} finally {
  await browser.close();
  await closeDb();
}
