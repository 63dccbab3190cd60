/**
 * The mail outbox, driven directly: our own fake SMTP on a free port, rows of our own
 * workspace only, due "in the future" so the app server's own sender loop never sees them.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { enqueue, deliverDue, backoffMs, MAX_ATTEMPTS } from '../../src/server/mail/outbox';
import { startFakeSmtp, readMailbox } from '../../src/server/mail/fake-smtp';
import { createTestWorkspace } from '../helpers/api';

// This process must not run its own sender loop: the test drives deliverDue itself.
process.env.OUTBOX_DISABLED = '1';

const FUTURE = new Date('2099-01-01T00:00:00Z');
const later = (ms: number) => new Date(FUTURE.getTime() + ms);

function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = createServer();
    s.listen(0, '127.0.0.1', () => {
      const p = (s.address() as { port: number }).port;
      s.close(() => resolve(p));
    });
  });
}

async function queue(workspaceId: number, n: number, tag: string): Promise<string[]> {
  const ids: string[] = [];
  await getDb().transaction(async (tx) => {
    for (let i = 0; i < n; i++)
      ids.push(
        await enqueue(tx, {
          workspaceId,
          kind: 'test',
          to: `rcpt${i}-${tag}@test.example`,
          subject: `Outbox ${tag} ${i}`,
          text: `Message ${i}`,
          html: `<p>Message ${i}</p>`,
        }),
      );
  });
  // Park the rows in the future: only calls with now >= FUTURE see them due.
  await getDb().update(t.mailOutbox).set({ nextAttemptAt: FUTURE }).where(eq(t.mailOutbox.workspaceId, workspaceId));
  return ids;
}

describe('mail outbox', () => {
  let dir: string;
  beforeAll(() => {
    dir = mkdtempSync(path.join(os.tmpdir(), 'plateau-outbox-'));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('backs off exponentially, capped at 10 minutes', () => {
    // Expected values written out by hand: 10 s doubling, never above 600 s.
    expect([1, 2, 3, 4, 5, 6, 7, 11].map(backoffMs)).toEqual([10_000, 20_000, 40_000, 80_000, 160_000, 320_000, 600_000, 600_000]);
  });

  it('an enqueue rolled back with its transaction sends nothing', async () => {
    const ws = await createTestWorkspace('Outbox rollback');
    await expect(
      getDb().transaction(async (tx) => {
        await enqueue(tx, { workspaceId: ws.workspaceId, kind: 'test', to: 'x@test.example', subject: 's', text: 't', html: '<p>t</p>' });
        throw new Error('rolled back');
      }),
    ).rejects.toThrow('rolled back');
    expect(await getDb().select().from(t.mailOutbox).where(eq(t.mailOutbox.workspaceId, ws.workspaceId))).toHaveLength(0);
  });

  it('keeps mail while SMTP is down and delivers every message exactly once when it is back', async () => {
    const ws = await createTestWorkspace('Outbox down');
    const ids = await queue(ws.workspaceId, 3, 'down');
    const port = await freePort();
    const smtpUrl = `smtp://127.0.0.1:${port}`;
    // SMTP stopped: every attempt fails and is rescheduled.
    const down = await deliverDue({ smtpUrl, instanceId: 'test-a', now: FUTURE, workspaceId: ws.workspaceId });
    expect(down).toMatchObject({ claimed: 3, sent: 0, retried: 3 });
    const rows = await getDb().select().from(t.mailOutbox).where(eq(t.mailOutbox.workspaceId, ws.workspaceId));
    expect(rows.every((r) => r.status === 'pending' && r.attempts === 1 && r.claimedBy === null)).toBe(true);
    expect(rows.every((r) => r.nextAttemptAt.getTime() === FUTURE.getTime() + 10_000)).toBe(true);
    // Not yet due again.
    expect((await deliverDue({ smtpUrl, instanceId: 'test-a', now: later(5_000), workspaceId: ws.workspaceId })).claimed).toBe(0);
    // SMTP started.
    const smtp = await startFakeSmtp({ port, dir });
    try {
      const up = await deliverDue({ smtpUrl, instanceId: 'test-a', now: later(11_000), workspaceId: ws.workspaceId });
      expect(up).toMatchObject({ claimed: 3, sent: 3 });
      expect((await deliverDue({ smtpUrl, instanceId: 'test-a', now: later(3_600_000), workspaceId: ws.workspaceId })).claimed).toBe(0);
    } finally {
      await smtp.close();
    }
    const got = readMailbox(dir).filter((m) => ids.includes(m.messageId ?? ''));
    expect(got.map((m) => m.messageId).sort()).toEqual([...ids].sort());
    const sent = await getDb().select().from(t.mailOutbox).where(eq(t.mailOutbox.workspaceId, ws.workspaceId));
    expect(sent.every((r) => r.status === 'sent' && r.sentAt)).toBe(true);
  });

  it('two senders working at once never send a message twice', async () => {
    const ws = await createTestWorkspace('Outbox race');
    const ids = await queue(ws.workspaceId, 30, 'race');
    const port = await freePort();
    const smtp = await startFakeSmtp({ port, dir });
    try {
      const smtpUrl = `smtp://127.0.0.1:${port}`;
      for (let round = 0; round < 3; round++) {
        await Promise.all([
          deliverDue({ smtpUrl, instanceId: 'node-1', now: FUTURE, workspaceId: ws.workspaceId, batch: 7 }),
          deliverDue({ smtpUrl, instanceId: 'node-2', now: FUTURE, workspaceId: ws.workspaceId, batch: 7 }),
        ]);
      }
      while ((await deliverDue({ smtpUrl, instanceId: 'node-3', now: FUTURE, workspaceId: ws.workspaceId })).claimed > 0) {
        /* drain */
      }
    } finally {
      await smtp.close();
    }
    const got = readMailbox(dir)
      .filter((m) => ids.includes(m.messageId ?? ''))
      .map((m) => m.messageId);
    expect(got).toHaveLength(30);
    expect(new Set(got).size).toBe(30);
  });

  it('gives up after 12 attempts and marks the message failed', async () => {
    const ws = await createTestWorkspace('Outbox fail');
    await queue(ws.workspaceId, 1, 'fail');
    await getDb()
      .update(t.mailOutbox)
      .set({ attempts: MAX_ATTEMPTS - 1 })
      .where(eq(t.mailOutbox.workspaceId, ws.workspaceId));
    const r = await deliverDue({ smtpUrl: `smtp://127.0.0.1:${await freePort()}`, instanceId: 'test-f', now: FUTURE, workspaceId: ws.workspaceId });
    expect(r.failed).toBe(1);
    const [row] = await getDb().select().from(t.mailOutbox).where(eq(t.mailOutbox.workspaceId, ws.workspaceId));
    expect(row).toMatchObject({ status: 'failed', attempts: 12 });
    expect(row!.lastError).toBeTruthy();
  });
});
