/**
 * Calendar feeds and notifications in Chromium: create a feed in settings, fetch its
 * address and see the runs; a moved run's e-mail reaches the (fake) mailbox with the new
 * time; the notification choices page works.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import type { Browser } from 'playwright-core';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { readMailbox } from '../../src/server/mail/fake-smtp';
import { launch, newPage, checkPage, signInUi, PHONE, DESKTOP } from '../helpers/browser';
import { createTestWorkspace, TEST_PASSWORD, type TestWorkspace } from '../helpers/api';
import { ALL_WEEK, DAY, HOUR, londonWhen } from '../helpers/time';

describe('calendar feeds and notification mail in Chromium', () => {
  let browser: Browser;
  let ws: TestWorkspace;
  let run: { id: number; version: number; startsAt: string };

  beforeAll(async () => {
    browser = await launch();
    ws = await createTestWorkspace('Feed E2E Distillery');
    const db = getDb();
    const [s] = await db
      .insert(t.stills)
      .values({
        workspaceId: ws.workspaceId,
        name: 'Wash Still 1',
        kind: 'pot',
        capacityLitres: 3000,
        heatingKw: 60,
        operatingHours: ALL_WEEK,
        typicalMinutes: {},
      })
      .$returningId();
    const planner = await ws.client('planner');
    const startsAt = new Date(Math.floor(Date.now() / DAY) * DAY + 2 * DAY + 7 * HOUR);
    const r = await planner.post('/api/runs', {
      stillId: s!.id,
      type: 'stripping',
      startsAt: startsAt.toISOString(),
      durationMinutes: 300,
      operatorId: ws.users.distiller.id,
    });
    expect(r.status, r.text).toBe(201);
    run = r.json.run;
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('creates a feed in settings, shows its address once, and the address serves the runs', async () => {
    const p = await newPage(browser, DESKTOP);
    await signInUi(p.page, ws.users.staff.email, TEST_PASSWORD);
    await p.page.goto('/settings/feeds');
    await checkPage(p, 'feeds-empty');
    await p.page.getByLabel('Name (optional)').fill('Bottling room tablet');
    await p.page.getByRole('button', { name: 'Create feed' }).click();
    const field = p.page.getByTestId('feed-url');
    await field.waitFor();
    const url = await field.inputValue();
    expect(url).toMatch(/\/api\/feeds\/[A-Za-z0-9_-]{43}\.ics$/);
    expect(await p.page.getByRole('link', { name: 'Open in my calendar app' }).getAttribute('href')).toBe(url.replace(/^https?:\/\//, 'webcal://'));
    expect(await p.page.getByTestId('feeds-table').textContent()).toContain('Bottling room tablet');
    await checkPage(p, 'feeds-created');

    const res = await fetch(url);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('text/calendar; charset=utf-8');
    const text = await res.text();
    expect(text).toContain(`UID:run-${ws.workspaceId}-${run.id}@`);
    expect(text.replace(/\r\n[ \t]/g, '')).toContain('SUMMARY:Stripping run · Wash Still 1');

    // After a reload the address is gone for good: only name, scope and dates are listed.
    await p.page.reload();
    expect(await p.page.getByTestId('feed-url').count()).toBe(0);
    expect(await p.page.content()).not.toContain(url.split('/').pop()!.replace('.ics', ''));
    await p.context.close();
  });

  it('lets a person choose their e-mails on a phone', async () => {
    const p = await newPage(browser, PHONE);
    await signInUi(p.page, ws.users.distiller.email, TEST_PASSWORD);
    await p.page.goto('/settings/notifications');
    const digest = p.page.getByLabel('Daily digest');
    expect(await digest.isChecked()).toBe(false);
    expect(await p.page.getByLabel('My runs change').isChecked()).toBe(true);
    await digest.check();
    await expect.poll(() => p.page.getByRole('status').textContent()).toContain('Saved: Daily digest — on');
    await checkPage(p, 'notifications-phone');
    await p.page.reload();
    expect(await p.page.getByLabel('Daily digest').isChecked()).toBe(true);
    await p.context.close();
  });

  it("a moved run's e-mail arrives in the mailbox with the new time", async () => {
    const planner = await ws.client('planner');
    const to = new Date(new Date(run.startsAt).getTime() + 23 * HOUR);
    const r = await planner.patch(`/api/runs/${run.id}`, { version: run.version, startsAt: to.toISOString() });
    expect(r.status, r.text).toBe(200);
    const dir = process.env.MAILBOX_DIR ?? '.data/test-mailbox';
    const subject = `Stripping run on Wash Still 1 moved to ${londonWhen(to)} (was ${londonWhen(new Date(run.startsAt))})`;
    await expect
      .poll(() => readMailbox(dir).find((m) => m.to.includes(ws.users.distiller.email) && m.subject === subject), { timeout: 30_000, interval: 500 })
      .toBeTruthy();
    const mail = readMailbox(dir).find((m) => m.to.includes(ws.users.distiller.email) && m.subject === subject)!;
    expect(mail.text).toContain(londonWhen(to));
    expect(mail.html).toContain(londonWhen(to));
  });
});
