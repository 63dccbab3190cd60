/**
 * "Once" jobs shared by several app instances: the daily digest and the stalled-wash
 * notice are each claimed with a committed INSERT, so two concurrent attempts send once.
 * These call the server functions directly against the same database the app uses.
 */
import { describe, it, expect, beforeAll } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { createTestWorkspace, type TestWorkspace } from '../helpers/api';
import { ALL_WEEK } from '../helpers/time';

// This process must not start its own outbox sender: the app under test delivers.
process.env.OUTBOX_DISABLED = '1';
const { runDigestFor } = await import('../../src/server/digest');
const { notifyFermentStatusChange } = await import('../../src/server/notify');

const mailOf = (workspaceId: number, kind: string) =>
  getDb()
    .select()
    .from(t.mailOutbox)
    .where(and(eq(t.mailOutbox.workspaceId, workspaceId), eq(t.mailOutbox.kind, kind)));

describe('daily digest', () => {
  let ws: TestWorkspace;
  // 10 March 2027 is in GMT in London (summer time starts 28 March): 06:30 local = 06:30 UTC.
  const morning = new Date('2027-03-10T06:30:00Z');

  beforeAll(async () => {
    ws = await createTestWorkspace('Digest Distillery');
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
    await db.insert(t.runs).values([
      {
        workspaceId: ws.workspaceId,
        stillId: s!.id,
        type: 'stripping',
        startsAt: new Date('2027-03-10T08:00:00Z'),
        endsAt: new Date('2027-03-10T14:00:00Z'),
        operatorId: ws.users.distiller.id,
      },
      { workspaceId: ws.workspaceId, stillId: s!.id, type: 'spirit', startsAt: new Date('2027-03-11T07:00:00Z'), endsAt: new Date('2027-03-11T16:00:00Z') },
      { workspaceId: ws.workspaceId, stillId: s!.id, type: 'cleaning', startsAt: new Date('2027-03-13T07:00:00Z'), endsAt: new Date('2027-03-13T09:00:00Z') },
    ]);
    const distiller = await ws.client('distiller');
    expect((await distiller.request('PUT', '/api/notifications', { digest: true })).json.prefs.digest).toBe(true);
  });

  it('is not sent before 06:00 distillery time', async () => {
    const r = await runDigestFor(ws.workspaceId, new Date('2027-03-10T05:50:00Z'));
    expect(r.outcome).toBe('not_due');
    expect(await mailOf(ws.workspaceId, 'digest')).toHaveLength(0);
  });

  it('goes out once even when two instances try at the same moment', async () => {
    const results = await Promise.all([runDigestFor(ws.workspaceId, morning), runDigestFor(ws.workspaceId, morning)]);
    expect(results.map((r) => r.outcome).sort()).toEqual(['claimed_elsewhere', 'sent']);
    // And a later check the same day does nothing.
    expect((await runDigestFor(ws.workspaceId, new Date('2027-03-10T09:00:00Z'))).outcome).toBe('claimed_elsewhere');
    const mails = await mailOf(ws.workspaceId, 'digest');
    expect(mails.map((m) => m.toAddress)).toEqual([ws.users.distiller.email]); // the only one who asked for it
    const text = mails[0]!.textBody;
    expect(text).toContain('Today, Wed 10 Mar');
    expect(text).toContain('08:00–14:00 Stripping run on Wash Still 1, you');
    expect(text).toContain('Tomorrow, Thu 11 Mar');
    expect(text).toContain('07:00–16:00 Spirit run on Wash Still 1, no operator yet');
    expect(text).not.toContain('Cleaning'); // 13 March is neither today nor tomorrow
    const claims = await getDb()
      .select()
      .from(t.jobClaims)
      .where(and(eq(t.jobClaims.workspaceId, ws.workspaceId), eq(t.jobClaims.job, 'digest')));
    expect(claims.map((c) => c.jobKey)).toEqual(['2027-03-10']);
  });

  it('goes out again the next day', async () => {
    const r = await runDigestFor(ws.workspaceId, new Date('2027-03-11T06:05:00Z'));
    expect(r.outcome).toBe('sent');
    expect(await mailOf(ws.workspaceId, 'digest')).toHaveLength(2);
  });
});

describe('stalled-wash notice claim', () => {
  it('is sent once when two instances notice the same change', async () => {
    const ws = await createTestWorkspace('Stall Claim Distillery');
    const db = getDb();
    const [wt] = await db
      .insert(t.washTypes)
      .values({ workspaceId: ws.workspaceId, name: 'Grain', category: 'grain', terminalMin: 1.002, terminalMax: 1.008 })
      .$returningId();
    const [f] = await db
      .insert(t.ferments)
      .values({ workspaceId: ws.workspaceId, code: 'G-1', washTypeId: wt!.id, volumeLitres: 1000, pitchedAt: new Date(Date.now() - 8 * 86_400_000), og: 1.06 })
      .$returningId();
    const change = { workspaceId: ws.workspaceId, fermentId: f!.id, before: 'slowing', after: 'stalled' };
    const sent = await Promise.all([notifyFermentStatusChange(db, change), notifyFermentStatusChange(db, change)]);
    expect(sent.filter(Boolean)).toHaveLength(1);
    const mails = await mailOf(ws.workspaceId, 'ferment_stalled');
    expect(mails.map((m) => m.toAddress).sort()).toEqual([ws.users.manager.email, ws.users.planner.email].sort());
    // Nothing for a status that is not trouble, or one that did not change.
    expect(await notifyFermentStatusChange(db, { ...change, after: 'finished' })).toBe(false);
    expect(await notifyFermentStatusChange(db, { ...change, before: 'souring', after: 'souring' })).toBe(false);
  });
});
