/**
 * The fermenter is freed by the run that empties it: a stripping run reaching the distillery's
 * moment (finish by default, or start) marks the washes it took whole as emptied by it; a wash
 * split over several runs is emptied by the run that takes the last of it, and until then the
 * run's pages ask "Is FV… empty?". Marking emptied by hand (dumped with a note) works as JSON and
 * as a plain form post, never as a GET.
 */
import { describe, it, expect, beforeAll } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import type { Client } from '../helpers/api';
import { addFerment, at, boardFixture, iso, type BoardFixture } from '../helpers/board-fixture';
import { systemCtx } from '../../src/server/context';
import { workspaceSettings } from '../../src/server/workspaces';
import { getForecast } from '../../src/server/forecasts';
import { retimeReleasesForRun } from '../../src/server/fermenter-release';
import { hydrateFerment, hydrateRun, vesselBars } from '../../src/lib/board';

const DAY = 86_400_000;
const form = (fields: Record<string, string>) => new URLSearchParams(fields).toString();
const FORM = { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' };

async function fermentRow(id: number) {
  const [row] = await getDb().select().from(t.ferments).where(eq(t.ferments.id, id));
  return row!;
}

async function runRow(id: number) {
  const [row] = await getDb().select().from(t.runs).where(eq(t.runs.id, id));
  return row!;
}

/** Book a run (as the planner) and answer its id. */
async function book(
  planner: Client,
  body: {
    stillId: number;
    type: string;
    day: number;
    ferments?: Array<{ fermentId: number; litres: number }>;
    feeds?: Array<{ runId: number; litres: number }>;
  },
): Promise<number> {
  const r = await planner.post('/api/runs', {
    stillId: body.stillId,
    type: body.type,
    startsAt: iso(at(body.day, 6)),
    endsAt: iso(at(body.day, 10)),
    ...(body.ferments ? { ferments: body.ferments } : {}),
    ...(body.feeds ? { feeds: body.feeds } : {}),
  });
  expect(r.status, r.text).toBe(201);
  return r.json.run.id;
}

/** Start or finish a run from the floor, accepting the questions asked (early start, unconfirmed wash, a quick finish). */
async function operate(distiller: Client, runId: number, kind: 'start' | 'finish') {
  const current = await distiller.get(`/api/runs/${runId}`);
  expect(current.status, current.text).toBe(200);
  const r = await distiller.post(`/api/runs/${runId}/${kind}`, { version: current.json.run.version, confirm: true });
  expect(r.status, r.text).toBe(200);
  return r.json.run;
}

describe('fermenters freed by the run that empties them', () => {
  let fx: BoardFixture;
  let planner: Client;
  let distiller: Client;
  let staff: Client;
  let day = 1;
  /** A fresh fermenter for each wash, so one test's wash never blocks another's. */
  const fermenter = async (name: string) => {
    const [r] = await getDb().insert(t.fermenters).values({ workspaceId: fx.workspaceId, name, capacityLitres: 3000, position: 10 }).$returningId();
    fx.fermenterIds.push(r!.id);
    return fx.fermenterIds.length - 1;
  };
  beforeAll(async () => {
    fx = await boardFixture('Release Distillery');
    planner = await fx.client('planner');
    distiller = await fx.client('distiller');
    staff = await fx.client('staff');
  });

  it('a stripping run charging the whole wash empties it when it finishes, with the run as the reason, and the board frees the fermenter there', async () => {
    const f = await addFerment(fx, { code: 'W-1', fermenter: await fermenter('FV-W1'), pitchedDaysAgo: 8 });
    const run = await book(planner, { stillId: fx.stills.ws2, type: 'stripping', day: day++, ferments: [{ fermentId: f, litres: 2400 }] });
    await operate(distiller, run, 'start');
    expect((await fermentRow(f)).emptiedAt).toBeNull(); // the product default frees at the finish
    await operate(distiller, run, 'finish');
    const after = await fermentRow(f);
    const r = await runRow(run);
    expect(after.emptiedAt?.getTime()).toBe(r.finishedAt!.getTime());
    expect(after.emptiedReason).toBe('distilled');
    expect(after.emptiedByRunId).toBe(run);
    const [entry] = await getDb()
      .select()
      .from(t.auditLog)
      .where(and(eq(t.auditLog.workspaceId, fx.workspaceId), eq(t.auditLog.action, 'ferment.empty'), eq(t.auditLog.entityId, String(f))));
    expect(entry?.details).toMatchObject({ reason: 'distilled', runId: run, moment: 'finish', chargedLitres: 2400 });

    // The board says so: the ferment carries its emptying and its occupancy bar ends there.
    const board = await staff.get(`/api/board?from=${encodeURIComponent(iso(at(-2)))}&to=${encodeURIComponent(iso(at(12)))}`, { 'cache-control': 'no-cache' });
    expect(board.status, board.text).toBe(200);
    const bf = board.json.ferments.find((x: { id: number }) => x.id === f);
    expect(bf.emptiedAt).toBe(after.emptiedAt!.toISOString());
    const bars = vesselBars(board.json.fermenters, board.json.ferments.map(hydrateFerment), board.json.runs.map(hydrateRun));
    const bar = [...bars.values()].flat().find((b) => b.fermentId === f)!;
    expect(bar.freedBy).toBe('emptied');
    expect(bar.freeAt?.toISOString()).toBe(after.emptiedAt!.toISOString());

    // The ferment page names the run that emptied it and offers no "Mark emptied" any more.
    const page = await distiller.get(`/ferments/${f}`);
    expect(page.text).toContain(`/runs/${run}`);
    expect(page.text).not.toContain('data-testid="empty-form"');
  });

  it('takes a wash as whole when what is left is within the heel (1 % or 5 L, common practice)', async () => {
    const f = await addFerment(fx, { code: 'W-HEEL', fermenter: await fermenter('FV-H'), pitchedDaysAgo: 8, volume: 2400 });
    const run = await book(planner, { stillId: fx.stills.ws2, type: 'stripping', day: day++, ferments: [{ fermentId: f, litres: 2380 }] });
    await operate(distiller, run, 'start');
    await operate(distiller, run, 'finish');
    expect((await fermentRow(f)).emptiedByRunId).toBe(run); // 20 L left of 2400 L is under 1 % (24 L)
  });

  it('stops the forecast of an emptied ferment: no more forecast work, however late it is asked', async () => {
    const ctx = systemCtx((await workspaceSettings(fx.workspaceId))!);
    const f = await addFerment(fx, { code: 'W-FC', fermenter: await fermenter('FV-FC'), pitchedDaysAgo: 8 });
    const open = await addFerment(fx, { code: 'W-OPEN', fermenter: await fermenter('FV-OPEN'), pitchedDaysAgo: 8 });
    const run = await book(planner, { stillId: fx.stills.ws2, type: 'stripping', day: day++, ferments: [{ fermentId: f, litres: 2400 }] });
    await operate(distiller, run, 'start');
    await operate(distiller, run, 'finish');
    const computedAt = async (id: number) =>
      (
        await getDb()
          .select({ c: t.fermentForecasts.computedAt, k: t.fermentForecasts.inputKey })
          .from(t.fermentForecasts)
          .where(eq(t.fermentForecasts.fermentId, id))
      )[0];
    await getForecast(ctx, f);
    await getForecast(ctx, open);
    const frozen = await computedAt(f);
    const moving = await computedAt(open);
    const later = new Date(Date.now() + 5 * DAY);
    await getForecast(ctx, f, later);
    await getForecast(ctx, open, later);
    expect(await computedAt(f)).toEqual(frozen); // the emptied wash is frozen at its emptying
    expect((await computedAt(open))!.c.getTime()).not.toBe(moving!.c.getTime()); // an open one is recomputed as time passes
    // Readings stop too.
    expect((await distiller.post(`/api/ferments/${f}/readings`, { value: 1.004, unit: 'sg', method: 'hydrometer' })).status).toBe(409);
  });

  it('frees at the start when the distillery says so', async () => {
    const other = await boardFixture('Release at start');
    await getDb().update(t.workspaces).set({ releaseFermentersOn: 'start' }).where(eq(t.workspaces.id, other.workspaceId));
    const p = await other.client('planner');
    const d = await other.client('distiller');
    const f = await addFerment(other, { code: 'S-1', fermenter: 0, pitchedDaysAgo: 8 });
    const run = await book(p, { stillId: other.stills.ws2, type: 'stripping', day: 1, ferments: [{ fermentId: f, litres: 2400 }] });
    await operate(d, run, 'start');
    const row = await fermentRow(f);
    expect(row.emptiedAt?.getTime()).toBe((await runRow(run)).startedAt!.getTime());
    expect(row.emptiedByRunId).toBe(run);
    await operate(d, run, 'finish');
    expect((await fermentRow(f)).emptiedAt?.getTime()).toBe(row.emptiedAt!.getTime()); // the finish changes nothing

    // A correction of the run's actual start moves the emptying with it.
    const ctx = systemCtx((await workspaceSettings(other.workspaceId))!);
    const corrected = new Date(row.emptiedAt!.getTime() - 30 * 60_000);
    await getDb().transaction(async (tx) => {
      await tx.update(t.runs).set({ startedAt: corrected }).where(eq(t.runs.id, run));
      expect(await retimeReleasesForRun(tx, ctx, { id: run, status: 'done', startedAt: corrected, finishedAt: new Date() })).toBe(1);
    });
    expect((await fermentRow(f)).emptiedAt?.getTime()).toBe(corrected.getTime());
  });

  it('empties a wash split over two runs only when the second finishes, and asks "Is FV… empty?" after the first', async () => {
    const fv = await fermenter('FV-SPLIT');
    const f = await addFerment(fx, { code: 'W-SPLIT', fermenter: fv, pitchedDaysAgo: 8, volume: 2400 });
    const first = await book(planner, { stillId: fx.stills.ws2, type: 'stripping', day: day++, ferments: [{ fermentId: f, litres: 1200 }] });
    const second = await book(planner, { stillId: fx.stills.ws2, type: 'stripping', day: day++, ferments: [{ fermentId: f, litres: 1200 }] });
    await operate(distiller, first, 'start');
    await operate(distiller, first, 'finish');
    expect((await fermentRow(f)).emptiedAt).toBeNull();
    const record = await distiller.get(`/runs/${first}/record`);
    expect(record.status).toBe(200);
    expect(record.text).toContain('Is FV-SPLIT empty?');
    expect(record.text).toMatch(/FV-SPLIT still holds about 1,200 L of wash <a[^>]*>W-SPLIT<\/a>\s+by\s+the\s+charges\s+booked/);
    expect(record.text).toContain('Yes, FV-SPLIT is empty');
    expect(record.text).toContain('No, some is left');
    // The run page asks too; staff, who may not mark it emptied, are not asked.
    expect((await distiller.get(`/runs/${first}`)).text).toContain('Is FV-SPLIT empty?');
    expect((await staff.get(`/runs/${first}`)).text).not.toContain('Is FV-SPLIT empty?');
    // "No, some is left" puts the question away for now.
    expect((await distiller.get(`/runs/${first}/record?kept=${f}`)).text).not.toContain('Is FV-SPLIT empty?');

    await operate(distiller, second, 'start');
    await operate(distiller, second, 'finish');
    const row = await fermentRow(f);
    expect(row.emptiedByRunId).toBe(second);
    expect(row.emptiedAt?.getTime()).toBe((await runRow(second)).finishedAt!.getTime());
    expect((await distiller.get(`/runs/${first}/record`)).text).not.toContain('Is FV-SPLIT empty?');
  });

  it('asks in US units for a US distillery (1 US gal = 3.785411784 L, exact)', async () => {
    const us = await boardFixture('Release US');
    await getDb().update(t.workspaces).set({ units: 'us' }).where(eq(t.workspaces.id, us.workspaceId));
    const f = await addFerment(us, { code: 'US-1', fermenter: 2, pitchedDaysAgo: 8, volume: 2400 });
    const d = await us.client('distiller');
    const run = await book(await us.client('planner'), { stillId: us.stills.ws2, type: 'stripping', day: 1, ferments: [{ fermentId: f, litres: 1200 }] });
    await operate(d, run, 'start');
    await operate(d, run, 'finish');
    // 1200 L left = 317.006 US gal.
    expect((await d.get(`/runs/${run}`)).text).toMatch(/FV3 still holds about 317 gal of wash/);
  });

  it('answering "Yes, FV… is empty" as a plain form marks it emptied by that run and goes back to the page', async () => {
    const f = await addFerment(fx, { code: 'W-YES', fermenter: await fermenter('FV-YES'), pitchedDaysAgo: 8, volume: 2400 });
    const run = await book(planner, { stillId: fx.stills.ws2, type: 'stripping', day: day++, ferments: [{ fermentId: f, litres: 1500 }] });
    await operate(distiller, run, 'start');
    await operate(distiller, run, 'finish');
    const page = await distiller.get(`/runs/${run}/record`);
    expect(page.text).toContain('about 900 L of wash');
    // Exactly what the page's form posts (its hidden fields), as a browser without JavaScript sends it.
    const fields = Object.fromEntries(
      [...page.text.matchAll(/<input type="hidden" name="(\w+)" value="([^"]*)"/g)].map((m) => [m[1]!, m[2]!.replace(/&#x2F;|&#47;/g, '/')]),
    );
    expect(fields).toMatchObject({ reason: 'distilled', runId: String(run), confirm: 'yes', back: `/runs/${run}/record` });
    const yes = await distiller.post(`/api/ferments/${f}/empty`, form(fields), FORM);
    expect(yes.status).toBe(303);
    expect(yes.headers.get('location')).toBe(`/runs/${run}/record?emptied=${f}`);
    const row = await fermentRow(f);
    expect(row.emptiedByRunId).toBe(run);
    expect(row.emptiedReason).toBe('distilled');
    expect(row.emptiedAt?.getTime()).toBe((await runRow(run)).finishedAt!.getTime());
    const back = await distiller.get(`/runs/${run}/record?emptied=${f}`);
    expect(back.text).not.toContain('Is FV-YES empty?');
    expect(back.text).toContain('Marked emptied');
  });

  it('refuses a run that did not take the wash, and a run of another distillery, naming the field', async () => {
    const f = await addFerment(fx, { code: 'W-RUNID', fermenter: await fermenter('FV-R'), pitchedDaysAgo: 8 });
    const elsewhere = await boardFixture('Release elsewhere');
    const theirF = await addFerment(elsewhere, { code: 'E-1', fermenter: 0, pitchedDaysAgo: 8 });
    const theirs = await book(await elsewhere.client('planner'), {
      stillId: elsewhere.stills.ws2,
      type: 'stripping',
      day: 1,
      ferments: [{ fermentId: theirF, litres: 2400 }],
    });
    const bad = await distiller.post(`/api/ferments/${f}/empty`, { reason: 'distilled', runId: theirs });
    expect(bad.status).toBe(400);
    expect(bad.json.error.fields.runId).toMatch(/not a stripping run that took wash from W-RUNID/);
    const notANumber = await distiller.post(`/api/ferments/${f}/empty`, { reason: 'distilled', runId: 'twelve' });
    expect(notANumber.status).toBe(400);
    expect(notANumber.json.error.fields.runId).toBeTruthy();
    expect((await fermentRow(f)).emptiedAt).toBeNull();
  });

  it('spirit and redistillation runs release nothing', async () => {
    const fStrip = await addFerment(fx, { code: 'W-FEED', fermenter: await fermenter('FV-FEED'), pitchedDaysAgo: 8, volume: 2400 });
    const fRedist = await addFerment(fx, { code: 'W-REDIST', fermenter: await fermenter('FV-RD'), pitchedDaysAgo: 8, volume: 2400 });
    const strip = await book(planner, { stillId: fx.stills.ws2, type: 'stripping', day: day++, ferments: [{ fermentId: fStrip, litres: 1000 }] });
    const spirit = await book(planner, { stillId: fx.stills.small, type: 'spirit', day: day++, feeds: [{ runId: strip, litres: 250 }] });
    const redist = await book(planner, { stillId: fx.stills.ws1, type: 'redistillation', day: day++, ferments: [{ fermentId: fRedist, litres: 2400 }] });
    await operate(distiller, strip, 'start');
    await operate(distiller, strip, 'finish');
    await operate(distiller, spirit, 'start');
    await operate(distiller, spirit, 'finish');
    await operate(distiller, redist, 'start');
    await operate(distiller, redist, 'finish');
    expect((await fermentRow(fStrip)).emptiedAt).toBeNull(); // 1400 L left after the stripping run: asked, not assumed
    expect((await fermentRow(fRedist)).emptiedAt).toBeNull();
    expect((await distiller.get(`/runs/${spirit}/record`)).text).not.toContain('empty?');
    expect((await distiller.get(`/runs/${redist}/record`)).text).not.toContain('empty?');
  });

  it('answers 404 for another distillery’s ferment and changes nothing', async () => {
    const f = await addFerment(fx, { code: 'W-MINE', fermenter: await fermenter('FV-MINE'), pitchedDaysAgo: 8 });
    const stranger = await (await boardFixture('Stranger distillery')).client('distiller');
    expect((await stranger.post(`/api/ferments/${f}/empty`, { reason: 'dumped', note: 'not yours' })).status).toBe(404);
    expect((await stranger.post(`/api/ferments/${f}/empty`, form({ reason: 'dumped', note: 'x', confirm: 'yes' }), FORM)).status).toBe(404);
    expect((await fermentRow(f)).emptiedAt).toBeNull();
  });

  it('marks a dumped wash emptied by hand with a note saying why, as JSON and as a plain form', async () => {
    const f = await addFerment(fx, { code: 'W-DUMP', fermenter: await fermenter('FV-DUMP'), pitchedDaysAgo: 8 });
    const noNote = await distiller.post(`/api/ferments/${f}/empty`, { reason: 'dumped' });
    expect(noNote.status).toBe(400);
    expect(noNote.json.error.fields.note).toMatch(/^Why was it dumped\?/);
    const tooLong = await distiller.post(`/api/ferments/${f}/empty`, { reason: 'dumped', note: 'x'.repeat(201) });
    expect(tooLong.status).toBe(400);
    expect(tooLong.json.error.fields.note).toMatch(/200 characters/);
    const ok = await distiller.post(`/api/ferments/${f}/empty`, { reason: 'dumped', note: 'Soured: pH 3.1 and a vinegar smell.' });
    expect(ok.status, ok.text).toBe(200);
    const row = await fermentRow(f);
    expect(row).toMatchObject({ emptiedReason: 'dumped', emptiedNote: 'Soured: pH 3.1 and a vinegar smell.', emptiedByRunId: null });
    expect((await distiller.get(`/ferments/${f}`)).text).toContain('Note: Soured: pH 3.1 and a vinegar smell.');

    // Without JavaScript: the form posts, the server answers 303 back to the ferment page with a message.
    const g = await addFerment(fx, { code: 'W-DUMP2', fermenter: await fermenter('FV-DUMP2'), pitchedDaysAgo: 8 });
    const missing = await distiller.post(`/api/ferments/${g}/empty`, form({ reason: 'dumped', note: '', confirm: 'yes', back: `/ferments/${g}` }), FORM);
    expect(missing.status).toBe(303);
    expect(missing.headers.get('location')).toBe(`/ferments/${g}?emptyError=note&ferment=${g}#empty-${g}`);
    expect((await distiller.get(`/ferments/${g}?emptyError=note&ferment=${g}`)).text).toContain('Why was it dumped?');
    const unconfirmed = await distiller.post(`/api/ferments/${g}/empty`, form({ reason: 'dumped', note: 'Infected' }), FORM);
    expect(unconfirmed.headers.get('location')).toContain('emptyError=confirm');
    const offsite = await distiller.post(`/api/ferments/${g}/empty`, form({ reason: 'dumped', note: 'x', back: 'https://example.com/' }), FORM);
    expect(offsite.headers.get('location')).toMatch(new RegExp(`^/ferments/${g}\\?`)); // never sent elsewhere
    expect((await fermentRow(g)).emptiedAt).toBeNull();
    const done = await distiller.post(`/api/ferments/${g}/empty`, form({ reason: 'dumped', note: 'Infected', confirm: 'yes', back: `/ferments/${g}` }), FORM);
    expect(done.status).toBe(303);
    expect(done.headers.get('location')).toBe(`/ferments/${g}?emptied=${g}`);
    expect(await fermentRow(g)).toMatchObject({ emptiedReason: 'dumped', emptiedNote: 'Infected' });
    expect((await distiller.get(`/ferments/${g}?emptied=${g}`)).text).toContain('Marked emptied');
  });

  it('never empties on a GET: the old ?reason=on submit did nothing, and the form now posts to the API', async () => {
    const f = await addFerment(fx, { code: 'W-GET', fermenter: await fermenter('FV-GET'), pitchedDaysAgo: 8 });
    // The old form had no method or action and its radios no value: a submit before the island ran was
    // a GET of the page itself with ?reason=on. It must change nothing, as must a GET of the API route.
    expect((await planner.get(`/ferments/${f}/edit?reason=on`)).status).toBe(200);
    expect((await planner.get(`/ferments/${f}?reason=on`)).status).toBe(200);
    const apiGet = await planner.get(`/api/ferments/${f}/empty?reason=distilled`);
    expect([404, 405]).toContain(apiGet.status);
    expect((await fermentRow(f)).emptiedAt).toBeNull();
    // The form as the server sends it (before any JavaScript runs) posts to the API with real values.
    for (const path of [`/ferments/${f}`, `/ferments/${f}/edit`]) {
      const html = (await planner.get(path)).text;
      const tag = html.match(/<form[^>]*data-testid="empty-form"[^>]*>/)?.[0] ?? '';
      expect(tag, path).toContain('method="post"');
      expect(tag, path).toContain(`action="/api/ferments/${f}/empty"`);
      const radios = [...html.matchAll(/<input[^>]*type="radio"[^>]*name="reason"[^>]*>/g)].map((m) => m[0].match(/value="(\w+)"/)?.[1]);
      expect(radios, path).toEqual(['distilled', 'dumped']);
      const confirm = html.match(/<input[^>]*type="checkbox"[^>]*name="confirm"[^>]*>/)?.[0] ?? '';
      expect(confirm, path).toContain('value="yes"');
      expect(confirm, path).toContain('required');
    }
  });

  it('lets distillers start a ferment and mark one emptied; staff get 403 and the "not for your role" page', async () => {
    const fv = fx.fermenterIds[await fermenter('FV-NEW')]!;
    const body = { code: 'D-1', washTypeId: fx.washTypeId, fermenterId: fv, volume: 2000, pitchedAt: '2025-04-01T08:00', og: 1.058 };
    expect((await staff.post('/api/ferments', body)).status).toBe(403);
    const created = await distiller.post('/api/ferments', body);
    expect(created.status, created.text).toBe(201);
    const page = await distiller.get('/ferments/new');
    expect(page.status).toBe(200);
    expect(page.text).toContain('New ferment');
    const refused = await staff.get('/ferments/new');
    expect(refused.status).toBe(403);
    expect(refused.text).toContain('data-testid="not-for-your-role"');
    expect(refused.text).toContain('Starting ferments is for managers, planners and distillers');
    expect((await staff.post(`/api/ferments/${created.json.ferment.id}/empty`, { reason: 'distilled' })).status).toBe(403);
    const emptied = await distiller.post(`/api/ferments/${created.json.ferment.id}/empty`, { reason: 'distilled' });
    expect(emptied.status, emptied.text).toBe(200);
    expect(emptied.json.ferment.emptiedReason).toBe('distilled');
    // The ferments list offers "New ferment" to a distiller, not to staff.
    expect((await distiller.get('/ferments')).text).toContain('href="/ferments/new"');
    expect((await staff.get('/ferments')).text).not.toContain('href="/ferments/new"');
  });
});
