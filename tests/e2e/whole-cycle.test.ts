/**
 * The whole cycle as a new distillery lives it, in Chromium: sign up → set up → invite and
 * accept → the distiller starts a ferment → readings → the planner books a stripping run → the
 * distiller starts and finishes it → records what came off → the fermenter is free on the board
 * → reports show the actual hours. The distiller's steps run at phone width (390 px), the
 * manager's at 1440 px. Every step goes through the pages a person would use; only the backlog
 * of past readings (days of hydrometer checks) and two vessel rows are sent through the same
 * API the pages call, with the person's own session.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import type { Browser, BrowserContext } from 'playwright-core';
import { and, eq, like } from 'drizzle-orm';
import { launch, newPage, checkPage, openHydrated, signInUi, PHONE, DESKTOP, type Tracked } from '../helpers/browser';
import { BASE } from '../helpers/api';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { linkIn, unique, waitForMail } from '../helpers/mail';

const HOUR = 3_600_000;
const DAY = 24 * HOUR;

/** POST/PATCH as the person signed in to `context` (the pages' own API; the Origin header is what a page sends). */
async function api(context: BrowserContext, method: 'POST' | 'PATCH', path: string, data: unknown) {
  const res = await context.request.fetch(`${BASE()}${path}`, { method, data, headers: { origin: BASE(), 'content-type': 'application/json' } });
  const body = await res.json().catch(() => ({}));
  return { status: res.status(), body: body as Record<string, unknown> };
}

/** Console errors the browser logs for answers the page expects and handles (a 409 asking to confirm). */
function dropExpected(tr: Tracked) {
  tr.errors.splice(0, tr.errors.length, ...tr.errors.filter((e) => !/status of 409/.test(e)));
}

describe('a new distillery walks the whole cycle', () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await launch();
    await getDb().delete(t.signInThrottle).where(like(t.signInThrottle.key, '%'));
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('from sign-up to a recorded stripping run, a free fermenter and actual hours in the reports', async () => {
    const managerEmail = unique('cycle-manager');
    const distillerEmail = unique('cycle-distiller');
    const code = `HB-${Date.now().toString(36).slice(-5).toUpperCase()}`;

    // 1. Sign up on a phone: name, e-mail, the distillery's time zone, units and number format.
    const su = await newPage(browser, PHONE);
    await su.page.goto('/sign-up');
    await su.page.getByLabel('Distillery name').fill('Hollow Brook Distilling');
    await su.page.getByLabel('Your name').fill('Ines Marlowe');
    await su.page.getByLabel('E-mail').fill(managerEmail);
    await su.page.getByLabel('Time zone of the distillery').selectOption('Europe/Dublin');
    await su.page.getByRole('button', { name: 'Send the confirmation link' }).click();
    await expect.poll(() => su.page.getByRole('status').textContent(), { timeout: 15000 }).toContain('Check');
    await su.page.goto(linkIn(await waitForMail(managerEmail, 'Confirm'), '/confirm').path);
    await su.page.getByLabel('Choose a password').fill('hollow brook wash 26');
    await Promise.all([su.page.waitForURL('**/setup'), su.page.getByRole('button', { name: 'Confirm and open the distillery' }).click()]);
    expect(await su.page.getByRole('heading', { name: 'Getting started' }).count()).toBe(1);
    await su.context.close();
    const [ws] = await getDb()
      .select({ id: t.workspaces.id, timeZone: t.workspaces.timeZone })
      .from(t.workspaces)
      .innerJoin(t.memberships, eq(t.memberships.workspaceId, t.workspaces.id))
      .innerJoin(t.users, eq(t.users.id, t.memberships.userId))
      .where(eq(t.users.email, managerEmail));
    expect(ws!.timeZone).toBe('Europe/Dublin');

    // 2. Set up at a desk: a fermenter through the vessels page, a still and the wash type through their API.
    const mgr = await newPage(browser, DESKTOP);
    await signInUi(mgr.page, managerEmail, 'hollow brook wash 26');
    await openHydrated(mgr.page, '/vessels');
    await mgr.page.getByLabel('New fermenter').fill('FV1');
    await mgr.page.getByLabel('Capacity (L)', { exact: true }).fill('2,400');
    // Shown as understood before saving: two thousand four hundred litres, not 2.4.
    await expect.poll(() => mgr.page.getByTestId('fv-new-cap-understood').textContent()).toMatch(/^= 2,?400 L$/);
    await mgr.page.getByRole('button', { name: 'Add fermenter' }).click();
    await expect
      .poll(async () => (await getDb().select().from(t.fermenters).where(eq(t.fermenters.workspaceId, ws!.id))).map((f) => f.capacityLitres))
      .toEqual([2400]);
    // Open all day every day, so the test runs the same at any hour.
    const hours = [0, 1, 2, 3, 4, 5, 6].map((weekday) => ({ weekday, open: '00:00', close: '23:59' }));
    const still = await api(mgr.context, 'POST', '/api/stills', {
      name: 'Wash still',
      kind: 'pot',
      capacityLitres: 2500,
      heatingKw: 60,
      operatingHours: hours,
      cleaningAfterRunMinutes: 30,
      typicalMinutes: { stripping: 240, spirit: 480, redistillation: 420, cleaning: 120, maintenance: 240 },
    });
    expect(still.status, JSON.stringify(still.body)).toBe(201);
    const wash = await api(mgr.context, 'POST', '/api/wash-types', {
      name: 'Malt wash',
      category: 'grain',
      terminalMin: 0.996,
      terminalMax: 1.004,
      typicalOg: 1.058,
    });
    expect(wash.status, JSON.stringify(wash.body)).toBe(201);
    await mgr.page.goto('/setup');
    expect(await mgr.page.getByText(/[3-6] of 6 done/).count()).toBe(1);

    // 3. Invite the distiller, who accepts on a phone.
    await mgr.page.goto('/settings/members');
    await mgr.page.getByLabel('E-mail').fill(distillerEmail);
    await mgr.page.getByLabel('Role', { exact: true }).selectOption('distiller');
    await mgr.page.getByRole('button', { name: 'Send invitation' }).click();
    const invite = linkIn(await waitForMail(distillerEmail, 'Join'), '/invite').path;
    const ds = await newPage(browser, PHONE);
    await ds.page.goto(invite);
    await ds.page.getByLabel('Your name').fill('Tomás Reilly');
    await ds.page.getByLabel('Choose a password').fill('low wines at dawn 4');
    await Promise.all([ds.page.waitForURL((u) => u.pathname === '/'), ds.page.getByRole('button', { name: /^Join / }).click()]);

    // 4. The distiller starts the ferment (pitched six days ago) on the phone.
    const pitched = new Date(Date.now() - 6 * DAY);
    const local = (d: Date) =>
      new Intl.DateTimeFormat('sv-SE', { timeZone: 'Europe/Dublin', dateStyle: 'short', timeStyle: 'short' }).format(d).replace(' ', 'T');
    await openHydrated(ds.page, '/ferments/new');
    await ds.page.getByLabel('Code').fill(code);
    await ds.page.getByLabel('Wash type').selectOption((await ds.page.locator('#washTypeId option', { hasText: 'Malt wash' }).getAttribute('value'))!);
    await ds.page.getByLabel('Fermenter').selectOption((await ds.page.locator('#fermenterId option', { hasText: 'FV1' }).getAttribute('value'))!);
    await ds.page.getByLabel(/^Volume/).fill('2000');
    await ds.page.getByLabel(/^Pitched at/).fill(local(pitched));
    await ds.page.getByLabel('OG (SG)').fill('1.058');
    await checkPage(ds, 'cycle-new-ferment-phone');
    await Promise.all([ds.page.waitForURL(/\/ferments\/\d+$/), ds.page.getByRole('button', { name: 'Start ferment' }).click()]);
    const fermentId = Number(new URL(ds.page.url()).pathname.split('/').pop());

    // 5. Readings: five days of checks (sent as the distiller), then this morning's on the phone.
    const backlog: Array<[number, number]> = [
      [5.5, 1.03],
      [4.5, 1.012],
      [3.6, 1.002],
      [3, 0.999],
      [2, 0.998],
      [1, 0.998],
      [0.3, 0.998],
    ];
    for (const [daysAgo, sg] of backlog) {
      const r = await api(ds.context, 'POST', `/api/ferments/${fermentId}/readings`, {
        value: sg,
        unit: 'sg',
        method: 'digital',
        takenAt: new Date(Date.now() - daysAgo * DAY).toISOString(),
        confirm: true,
      });
      expect(r.status, JSON.stringify(r.body)).toBe(201);
    }
    await openHydrated(ds.page, `/ferments/${fermentId}/log`);
    await ds.page.getByRole('radio', { name: 'Digital sensor' }).check();
    await ds.page.getByLabel('Gravity (SG)').fill('0.998');
    await ds.page.getByRole('button', { name: 'Save reading' }).click();
    await expect
      .poll(
        async () =>
          (
            await getDb()
              .select()
              .from(t.readings)
              .where(and(eq(t.readings.fermentId, fermentId), eq(t.readings.source, 'manual')))
          ).length,
        { timeout: 15000 },
      )
      .toBe(backlog.length + 1);
    dropExpected(ds);

    // 6. The manager books a stripping run from "Washes to book" on the board.
    await openHydrated(mgr.page, '/');
    await mgr.page.getByRole('button', { name: `Book wash ${code} on a still` }).click();
    const dialog = mgr.page.getByRole('dialog');
    await dialog.getByLabel('Run type').selectOption('stripping');
    await dialog
      .getByRole('button', { name: /^Book|^Save/ })
      .first()
      .click();
    await expect.poll(async () => (await getDb().select().from(t.runs).where(eq(t.runs.workspaceId, ws!.id))).length, { timeout: 15000 }).toBe(1);
    const [run] = await getDb().select().from(t.runs).where(eq(t.runs.workspaceId, ws!.id));
    const [line] = await getDb().select().from(t.runFerments).where(eq(t.runFerments.runId, run!.id));
    expect(line?.fermentId).toBe(fermentId);
    expect(line?.litres).toBe(2000);

    // 7. The distiller starts it on the phone: the confirmation says what happens and, booked later than now, asks again in words.
    await openHydrated(ds.page, `/runs/${run!.id}`);
    await ds.page.getByRole('button', { name: /^Start / }).click();
    const confirmStart = ds.page.getByRole('dialog');
    await confirmStart.getByRole('button', { name: /^Start (now|anyway)/ }).click();
    if (
      await confirmStart
        .getByRole('button', { name: 'Start anyway' })
        .isVisible()
        .catch(() => false)
    ) {
      expect(await confirmStart.textContent()).toMatch(/before the booked start|not confirmed stable/);
      await confirmStart.getByRole('button', { name: 'Start anyway' }).click();
    }
    await expect.poll(async () => (await getDb().select().from(t.runs).where(eq(t.runs.id, run!.id)))[0]!.status, { timeout: 15000 }).toBe('running');

    // 8. Finish: seconds after the start it is questioned, then it opens the record form.
    // (The page reloads itself after the start; wait for that, then for its islands.)
    await ds.page.getByRole('button', { name: /^Finish / }).waitFor({ timeout: 15000 });
    await ds.page.waitForFunction(() => document.querySelectorAll('astro-island[ssr]').length === 0);
    await ds.page.getByRole('button', { name: /^Finish / }).click();
    const confirmFinish = ds.page.getByRole('dialog');
    await confirmFinish.getByRole('button', { name: /^Finish now/ }).click();
    await expect.poll(() => confirmFinish.textContent(), { timeout: 15000 }).toMatch(/after it started/);
    await Promise.all([ds.page.waitForURL(`**/runs/${run!.id}/record`), confirmFinish.getByRole('button', { name: 'Finish anyway' }).click()]);
    dropExpected(ds);

    // 9. Record what came off: the low wines.
    await openHydrated(ds.page, `/runs/${run!.id}/record`);
    await ds.page.locator('#low_wines-volume').fill('540');
    await ds.page.locator('#low_wines-reading').fill('28.5');
    await ds.page.locator('#low_wines-temp').fill('18');
    await ds.page.getByRole('button', { name: 'Save record' }).click();
    await expect.poll(async () => (await getDb().select().from(t.runOutcomes).where(eq(t.runOutcomes.runId, run!.id))).length, { timeout: 15000 }).toBe(1);
    await checkPage(ds, 'cycle-record-phone');

    // 10. The fermenter is free: the wash was emptied by this run, and the board's vessel band ends at the finish.
    const [f] = await getDb().select().from(t.ferments).where(eq(t.ferments.id, fermentId));
    const [done] = await getDb().select().from(t.runs).where(eq(t.runs.id, run!.id));
    expect(done!.status).toBe('done');
    expect(f!.emptiedReason).toBe('distilled');
    expect(f!.emptiedByRunId).toBe(run!.id);
    expect(f!.emptiedAt?.getTime()).toBe(done!.finishedAt?.getTime());
    await openHydrated(mgr.page, '/');
    expect(await mgr.page.getByRole('button', { name: `Book wash ${code} on a still` }).count()).toBe(0);
    await checkPage(mgr, 'cycle-board-after');

    // 11. Reports count the run at its actual hours (the minutes it ran), beside the hours it was booked for.
    await mgr.page.goto('/reports');
    const rows = mgr.page.locator('tr', { has: mgr.page.locator('th[scope="row"]', { hasText: 'Wash still' }) });
    let doneActual = 0;
    let doneBooked = 0;
    for (let i = 0; i < (await rows.count()); i++) {
      const cells = rows.nth(i).locator('td');
      if ((await cells.count()) < 7) continue;
      doneActual += Number(await cells.nth(4).textContent());
      doneBooked += Number(await cells.nth(5).textContent());
    }
    expect(doneBooked).toBeGreaterThan(1);
    expect(doneActual).toBeLessThan(0.2);
    await checkPage(mgr, 'cycle-reports');
    await mgr.context.close();
    await ds.context.close();
  }, 240_000);
});
