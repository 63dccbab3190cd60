/**
 * Text with HTML in it is shown as text, on every page that shows it: a ferment code and notes,
 * a still name, a reading note, a run note and a member's name carry markup; each page must show
 * the characters literally, create no element from them, open no dialog and log no console error.
 * (The Content-Security-Policy would also stop an inline handler; this checks the escaping itself.)
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import type { Browser } from 'playwright-core';
import { eq } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { launch, newPage, signInUi, checkPage, DESKTOP } from '../helpers/browser';
import { createTestWorkspace, TEST_PASSWORD, type TestWorkspace } from '../helpers/api';

const IMG = '<img src=x onerror=alert(1)>';
const SCRIPT = '<script>alert(2)</script>';
const DAY = 86_400_000;

describe('HTML in names and notes is shown escaped', () => {
  let browser: Browser;
  let ws: TestWorkspace;
  let fermentId = 0;
  let runId = 0;
  const pages: Array<{ name: string; path: () => string; expect: string[] }> = [];

  beforeAll(async () => {
    browser = await launch();
    ws = await createTestWorkspace('Escaping');
    const m = await ws.client('manager');
    const still = await m.post('/api/stills', {
      name: `Still ${IMG}`,
      kind: 'pot',
      capacityLitres: 2500,
      heatingKw: 60,
      operatingHours: [0, 1, 2, 3, 4, 5, 6].map((weekday) => ({ weekday, open: '00:00', close: '24:00' })),
      cleaningAfterRunMinutes: 0,
      typicalMinutes: { stripping: 240, spirit: 420, redistillation: 360, cleaning: 120, maintenance: 240 },
    });
    expect(still.status, still.text).toBe(201);
    const stillId = (still.json.still ?? still.json).id as number;
    const wt = await m.post('/api/wash-types', { name: 'Grain wash', category: 'grain', terminalMin: 1.002, terminalMax: 1.008, typicalOg: 1.06 });
    const f = await m.post('/api/ferments', {
      code: IMG,
      washTypeId: wt.json.washType.id,
      fermenterId: null,
      volume: 2000,
      pitchedAt: new Date(Date.now() - 2 * DAY).toISOString(),
      og: 1.06,
      notes: `Notes ${SCRIPT} ${IMG}`,
    });
    expect(f.status, f.text).toBe(201);
    fermentId = f.json.ferment.id;
    const r = await m.post(`/api/ferments/${fermentId}/readings`, {
      value: 1.03,
      unit: 'sg',
      method: 'digital',
      takenAt: new Date(Date.now() - DAY).toISOString(),
      note: `Reading ${SCRIPT}`,
    });
    expect(r.status, r.text).toBe(201);
    const startsAt = new Date(Math.ceil((Date.now() + DAY) / 3_600_000) * 3_600_000);
    const run = await m.post('/api/runs', {
      stillId,
      type: 'stripping',
      startsAt: startsAt.toISOString(),
      durationMinutes: 240,
      ferments: [{ fermentId, litres: 1000 }],
      notes: `Run ${SCRIPT} ${IMG}`,
    });
    expect(run.status, run.text).toBe(201);
    runId = run.json.run.id;
    // A member whose name is markup.
    await getDb()
      .update(t.users)
      .set({ name: `Ollie ${IMG}` })
      .where(eq(t.users.id, ws.users.staff.id));

    pages.push(
      { name: 'ferments list', path: () => '/ferments', expect: [IMG] },
      { name: 'ferment page', path: () => `/ferments/${fermentId}`, expect: [IMG, SCRIPT] },
      { name: 'ferment edit', path: () => `/ferments/${fermentId}/edit`, expect: [] },
      { name: 'run page', path: () => `/runs/${runId}`, expect: [IMG, SCRIPT] },
      { name: 'board', path: () => '/', expect: [IMG] },
      { name: 'vessels', path: () => '/vessels', expect: [IMG] },
      { name: 'members', path: () => '/settings/members', expect: [IMG] },
      { name: 'reports', path: () => '/reports', expect: [] },
    );
  }, 120_000);
  afterAll(async () => {
    await browser?.close();
  });

  it('every page shows the markup as text and runs none of it', async () => {
    const tracked = await newPage(browser, DESKTOP);
    const dialogs: string[] = [];
    tracked.page.on('dialog', async (d) => {
      dialogs.push(`${d.type()}: ${d.message()}`);
      await d.dismiss();
    });
    await signInUi(tracked.page, ws.users.manager.email, TEST_PASSWORD);
    const problems: string[] = [];
    for (const p of pages) {
      tracked.errors.length = 0;
      const res = await tracked.page.goto(p.path());
      await tracked.page.waitForLoadState('networkidle');
      if (!res || res.status() >= 400) {
        problems.push(`${p.name}: status ${res?.status()}`);
        continue;
      }
      // No element was made from the payloads.
      const injected = await tracked.page.evaluate(() => ({
        imgs: document.querySelectorAll('img[src="x"]').length,
        scripts: [...document.querySelectorAll('script')].filter((s) => s.textContent?.includes('alert(')).length,
        onerror: document.querySelectorAll('[onerror]').length,
      }));
      if (injected.imgs || injected.scripts || injected.onerror) problems.push(`${p.name}: markup became elements ${JSON.stringify(injected)}`);
      // The characters themselves are on the page (in text or in form fields).
      const text = await tracked.page.evaluate(
        () => document.body.innerText + '\n' + [...document.querySelectorAll('input,textarea')].map((e) => (e as HTMLInputElement).value).join('\n'),
      );
      for (const s of p.expect) if (!text.includes(s)) problems.push(`${p.name}: does not show ${s} literally`);
      if (tracked.errors.length) problems.push(`${p.name}: console errors ${tracked.errors.join(' | ').slice(0, 300)}`);
    }
    expect(problems).toEqual([]);
    expect(dialogs, 'no dialog fired').toEqual([]);
    // The full page checks (Barlow, axe, screenshot) on the page that shows the most payloads.
    await tracked.page.goto(`/runs/${runId}`);
    await checkPage(tracked, 'escaping-run');
    await tracked.context.close();
  }, 120_000);
});
