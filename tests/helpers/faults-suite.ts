/**
 * Fault tests, shared by the short run in `npm test` (tests/integration/faults.test.ts) and the
 * long one in `npm run test:soak` (tests/soak/faults.soak.test.ts):
 *   a. MariaDB stopped under write load: 503 JSON + Retry-After, never a crash, recovery by
 *      itself, no partial multi-row writes;
 *   b. the importing process SIGKILLed in the middle of a CSV import: nothing or everything;
 *   c. SMTP down: the outbox holds an invitation and delivers it exactly once when SMTP is back;
 *   d. two planners editing the same run: one 200, one 409 with the current run, no lost update.
 * The database is stopped and started with scripts/db.sh and the same DB_* variables the app
 * under test uses. Figures go to .data/faults-summary-<label>.json for docs/RELIABILITY.md.
 */
import { describe, it, expect, afterAll } from 'vitest';
import { execFile, spawn } from 'node:child_process';
import { mkdirSync, readdirSync, readFileSync, writeFileSync, existsSync } from 'node:fs';
import path from 'node:path';
import { promisify } from 'node:util';
import { and, eq, inArray, like, sql } from 'drizzle-orm';
import mysql from 'mysql2/promise';
import { closeDb, getDb, getPool } from '../../src/db/client';
import { databaseUrl } from '../../src/config';
import * as t from '../../src/db/schema';
import { stageUpload } from '../../src/server/uploads';
import { workspaceSettings } from '../../src/server/workspaces';
import { systemCtx } from '../../src/server/context';
import { hashPassword } from '../../src/server/auth/password';
import { BASE, Client, createTestWorkspace, TEST_PASSWORD, type TestWorkspace } from './api';

const run = promisify(execFile);
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const DAY = 86_400_000;
const HOUR = 3_600_000;
const allWeek = [0, 1, 2, 3, 4, 5, 6].map((weekday) => ({ weekday, open: '00:00', close: '24:00' }));

export interface FaultOptions {
  label: 'short' | 'soak';
  /** Seconds of write load before, during and after the outage. */
  loadSeconds: number;
  /** Seconds MariaDB stays down. */
  downSeconds: number;
  /** Concurrent writers during the outage. */
  writers: number;
  /** Outages in a row (the soak repeats them). */
  outages: number;
  /** Rows in the staged CSV and how many kill attempts. */
  importRows: number;
  killAttempts: number;
  /** Rounds of two planners racing on one run. */
  raceRounds: number;
}

const figures: Record<string, unknown> = {};

async function workspaceWithStill(name: string): Promise<TestWorkspace & { stillId: number; washTypeId: number }> {
  const ws = await createTestWorkspace(name);
  const db = getDb();
  const [still] = await db
    .insert(t.stills)
    .values({
      workspaceId: ws.workspaceId,
      name: 'Fault Still',
      kind: 'pot',
      capacityLitres: 5000,
      heatingKw: 60,
      operatingHours: allWeek,
      cleaningAfterRunMinutes: 0,
      typicalMinutes: { stripping: 240, spirit: 420, redistillation: 360, cleaning: 120, maintenance: 240 },
    })
    .$returningId();
  const [wt] = await db
    .insert(t.washTypes)
    .values({ workspaceId: ws.workspaceId, name: 'Grain wash', category: 'grain', terminalMin: 1.002, terminalMax: 1.008, typicalOg: 1.06 })
    .$returningId();
  return { ...ws, stillId: still!.id, washTypeId: wt!.id };
}

async function addFerments(workspaceId: number, washTypeId: number, n: number, tag: string, pitchedDaysAgo = 30): Promise<number[]> {
  const db = getDb();
  const ids: number[] = [];
  for (let i = 0; i < n; i++) {
    const [f] = await db
      .insert(t.ferments)
      .values({
        workspaceId,
        code: `${tag}-${i}`,
        washTypeId,
        volumeLitres: 2000,
        pitchedAt: new Date(Date.now() - pitchedDaysAgo * DAY),
        og: 1.06,
      })
      .$returningId();
    ids.push(f!.id);
  }
  return ids;
}

/** scripts/db.sh with the environment of the app under test (DB_PORT, DB_SOCKET, ... as exported). */
async function dbScript(cmd: 'start' | 'stop'): Promise<void> {
  await run('bash', ['scripts/db.sh', cmd], { env: process.env, timeout: 60_000 });
}

async function waitHealthy(base: string, withinMs: number): Promise<number> {
  const t0 = Date.now();
  while (Date.now() - t0 < withinMs) {
    try {
      if ((await fetch(`${base}/api/health`)).status === 200) return Date.now() - t0;
    } catch {
      /* not yet */
    }
    await sleep(100);
  }
  throw new Error(`the app did not become healthy within ${withinMs} ms`);
}

/** The fake SMTP process listening on the app's SMTP port (started by scripts/test.sh or scripts/dev.sh). */
function fakeSmtpPid(port: string): number | null {
  for (const entry of readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue;
    try {
      const cmd = readFileSync(`/proc/${entry}/cmdline`, 'utf8');
      if (!cmd.includes('fake-smtp')) continue;
      const env = readFileSync(`/proc/${entry}/environ`, 'utf8').split('\0');
      if (env.includes(`SMTP_PORT=${port}`)) return Number(entry);
    } catch {
      /* gone or not ours */
    }
  }
  return null;
}

export function faultSuite(o: FaultOptions): void {
  afterAll(() => {
    mkdirSync('.data', { recursive: true });
    writeFileSync(`.data/faults-summary-${o.label}.json`, JSON.stringify({ ...figures, options: o, at: new Date().toISOString() }, null, 2));
    console.log(`[faults] ${JSON.stringify(figures)}`);
  });

  describe('faults', () => {
    // Another MariaDB (DATABASE_URL) is not ours to stop.
    it.runIf(!process.env.DATABASE_URL)(
      `MariaDB stopped ${o.outages}× for ${o.downSeconds} s under write load: 503 + Retry-After, recovery, no partial writes`,
      async () => {
        const base = BASE();
        const ws = await workspaceWithStill('Fault DB');
        const ferments = await addFerments(ws.workspaceId, ws.washTypeId, 40, `DBF-${ws.workspaceId}`);
        const planner = await ws.client('planner');
        type Sent = { kind: 'reading' | 'run'; key: string; status: number; retryAfter: string | null; json: boolean; stack: boolean; at: number };
        const sent: Sent[] = [];
        let seq = 0;
        let stop = false;
        const slot0 = Math.ceil((Date.now() + 30 * DAY) / HOUR) * HOUR;

        const writer = async (w: number) => {
          while (!stop) {
            const i = seq++;
            const key = `fault-${ws.workspaceId}-${i}`;
            let r: { status: number; json: any; text: string; headers: Headers };
            let kind: Sent['kind'];
            try {
              if (i % 2 === 0) {
                kind = 'reading';
                const f = ferments[(i / 2) % ferments.length]!;
                // Distinct times, all after the pitch and before now.
                r = await planner.post(`/api/ferments/${f}/readings`, {
                  value: 1.03,
                  unit: 'sg',
                  method: 'digital',
                  takenAt: new Date(Date.now() - 29 * DAY + i * 60_000).toISOString(),
                  note: key,
                });
              } else {
                kind = 'run';
                // Each run in its own 6-hour slot, charged from two ferments: three rows in one transaction.
                const a = ferments[i % ferments.length]!;
                const b = ferments[(i + 1) % ferments.length]!;
                r = await planner.post('/api/runs', {
                  stillId: ws.stillId,
                  type: 'stripping',
                  startsAt: new Date(slot0 + i * 6 * HOUR).toISOString(),
                  durationMinutes: 300,
                  ferments: [
                    { fermentId: a, litres: 400 },
                    { fermentId: b, litres: 300 },
                  ],
                  notes: key,
                });
              }
            } catch (err) {
              throw new Error(`writer ${w}: the app did not answer (${(err as Error).message})`);
            }
            sent.push({
              kind,
              key,
              status: r.status,
              retryAfter: r.headers.get('retry-after'),
              json: typeof r.json?.error?.code === 'string' || r.status < 300,
              stack: /\n\s+at |node_modules|ECONNREFUSED/.test(r.text),
              at: Date.now(),
            });
            if (r.status === 503) await sleep(50);
          }
        };

        const t0 = Date.now();
        const writers = Array.from({ length: o.writers }, (_, w) => writer(w));
        const recoveries: number[] = [];
        try {
          for (let k = 0; k < o.outages; k++) {
            await sleep((o.loadSeconds * 1000) / (o.outages + 1));
            await dbScript('stop');
            await sleep(o.downSeconds * 1000);
            await dbScript('start');
            recoveries.push(await waitHealthy(base, 30_000));
          }
          await sleep(Math.max(1500, (o.loadSeconds * 1000) / (o.outages + 1)));
        } finally {
          stop = true;
          await Promise.allSettled(writers);
          if (!process.env.DATABASE_URL) await dbScript('start');
        }
        const lastDownEnd = Date.now() - 1500;

        // The test's own pool held connections to the stopped server: start afresh.
        await closeDb();
        const db = getDb();
        const bad = sent.filter((s) => !(s.status === 201 || s.status === 503));
        expect(
          bad.map((s) => `${s.kind} ${s.key}: ${s.status}`),
          'every answer is 201 or 503',
        ).toEqual([]);
        const unavailable = sent.filter((s) => s.status === 503);
        expect(unavailable.length, 'the outage was seen by the writers').toBeGreaterThan(0);
        expect(
          unavailable.filter((s) => s.retryAfter === null || !s.json),
          '503 answers carry JSON and Retry-After',
        ).toEqual([]);
        expect(
          sent.filter((s) => s.stack),
          'no answer shows a stack trace or driver error',
        ).toEqual([]);
        expect(
          sent.some((s) => s.status === 201 && s.at > lastDownEnd - 1000),
          'writes succeed again after the outage',
        ).toBe(true);

        // Every acknowledged write is there exactly once; nothing half-written.
        const readingRows = await db
          .select({ note: t.readings.note })
          .from(t.readings)
          .where(and(eq(t.readings.workspaceId, ws.workspaceId), like(t.readings.note, `fault-${ws.workspaceId}-%`)));
        const readingNotes = readingRows.map((r) => r.note);
        const okReadings = sent.filter((s) => s.kind === 'reading' && s.status === 201).map((s) => s.key);
        for (const k of okReadings)
          expect(
            readingNotes.filter((n) => n === k),
            `reading ${k}`,
          ).toHaveLength(1);
        expect(new Set(readingNotes).size, 'no reading stored twice').toBe(readingNotes.length);

        const runRows = await db.select({ id: t.runs.id, notes: t.runs.notes }).from(t.runs).where(eq(t.runs.workspaceId, ws.workspaceId));
        const okRuns = new Set(sent.filter((s) => s.kind === 'run' && s.status === 201).map((s) => s.key));
        for (const k of okRuns)
          expect(
            runRows.filter((r) => r.notes === k),
            `run ${k}`,
          ).toHaveLength(1);
        const lines = runRows.length
          ? await db
              .select({ runId: t.runFerments.runId, n: sql<number>`COUNT(*)` })
              .from(t.runFerments)
              .where(
                inArray(
                  t.runFerments.runId,
                  runRows.map((r) => r.id),
                ),
              )
              .groupBy(t.runFerments.runId)
          : [];
        const linesByRun = new Map(lines.map((l) => [l.runId, Number(l.n)]));
        const partial = runRows.filter((r) => linesByRun.get(r.id) !== 2);
        expect(
          partial.map((r) => `run ${r.id} (${r.notes}) has ${linesByRun.get(r.id) ?? 0} ferment lines`),
          'every run has both its ferment lines',
        ).toEqual([]);
        const audits = await db
          .select({ entityId: t.auditLog.entityId })
          .from(t.auditLog)
          .where(and(eq(t.auditLog.workspaceId, ws.workspaceId), eq(t.auditLog.action, 'run.create')));
        expect(audits.length, 'one audit row per stored run').toBe(runRows.length);

        Object.assign(figures, {
          dbOutage: {
            requests: sent.length,
            acknowledged: sent.filter((s) => s.status === 201).length,
            unavailable503: unavailable.length,
            other: bad.length,
            outages: o.outages,
            downSeconds: o.downSeconds,
            writers: o.writers,
            seconds: Math.round((Date.now() - t0) / 1000),
            runsStored: runRows.length,
            runsAcknowledged: okRuns.size,
            readingsStored: readingNotes.length,
            readingsAcknowledged: okReadings.length,
            partialRuns: partial.length,
            recoveryMs: recoveries,
          },
        });
      },
      60_000 + o.loadSeconds * 1000 + o.outages * (o.downSeconds * 1000 + 30_000),
    );

    it(
      `the importing process killed mid-transaction (${o.killAttempts}×, ${o.importRows} rows): nothing or everything imported`,
      async () => {
        const ws = await workspaceWithStill('Fault import');
        const [fermentId] = await addFerments(ws.workspaceId, ws.washTypeId, 1, `IMP-${ws.workspaceId}`, 200);
        const settings = (await workspaceSettings(ws.workspaceId))!;
        const db = getDb();
        const count = async () =>
          Number(
            (
              await db
                .select({ n: sql<number>`COUNT(*)` })
                .from(t.readings)
                .where(and(eq(t.readings.fermentId, fermentId!), eq(t.readings.workspaceId, ws.workspaceId)))
            )[0]!.n,
          );
        // One reading a minute, spread so each staged file has its own times; digital SG needs no sample temperature.
        let minute = 0;
        const stage = async () => {
          const lines = ['time,value,unit,method'];
          const start = Date.now() - 190 * DAY;
          for (let i = 0; i < o.importRows; i++)
            lines.push(`${new Date(start + minute++ * 60_000).toISOString()},${(1.05 - (i % 40) / 1000).toFixed(3)},sg,digital`);
          const preview = await stageUpload(systemCtx(settings, ws.users.distiller.id, 'distiller'), fermentId!, lines.join('\n') + '\n');
          expect(preview.counts.toImport).toBe(o.importRows);
          return preview.uploadId;
        };
        const bigTrx = async () => {
          const [rows] = await getPool().query('SELECT trx_rows_modified AS n FROM information_schema.innodb_trx WHERE trx_rows_modified >= 500');
          return (rows as Array<{ n: number }>).length > 0;
        };

        const startChild = (uploadId: string) => {
          const child = spawn(
            process.execPath,
            ['--import', 'tsx', 'tests/helpers/fault-commit-child.ts', String(ws.workspaceId), String(ws.users.distiller.id), String(fermentId), uploadId],
            { env: process.env, stdio: ['ignore', 'pipe', 'pipe'] },
          );
          const state = { out: '', committingAt: 0, doneAt: 0 };
          child.stdout.on('data', (d) => {
            state.out += d;
            if (!state.committingAt && state.out.includes('committing')) state.committingAt = Date.now();
            if (!state.doneAt && state.out.includes('done')) state.doneAt = Date.now();
          });
          child.stderr.on('data', (d) => {
            state.out += d;
          });
          const exited = new Promise<void>((r) => child.on('exit', () => r()));
          return { child, state, exited };
        };

        // Control first: left alone, the same path imports every row; its duration spreads the timed kills below.
        let controlMs: number;
        {
          const uploadId = await stage();
          const before = await count();
          const c = startChild(uploadId);
          await c.exited;
          expect(c.state.out, 'the import child finished').toContain(`done ${o.importRows}`);
          expect(await count()).toBe(before + o.importRows);
          controlMs = c.state.doneAt - c.state.committingAt;
        }

        const outcomes: string[] = [];
        let killedMidTransaction = 0;
        for (let k = 0; k < o.killAttempts; k++) {
          const uploadId = await stage();
          const before = await count();
          // Attempt 0 is deterministic: the end of audit_log is row-locked by another session, so the import
          // writes its readings and then waits at its audit row, inside its transaction, and is killed
          // there. The others are killed at spread fractions of the control's duration, wherever they are.
          const locker = k === 0 ? await mysql.createConnection({ uri: databaseUrl() }) : null;
          let sawRows = false;
          let c: ReturnType<typeof startChild>;
          try {
            // An InnoDB next-key lock on the newest audit row and the gap above it: the import's own
            // audit insert (its last statement) waits there, after its readings are written.
            if (locker) {
              await locker.query('START TRANSACTION');
              await locker.query('SELECT id FROM audit_log ORDER BY id DESC LIMIT 1 FOR UPDATE');
            }
            c = startChild(uploadId);
            const t0 = Date.now();
            if (k === 0) {
              // The import's audit row is written inside its transaction after all its readings: a
              // session waiting on that insert is an import caught mid-transaction.
              const waitingAtAudit = async () => {
                const [rows] = await getPool().query(
                  "SELECT COUNT(*) AS n FROM information_schema.processlist WHERE info LIKE 'insert into `audit_log`%' AND info LIKE ?",
                  [`%${uploadId}%`],
                );
                return Number((rows as Array<{ n: number }>)[0]!.n) > 0;
              };
              while (Date.now() - t0 < 60_000 && !c.state.doneAt) {
                if (await waitingAtAudit().catch(() => false)) {
                  sawRows = true;
                  break;
                }
                await sleep(20);
              }
            } else {
              while (!c.state.committingAt && Date.now() - t0 < 30_000) await sleep(2);
              const killAt = c.state.committingAt + (controlMs * k) / o.killAttempts;
              while (Date.now() < killAt && !c.state.doneAt) {
                if (!sawRows && (await bigTrx().catch(() => false))) sawRows = true;
                await sleep(2);
              }
            }
            c.child.kill('SIGKILL');
            await c.exited;
          } finally {
            if (locker) {
              await locker.query('ROLLBACK');
              await locker.end();
            }
          }
          // The server rolls back the dropped connection's transaction: wait until it has.
          for (let i = 0; i < 200 && (await bigTrx()); i++) await sleep(25);
          const after = await count();
          const [up] = await db.select({ committedAt: t.readingUploads.committedAt }).from(t.readingUploads).where(eq(t.readingUploads.id, uploadId));
          const imported = after - before;
          const finished = c.state.out.includes('done');
          outcomes.push(`${finished ? 'finished' : 'killed'}${sawRows ? ' with rows written' : ''}: +${imported}`);
          if (sawRows && !finished) killedMidTransaction++;
          expect([0, o.importRows], `attempt ${k}: ${imported} rows imported`).toContain(imported);
          expect(up!.committedAt !== null, `attempt ${k}: the upload is marked imported exactly when its rows are there`).toBe(imported === o.importRows);
        }
        expect(killedMidTransaction, `at least one kill landed mid-transaction (${outcomes.join('; ')})`).toBeGreaterThan(0);
        figures.killedImport = { attempts: o.killAttempts, rows: o.importRows, controlCommitMs: controlMs, killedMidTransaction, outcomes };
      },
      60_000 + o.killAttempts * 20_000,
    );

    it('SMTP down: the outbox holds an invitation and delivers it exactly once when SMTP is back', async () => {
      const smtpUrl = new URL(process.env.SMTP_URL ?? 'smtp://127.0.0.1:2525');
      const mailbox = process.env.MAILBOX_DIR ?? '.data/mailbox';
      const pid = fakeSmtpPid(smtpUrl.port);
      expect(pid, `the app's fake SMTP server on port ${smtpUrl.port} (SMTP_URL) was not found`).not.toBeNull();
      const ws = await createTestWorkspace('Fault SMTP');
      const manager = await ws.client('manager');
      const email = `smtp-fault-${ws.workspaceId}@test.example`;
      const db = getDb();
      const row = async () =>
        (
          await db
            .select()
            .from(t.mailOutbox)
            .where(and(eq(t.mailOutbox.workspaceId, ws.workspaceId), eq(t.mailOutbox.toAddress, email)))
        )[0];
      const delivered = () =>
        existsSync(mailbox)
          ? readdirSync(mailbox)
              .filter((f) => f.endsWith('.json'))
              .map((f) => JSON.parse(readFileSync(path.join(mailbox, f), 'utf8')) as { to: string[] })
              .filter((m) => m.to.includes(email)).length
          : 0;

      // SIGSTOP: the port still accepts connections but never greets, like a hung mail server.
      const resume = () => {
        try {
          process.kill(pid!, 'SIGCONT');
        } catch {
          /* gone */
        }
      };
      process.once('exit', resume);
      let heldMs = 0;
      try {
        process.kill(pid!, 'SIGSTOP');
        const r = await manager.post('/api/members/invitations', { email, role: 'staff' });
        expect(r.status, r.text).toBe(201);
        // While the server is hung the message stays in the outbox, undelivered (the sender's attempt
        // hangs or times out and is rescheduled).
        const t0 = Date.now();
        while (Date.now() - t0 < 6_000) {
          const held = await row();
          expect(held?.status, 'held in the outbox').toBe('pending');
          expect(delivered()).toBe(0);
          await sleep(250);
        }
        heldMs = Date.now() - t0;
      } finally {
        resume();
      }
      // SMTP is back. If an attempt failed meanwhile, bring its retry forward instead of waiting out the back-off.
      const attemptsWhileDown = (await row())!.attempts;
      await db
        .update(t.mailOutbox)
        .set({ nextAttemptAt: new Date() })
        .where(and(eq(t.mailOutbox.workspaceId, ws.workspaceId), eq(t.mailOutbox.toAddress, email), eq(t.mailOutbox.status, 'pending')));
      const t1 = Date.now();
      while (Date.now() - t1 < 20_000 && (await row())?.status !== 'sent') await sleep(200);
      expect((await row())?.status).toBe('sent');
      await sleep(1500); // a duplicate would arrive now
      expect(delivered(), 'the invitation arrived exactly once').toBe(1);
      figures.smtpDown = { heldMs, failedAttemptsWhileDown: attemptsWhileDown, deliveredCopies: delivered() };
    }, 90_000);

    it(
      `two planners editing the same run (${o.raceRounds} rounds): one 200, one 409 with the current run, no lost update`,
      async () => {
        const ws = await workspaceWithStill('Fault race');
        // A second planner.
        const db = getDb();
        const email = `planner2-${ws.workspaceId}@test.example`;
        const [u] = await db
          .insert(t.users)
          .values({ email, name: 'Second Planner', passwordHash: await hashPassword(TEST_PASSWORD), emailVerifiedAt: new Date() })
          .$returningId();
        await db.insert(t.memberships).values({ workspaceId: ws.workspaceId, userId: u!.id, role: 'planner' });
        const p1 = await ws.client('planner');
        const p2 = await new Client().signIn(email);
        const startsAt = new Date(Math.ceil((Date.now() + 20 * DAY) / HOUR) * HOUR);
        const created = await p1.post('/api/runs', {
          stillId: ws.stillId,
          type: 'stripping',
          startsAt: startsAt.toISOString(),
          durationMinutes: 300,
          notes: 'start',
        });
        expect(created.status, created.text).toBe(201);
        const id = created.json.run.id as number;
        const tally = { ok: 0, conflict: 0 };
        for (let round = 0; round < o.raceRounds; round++) {
          const seen = (await p1.get(`/api/runs/${id}`)).json.run;
          const [a, b] = await Promise.all([
            p1.patch(`/api/runs/${id}`, { version: seen.version, notes: `p1-${round}` }),
            p2.patch(`/api/runs/${id}`, { version: seen.version, notes: `p2-${round}` }),
          ]);
          const statuses = [a.status, b.status].sort();
          expect(statuses, `round ${round}: ${a.text.slice(0, 100)} | ${b.text.slice(0, 100)}`).toEqual([200, 409]);
          const [win, lose, loserClient, loserTag] = a.status === 200 ? [a, b, p2, `p2-${round}`] : [b, a, p1, `p1-${round}`];
          expect(lose.json.error.code).toBe('stale');
          expect(lose.json.current.version, 'the 409 carries the current run').toBe(win.json.run.version);
          expect(lose.json.current.notes).toBe(win.json.run.notes);
          // The loser re-applies on the current version: both edits are kept in order, nothing lost.
          const retry = await loserClient.patch(`/api/runs/${id}`, { version: lose.json.current.version, notes: `${lose.json.current.notes}+${loserTag}` });
          expect(retry.status, retry.text).toBe(200);
          const final = (await p1.get(`/api/runs/${id}`)).json.run;
          expect(final.notes).toBe(`${win.json.run.notes}+${loserTag}`);
          expect(final.version).toBe(seen.version + 2);
          tally.ok++;
          tally.conflict++;
        }
        figures.concurrentEdit = { rounds: o.raceRounds, ...tally };
      },
      30_000 + o.raceRounds * 2_000,
    );
  });
}
