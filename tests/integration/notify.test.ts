/**
 * Notifications go through the outbox: a moved, cancelled or reassigned run mails its
 * operators and the planners (never the person who made the change), each person's
 * choices are respected, and a stalled wash tells managers and planners once.
 */
import { describe, it, expect, beforeAll } from 'vitest';
import { and, eq, gt } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { createTestWorkspace, type Client, type TestWorkspace } from '../helpers/api';
import { ALL_WEEK, DAY, HOUR, londonWhen } from '../helpers/time';

async function mailSince(workspaceId: number, afterId: number) {
  return getDb()
    .select()
    .from(t.mailOutbox)
    .where(and(eq(t.mailOutbox.workspaceId, workspaceId), gt(t.mailOutbox.id, afterId)));
}
async function lastMailId(): Promise<number> {
  const rows = await getDb().select({ id: t.mailOutbox.id }).from(t.mailOutbox);
  return rows.reduce((m, r) => Math.max(m, r.id), 0);
}

describe('notifications through the outbox', () => {
  let ws: TestWorkspace;
  let planner: Client;
  let distiller: Client;
  let stillA: number;
  let stillB: number;
  const at = (days: number, hour: number) => new Date(Math.floor(Date.now() / DAY) * DAY + days * DAY + hour * HOUR);

  beforeAll(async () => {
    ws = await createTestWorkspace('Notify Distillery');
    const db = getDb();
    const mk = async (name: string) =>
      (
        await db
          .insert(t.stills)
          .values({
            workspaceId: ws.workspaceId,
            name,
            kind: 'pot',
            capacityLitres: 3000,
            heatingKw: 60,
            operatingHours: ALL_WEEK,
            typicalMinutes: {},
          })
          .$returningId()
      )[0]!.id;
    stillA = await mk('Wash Still 1');
    stillB = await mk('Wash Still 2');
    planner = await ws.client('planner');
    distiller = await ws.client('distiller');
  });

  async function book(startsAt: Date, operatorId: number | null, stillId = stillA) {
    const r = await planner.post('/api/runs', { stillId, type: 'stripping', startsAt: startsAt.toISOString(), durationMinutes: 300, operatorId });
    expect(r.status, r.text).toBe(201);
    return r.json.run as { id: number; version: number; startsAt: string };
  }

  it('a moved run mails its operator with the new time and the old one, not the mover', async () => {
    const was = at(3, 7);
    const run = await book(was, ws.users.distiller.id);
    const mark = await lastMailId();
    const to = at(4, 6);
    const r = await planner.patch(`/api/runs/${run.id}`, { version: run.version, stillId: stillB, startsAt: to.toISOString() });
    expect(r.status, r.text).toBe(200);
    const mails = await mailSince(ws.workspaceId, mark);
    const toOperator = mails.filter((m) => m.toAddress === ws.users.distiller.email);
    expect(toOperator).toHaveLength(1);
    const mail = toOperator[0]!;
    expect(mail.kind).toBe('run_moved');
    expect(mail.subject).toBe(`Stripping run on Wash Still 1 moved to Wash Still 2, ${londonWhen(to)} (was ${londonWhen(was)})`);
    expect(mail.textBody).toContain(londonWhen(to));
    expect(mail.htmlBody).toContain('<!doctype html>');
    expect(mail.htmlBody).toContain(londonWhen(to));
    expect(mail.textBody).toContain(`/runs/${run.id}`);
    // Nobody mails themselves; the manager is neither operator nor planner.
    expect(mails.some((m) => m.toAddress === ws.users.planner.email)).toBe(false);
    expect(mails.some((m) => m.toAddress === ws.users.manager.email)).toBe(false);
  });

  it('when a distiller moves a run, the planners hear of it too', async () => {
    const run = await book(at(6, 7), ws.users.staff.id);
    const mark = await lastMailId();
    const to = at(6, 13);
    const r = await distiller.patch(`/api/runs/${run.id}`, { version: run.version, startsAt: to.toISOString() });
    expect(r.status, r.text).toBe(200);
    const mails = await mailSince(ws.workspaceId, mark);
    expect(mails.map((m) => m.toAddress).sort()).toEqual([ws.users.planner.email, ws.users.staff.email].sort());
    for (const m of mails) expect(m.subject).toBe(`Stripping run on Wash Still 1 moved to ${londonWhen(to)} (was ${londonWhen(at(6, 7))})`);
  });

  it("respects a person's choice to stop run-change mail", async () => {
    const off = await distiller.request('PUT', '/api/notifications', { run_changes: false });
    expect(off.status, off.text).toBe(200);
    expect(off.json.prefs.run_changes).toBe(false);
    const run = await book(at(8, 7), ws.users.distiller.id);
    const mark = await lastMailId();
    const r = await planner.patch(`/api/runs/${run.id}`, { version: run.version, startsAt: at(8, 12).toISOString() });
    expect(r.status).toBe(200);
    expect((await mailSince(ws.workspaceId, mark)).some((m) => m.toAddress === ws.users.distiller.email)).toBe(false);
    const mine = await distiller.get('/api/notifications');
    expect(mine.json.prefs).toEqual({ ferment_trouble: false, run_early: false, run_changes: false, digest: false });
    await distiller.request('PUT', '/api/notifications', { run_changes: true });
  });

  it('defaults: stall notices on for managers and planners, run changes on for everyone, digest off', async () => {
    const manager = await ws.client('manager');
    expect((await manager.get('/api/notifications')).json.prefs).toMatchObject({ ferment_trouble: true, run_changes: true, digest: false });
    expect((await planner.get('/api/notifications')).json.prefs).toMatchObject({ ferment_trouble: true, run_early: true, run_changes: true, digest: false });
    const staff = await ws.client('staff');
    const s = (await staff.get('/api/notifications')).json;
    expect(s.prefs).toMatchObject({ ferment_trouble: false, run_changes: true, digest: false });
    // A kind the role cannot receive is not offered and cannot be switched on.
    expect(s.kinds.map((k: { kind: string }) => k.kind)).not.toContain('ferment_trouble');
    expect((await staff.request('PUT', '/api/notifications', { ferment_trouble: true })).json.prefs.ferment_trouble).toBe(false);
    expect((await staff.request('PUT', '/api/notifications', { nonsense: true })).status).toBe(400);
  });

  it('a cancelled run and a change of operator mail the old and the new operator', async () => {
    const run = await book(at(10, 7), ws.users.distiller.id);
    let mark = await lastMailId();
    const r = await planner.patch(`/api/runs/${run.id}`, { version: run.version, operatorId: ws.users.staff.id });
    expect(r.status, r.text).toBe(200);
    let mails = await mailSince(ws.workspaceId, mark);
    const when = londonWhen(at(10, 7));
    expect(mails.find((m) => m.toAddress === ws.users.staff.email)?.subject).toBe(`You are operating the stripping run on Wash Still 1, ${when}`);
    expect(mails.find((m) => m.toAddress === ws.users.distiller.email)?.subject).toBe(`You are no longer operating the stripping run on Wash Still 1, ${when}`);
    mark = await lastMailId();
    const c = await planner.post(`/api/runs/${run.id}/cancel`, { version: r.json.run.version });
    expect(c.status, c.text).toBe(200);
    mails = await mailSince(ws.workspaceId, mark);
    expect(mails.map((m) => m.toAddress)).toEqual([ws.users.staff.email]);
    expect(mails[0]!.subject).toBe(`Stripping run on Wash Still 1, ${when}, was cancelled`);
    expect(mails[0]!.kind).toBe('run_cancelled');
  });

  it('a wash that stalls tells the managers and planners once, naming the run it endangers', async () => {
    const db = getDb();
    // Common practice: a grain wash that holds at 1.022 for days is stuck, not finished (its range is 1.002–1.008).
    const [wt] = await db
      .insert(t.washTypes)
      .values({ workspaceId: ws.workspaceId, name: 'Grain', category: 'grain', terminalMin: 1.002, terminalMax: 1.008 })
      .$returningId();
    const now = Date.now();
    const [f] = await db
      .insert(t.ferments)
      .values({ workspaceId: ws.workspaceId, code: 'G-7', washTypeId: wt!.id, volumeLitres: 2000, pitchedAt: new Date(now - 10 * DAY), og: 1.065 })
      .$returningId();
    await db.insert(t.readings).values(
      [
        [9.5, 1.055],
        [8.5, 1.04],
        [7.5, 1.03],
        [6.5, 1.024],
      ].map(([d, sg]) => ({
        workspaceId: ws.workspaceId,
        fermentId: f!.id,
        takenAt: new Date(now - d! * DAY),
        method: 'hydrometer' as const,
        rawValue: sg!,
        rawUnit: 'sg' as const,
        sampleTempC: 20,
        sampleTempUnit: 'C' as const,
        correctedSg: sg!,
      })),
    );
    const r = await planner.post('/api/runs', {
      stillId: stillB,
      type: 'stripping',
      startsAt: at(12, 7).toISOString(),
      durationMinutes: 300,
      ferments: [{ fermentId: f!.id, litres: 2000 }],
    });
    expect(r.status, r.text).toBe(201);
    const mark = await lastMailId();
    for (const d of [4, 3, 2, 1, 0.1]) {
      // A stall leaves the curve, so the first reading of it is questioned; the distiller confirms it.
      const res = await distiller.post(`/api/ferments/${f!.id}/readings`, {
        value: 1.022,
        unit: 'sg',
        method: 'hydrometer',
        sampleTemp: 20,
        takenAt: new Date(now - d * DAY).toISOString(),
        confirm: true,
      });
      expect(res.status, res.text).toBe(201);
    }
    const forecast = await distiller.get(`/api/ferments/${f!.id}/forecast`);
    expect(forecast.json?.forecast?.status ?? forecast.json?.status).toBe('stalled');
    const mails = (await mailSince(ws.workspaceId, mark)).filter((m) => m.kind === 'ferment_stalled');
    expect(mails.map((m) => m.toAddress).sort()).toEqual([ws.users.manager.email, ws.users.planner.email].sort());
    expect(mails[0]!.subject).toBe('Wash G-7 has stalled');
    expect(mails[0]!.textBody).toContain(`Stripping run on Wash Still 2, ${londonWhen(at(12, 7))}`);
  });

  it("a run moved before its wash's predicted ready time tells the planners", async () => {
    const db = getDb();
    const [wt] = await db
      .insert(t.washTypes)
      .values({ workspaceId: ws.workspaceId, name: 'Sugar', category: 'sugar', terminalMin: 0.99, terminalMax: 1.0 })
      .$returningId();
    const now = Date.now();
    const [f] = await db
      .insert(t.ferments)
      .values({ workspaceId: ws.workspaceId, code: 'S-3', washTypeId: wt!.id, volumeLitres: 1500, pitchedAt: new Date(now - 2 * DAY), og: 1.08 })
      .$returningId();
    await db.insert(t.readings).values(
      [
        [1.8, 1.076],
        [1.3, 1.068],
        [0.8, 1.058],
        [0.3, 1.049],
      ].map(([d, sg]) => ({
        workspaceId: ws.workspaceId,
        fermentId: f!.id,
        takenAt: new Date(now - d! * DAY),
        method: 'hydrometer' as const,
        rawValue: sg!,
        rawUnit: 'sg' as const,
        sampleTempC: 20,
        sampleTempUnit: 'C' as const,
        correctedSg: sg!,
      })),
    );
    const fc = (await planner.get(`/api/ferments/${f!.id}/forecast`)).json.forecast;
    expect(['active', 'lag', 'slowing']).toContain(fc.status);
    const readyAt = new Date(fc.readyAt);
    expect(readyAt.getTime()).toBeGreaterThan(now);
    const late = new Date(Math.max(new Date(fc.readyP90 ?? fc.readyAt).getTime(), readyAt.getTime()) + 2 * DAY);
    const booked = await planner.post('/api/runs', {
      stillId: stillA,
      type: 'stripping',
      startsAt: new Date(Math.ceil(late.getTime() / HOUR) * HOUR).toISOString(),
      durationMinutes: 300,
      ferments: [{ fermentId: f!.id, litres: 1500 }],
    });
    expect(booked.status, booked.text).toBe(201);
    const mark = await lastMailId();
    const early = new Date(Math.ceil((now + 3 * HOUR) / HOUR) * HOUR);
    expect(early.getTime()).toBeLessThan(readyAt.getTime());
    const moved = await distiller.patch(`/api/runs/${booked.json.run.id}`, { version: booked.json.run.version, startsAt: early.toISOString() });
    expect(moved.status, moved.text).toBe(200);
    const mails = (await mailSince(ws.workspaceId, mark)).filter((m) => m.kind === 'run_early');
    expect(mails.map((m) => m.toAddress)).toEqual([ws.users.planner.email]);
    expect(mails[0]!.subject).toBe(`Stripping run on Wash Still 1, ${londonWhen(early)}, booked before its wash is likely ready`);
    expect(mails[0]!.textBody).toMatch(/Wash S-3 (will very likely still be fermenting then|is less than 80 % likely to be confirmed stable by then)/);
    expect(mails[0]!.textBody).not.toMatch(/wash late/i);
  });
});
