/**
 * The daily digest: today's and tomorrow's runs, mailed at 06:00 distillery time to the
 * people who asked for it. Every app instance checks every few minutes; the one whose
 * claim INSERT (workspace, 'digest', local date) commits first sends it, in the same
 * transaction as its outbox rows, so it goes out once a day however many instances run.
 */
import { and, eq, gte, inArray, lt, ne } from 'drizzle-orm';
import { getDb } from '../db/client';
import { ferments, runs, users, workspaces } from '../db/schema';
import { RUN_STATUS_LABELS, RUN_TYPE_LABELS, shortDate } from '../lib/board';
import { addDaysYmd, wallClock, weekdayOfYmd, zonedDateTime } from '../lib/schedule';
import { env, publicUrl } from '../config';
import { enqueue } from './mail/outbox';
import { claimOnce, membersOf, noticeMail } from './notify';
import { selectRuns, stillName } from './run-query';

/** Local hour from which the digest may go out, and the hour after which it is not worth sending. */
export const DIGEST_HOUR = 6;
export const DIGEST_LAST_HOUR = 12;
const CHECK_EVERY_MS = 5 * 60_000;

export type DigestOutcome = 'sent' | 'claimed_elsewhere' | 'not_due';

export interface DigestResult {
  outcome: DigestOutcome;
  recipients: number;
  runs: number;
  date: string;
}

/** Send one workspace's digest for its local date at `now`, if due and not yet claimed. */
export async function runDigestFor(workspaceId: number, now: Date = new Date(), opts: { ignoreHour?: boolean } = {}): Promise<DigestResult> {
  const db = getDb();
  const [ws] = await db.select({ name: workspaces.name, timeZone: workspaces.timeZone }).from(workspaces).where(eq(workspaces.id, workspaceId)).limit(1);
  if (!ws) return { outcome: 'not_due', recipients: 0, runs: 0, date: '' };
  const local = wallClock(now, ws.timeZone);
  const hour = Math.floor(local.minuteOfDay / 60);
  if (!opts.ignoreHour && (hour < DIGEST_HOUR || hour >= DIGEST_LAST_HOUR)) return { outcome: 'not_due', recipients: 0, runs: 0, date: local.ymd };

  const today = local.ymd;
  const tomorrow = addDaysYmd(today, 1);
  const from = zonedDateTime(today, '00:00', ws.timeZone);
  const to = zonedDateTime(addDaysYmd(today, 2), '00:00', ws.timeZone);

  return db.transaction(async (tx) => {
    if (!(await claimOnce(tx, workspaceId, 'digest', today))) return { outcome: 'claimed_elsewhere' as const, recipients: 0, runs: 0, date: today };
    const members = (await membersOf(tx, workspaceId)).filter((m) => m.prefs.digest);
    if (!members.length) return { outcome: 'sent' as const, recipients: 0, runs: 0, date: today };
    const rows = await selectRuns(tx, workspaceId, {
      extra: { stillName },
      where: and(ne(runs.status, 'cancelled'), lt(runs.startsAt, to), gte(runs.endsAt, from)),
    });
    const fermentIds = [...new Set(rows.flatMap((r) => r.ferments.map((c) => c.fermentId)))];
    const codes = fermentIds.length
      ? await tx
          .select({ id: ferments.id, code: ferments.code })
          .from(ferments)
          .where(and(eq(ferments.workspaceId, workspaceId), inArray(ferments.id, fermentIds)))
      : [];
    const codeOf = new Map(codes.map((f) => [f.id, f.code]));
    const operatorIds = [...new Set(rows.map((r) => r.operatorId).filter((v): v is number => v !== null))];
    const people = operatorIds.length ? await tx.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, operatorIds)) : [];
    const name = new Map(people.map((p) => [p.id, p.name]));
    const washes = new Map<number, string[]>();
    for (const r of rows) {
      const list = r.ferments.flatMap((c) => codeOf.get(c.fermentId) ?? []);
      if (list.length) washes.set(r.id, list);
    }

    const dayLines = (ymd: string, forId: number) => {
      const list = rows.filter((r) => wallClock(r.startsAt, ws.timeZone).ymd === ymd || (ymd === today && r.startsAt < from));
      const heading = `${ymd === today ? 'Today' : 'Tomorrow'}, ${shortDate(ymd, weekdayOfYmd(ymd))}`;
      if (!list.length) return `${heading}: no runs booked.`;
      return `${heading}:\n${list
        .map((r) => {
          const w = washes.get(r.id);
          const op = r.operatorId === null ? 'no operator yet' : r.operatorId === forId ? 'you' : (name.get(r.operatorId) ?? 'someone');
          return `- ${wallClock(r.startsAt, ws.timeZone).hm}–${wallClock(r.endsAt, ws.timeZone).hm} ${RUN_TYPE_LABELS[r.type]} on ${r.stillName}${w ? ` (wash ${w.join(', ')})` : ''}, ${op}, ${RUN_STATUS_LABELS[r.status].toLowerCase()}`;
        })
        .join('\n')}`;
    };
    for (const m of members) {
      const subject = `Still runs today and tomorrow at ${ws.name}`;
      const mail = noticeMail(
        subject,
        [dayLines(today, m.id), dayLines(tomorrow, m.id), 'Times are distillery time. Never leave a running still unattended.'],
        { label: 'Open the board', href: publicUrl('/') },
        `You asked for this daily digest in ${ws.name}. Turn it off at ${publicUrl('/settings/notifications')}`,
      );
      await enqueue(tx, { workspaceId, kind: 'digest', to: m.email, ...mail });
    }
    return { outcome: 'sent' as const, recipients: members.length, runs: rows.length, date: today };
  });
}

/** Check every workspace once. */
export async function runDueDigests(now: Date = new Date()): Promise<DigestResult[]> {
  const all = await getDb().select({ id: workspaces.id }).from(workspaces);
  const out: DigestResult[] = [];
  for (const w of all) {
    try {
      out.push(await runDigestFor(w.id, now));
    } catch (err) {
      console.error('[plateau] digest failed:', err instanceof Error ? err.message : String(err));
    }
  }
  return out;
}

const KEY = Symbol.for('plateau.digestScheduler');

/** Start the digest check once per process (every 5 minutes; off when OUTBOX_DISABLED=1). */
export function ensureDigestScheduler(): void {
  const g = globalThis as unknown as Record<symbol, NodeJS.Timeout | undefined>;
  if (g[KEY]) return;
  if (process.env.OUTBOX_DISABLED === '1' || env().OUTBOX_DISABLED === '1') return;
  let running = false;
  const tick = async () => {
    if (running) return;
    running = true;
    try {
      await runDueDigests();
    } finally {
      running = false;
    }
  };
  const timer = setInterval(() => void tick(), CHECK_EVERY_MS);
  timer.unref?.();
  g[KEY] = timer;
  setTimeout(() => void tick(), 10_000).unref?.();
}
