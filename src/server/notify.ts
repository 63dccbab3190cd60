/**
 * Notifications by e-mail, always through the outbox (never sent directly): the mail is
 * written in the same transaction as the change that causes it, or with the claim that
 * makes it happen once.
 *
 * - a ferment turned stalled or souring -> managers and planners;
 * - a run is now booked before its wash is likely ready (at risk by the distillery's threshold) -> planners;
 * - a run moved, was cancelled, or got a new operator -> its operator (old and new) and
 *   planners, never the person who made the change;
 * - the daily digest (src/server/digest.ts).
 * Each person chooses which they receive in each distillery (memberships.notify_prefs).
 */
import { and, eq, inArray, isNull } from 'drizzle-orm';
import { getDb, type Db } from '../db/client';
import { fermentForecasts, ferments, jobClaims, memberships, runs, stills, users, workspaces } from '../db/schema';
import type { Role } from '../lib/vocabulary';
import { RUN_TYPE_LABELS } from '../lib/board';
import type { BoardRun } from '../lib/board';
import { fermentRisk, formatMoment, formatReadyWindow, isAtRisk, readyQuantile, wallClock, type FermentState } from '../lib/schedule';
import { env, publicUrl } from '../config';
import { enqueue } from './mail/outbox';
import { escapeHtml, shell, type MailContent } from './mail/templates';
import type { Tx } from './tx';
import { selectRuns, stillName, type RunChange } from './run-query';
import type { Ctx } from './context';

export const NOTIFY_KINDS = ['ferment_trouble', 'run_early', 'run_changes', 'digest'] as const;
export type NotifyKind = (typeof NOTIFY_KINDS)[number];
export type NotifyPrefs = Record<NotifyKind, boolean>;

export interface NotifyKindInfo {
  kind: NotifyKind;
  label: string;
  hint: string;
  /** Roles that may receive it at all. */
  roles: readonly Role[];
  /** Roles for whom it is on until they choose otherwise. */
  onByDefault: readonly Role[];
}

export const NOTIFY_KIND_INFO: readonly NotifyKindInfo[] = [
  {
    kind: 'ferment_trouble',
    label: 'A ferment stalls or sours',
    hint: 'When the readings show a wash stuck above its finishing range, or signs of souring, with the runs it puts at risk.',
    roles: ['manager', 'planner', 'distiller'],
    onByDefault: ['manager', 'planner'],
  },
  {
    kind: 'run_early',
    label: 'A run is booked before its wash is likely ready',
    hint: "When someone books or moves a run to start before a wash it takes is likely to be confirmed stable (the distillery's at-risk threshold).",
    roles: ['manager', 'planner'],
    onByDefault: ['planner'],
  },
  {
    kind: 'run_changes',
    label: 'My runs change',
    hint: 'When a run you operate is moved, cancelled or handed to someone else; planners hear about every run.',
    roles: ['manager', 'planner', 'distiller', 'staff'],
    onByDefault: ['manager', 'planner', 'distiller', 'staff'],
  },
  {
    kind: 'digest',
    label: 'Daily digest',
    hint: "Today's and tomorrow's runs, at 06:00 distillery time.",
    roles: ['manager', 'planner', 'distiller', 'staff'],
    onByDefault: [],
  },
];

const INFO = new Map(NOTIFY_KIND_INFO.map((i) => [i.kind, i]));

/** What a person receives: their own choice where they made one, else the default for their role. */
export function effectivePrefs(role: Role, stored: Record<string, boolean> | null | undefined): NotifyPrefs {
  const out = {} as NotifyPrefs;
  for (const info of NOTIFY_KIND_INFO) {
    const eligible = info.roles.includes(role);
    const chosen = stored?.[info.kind];
    out[info.kind] = eligible && (typeof chosen === 'boolean' ? chosen : info.onByDefault.includes(role));
  }
  return out;
}

export async function getNotifyPrefs(ctx: Ctx): Promise<{ role: Role; prefs: NotifyPrefs; kinds: NotifyKindInfo[] } | null> {
  const [m] = await getDb()
    .select({ role: memberships.role, prefs: memberships.notifyPrefs })
    .from(memberships)
    .where(and(eq(memberships.workspaceId, ctx.ws.id), eq(memberships.userId, ctx.actor.userId)))
    .limit(1);
  if (!m) return null;
  return { role: m.role, prefs: effectivePrefs(m.role, m.prefs), kinds: NOTIFY_KIND_INFO.filter((i) => i.roles.includes(m.role)) };
}

/** Save a person's choices (only kinds their role may receive are kept). */
export async function setNotifyPrefs(ctx: Ctx, changes: Partial<Record<NotifyKind, boolean>>): Promise<NotifyPrefs> {
  const workspaceId = ctx.ws.id;
  const userId = ctx.actor.userId;
  const db = getDb();
  return db.transaction(async (tx) => {
    const [m] = await tx
      .select({ role: memberships.role, prefs: memberships.notifyPrefs })
      .from(memberships)
      .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, userId)))
      .for('update')
      .limit(1);
    if (!m) throw new Error('not a member');
    const next: Record<string, boolean> = { ...(m.prefs ?? {}) };
    for (const [kind, on] of Object.entries(changes) as Array<[NotifyKind, boolean | undefined]>) {
      const info = INFO.get(kind);
      if (info && info.roles.includes(m.role) && typeof on === 'boolean') next[kind] = on;
    }
    await tx
      .update(memberships)
      .set({ notifyPrefs: next })
      .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, userId)));
    return effectivePrefs(m.role, next);
  });
}

export interface Member {
  id: number;
  email: string;
  name: string;
  role: Role;
  prefs: NotifyPrefs;
}

/** Active members of a workspace with their effective preferences. */
export async function membersOf(db: Pick<Db, 'select'>, workspaceId: number): Promise<Member[]> {
  const rows = await db
    .select({ id: users.id, email: users.email, name: users.name, role: memberships.role, prefs: memberships.notifyPrefs })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.workspaceId, workspaceId), isNull(users.disabledAt)));
  return rows.map((r) => ({ id: r.id, email: r.email, name: r.name, role: r.role, prefs: effectivePrefs(r.role, r.prefs) }));
}

// ---------------------------------------------------------------------------------------
// Words and mail bodies

/** 'Tue 3 Dec 06:00' on the distillery's clock ('Wed 8 Jan 3000, 08:00' in another year): mail is read later, so always dated. */
export function mailWhen(date: Date, timeZone: string, now?: Date): string {
  return formatMoment(date, timeZone, { now, dated: true });
}

type MailParts = MailContent;
export type { MailParts };

const e = escapeHtml;

/** Plateau's small HTML shell for notices (plain paragraphs, one link to the board). */
export function noticeMail(subject: string, paragraphs: string[], link: { label: string; href: string } | null, footer: string): MailParts {
  const text = [...paragraphs, ...(link ? [`${link.label}: ${link.href}`] : []), '', footer].join('\n\n').replace(/\n\n\n+/g, '\n\n');
  const html = shell(
    subject,
    paragraphs.map((p) => `<span style="white-space:pre-line">${e(p)}</span>`),
    link ?? undefined,
    footer,
  );
  return { subject, text, html };
}

const prefsFooter = (workspaceName: string) =>
  `You get this because of your notification choices in ${workspaceName}. Change them at ${publicUrl('/settings/notifications')}`;

export interface RunWords {
  type: BoardRun['type'];
  stillName: string;
  startsAt: Date;
}

/** 'Stripping run on Wash Still 2 moved to Tue 3 Dec 06:00 (was Mon 2 Dec 07:00)'; the still is named again when it changed. */
export function movedSentence(before: RunWords, after: RunWords, timeZone: string): string {
  const label = RUN_TYPE_LABELS[after.type];
  if (before.stillName !== after.stillName) {
    return `${label} on ${before.stillName} moved to ${after.stillName}, ${mailWhen(after.startsAt, timeZone)} (was ${mailWhen(before.startsAt, timeZone)})`;
  }
  return `${label} on ${after.stillName} moved to ${mailWhen(after.startsAt, timeZone)} (was ${mailWhen(before.startsAt, timeZone)})`;
}

// ---------------------------------------------------------------------------------------
// Run changes

interface WorkspaceInfo {
  name: string;
  timeZone: string;
  atRiskThreshold: number;
}

async function workspaceInfo(db: Pick<Db, 'select'>, workspaceId: number): Promise<WorkspaceInfo> {
  const [w] = await db
    .select({ name: workspaces.name, timeZone: workspaces.timeZone, atRiskThreshold: workspaces.atRiskThreshold })
    .from(workspaces)
    .where(eq(workspaces.id, workspaceId))
    .limit(1);
  return w ?? { name: 'your distillery', timeZone: 'UTC', atRiskThreshold: 0.8 };
}

async function stillNames(db: Pick<Db, 'select'>, workspaceId: number, ids: number[]): Promise<Map<number, string>> {
  if (!ids.length) return new Map();
  const rows = await db
    .select({ id: stills.id, name: stills.name })
    .from(stills)
    .where(and(eq(stills.workspaceId, workspaceId), inArray(stills.id, [...new Set(ids)])));
  return new Map(rows.map((r) => [r.id, r.name]));
}

/**
 * Called by the runs service inside the transaction of every run change. Enqueues the
 * mails the change calls for; they commit with the change or not at all.
 */
export async function notifyRunChanged(tx: Tx, change: RunChange): Promise<void> {
  const { before, after, actorId, workspaceId, kind } = change;
  if (kind === 'start' || kind === 'finish') return;
  const moved = before !== null && (before.stillId !== after.stillId || before.startsAt.getTime() !== after.startsAt.getTime());
  const cancelled = kind === 'cancel';
  const operatorChanged = (before?.operatorId ?? null) !== after.operatorId;
  const earlyCheck = after.status === 'planned' || after.status === 'confirmed';
  if (!moved && !cancelled && !operatorChanged && !earlyCheck) return;

  const ws = await workspaceInfo(tx, workspaceId);
  const members = await membersOf(tx, workspaceId);
  const byId = new Map(members.map((m) => [m.id, m]));
  const names = await stillNames(tx, workspaceId, [after.stillId, ...(before ? [before.stillId] : [])]);
  const actor = byId.get(actorId)?.name ?? 'Someone';
  const afterWords: RunWords = { type: after.type, stillName: names.get(after.stillId) ?? 'a still', startsAt: after.startsAt };
  const beforeWords: RunWords | null = before ? { type: before.type, stillName: names.get(before.stillId) ?? 'a still', startsAt: before.startsAt } : null;
  const link = { label: 'Open the run', href: publicUrl(`/runs/${after.id}`) };
  const label = RUN_TYPE_LABELS[after.type];
  const at = `${afterWords.stillName}, ${mailWhen(after.startsAt, ws.timeZone)}–${wallClock(after.endsAt, ws.timeZone).hm}`;

  if (moved || cancelled || operatorChanged) {
    const oldOp = before?.operatorId ?? null;
    const newOp = after.operatorId;
    const recipients = new Map<number, Member>();
    for (const id of [oldOp, newOp]) {
      const m = id !== null ? byId.get(id) : undefined;
      if (m) recipients.set(m.id, m);
    }
    // Planners hear of every move and cancellation, and of a run handed over.
    if (kind !== 'create') for (const m of members) if (m.role === 'planner') recipients.set(m.id, m);
    recipients.delete(actorId);
    for (const m of recipients.values()) {
      if (!m.prefs.run_changes) continue;
      const lines: string[] = [];
      let subject: string;
      if (cancelled) {
        subject = `${label} on ${afterWords.stillName}, ${mailWhen(after.startsAt, ws.timeZone)}, was cancelled`;
        lines.push(`${actor} cancelled the ${label.toLowerCase()} on ${at}.`);
        if (m.id === oldOp) lines.push('You were down to operate it; that time is free again.');
      } else if (moved && beforeWords) {
        subject = movedSentence(beforeWords, afterWords, ws.timeZone);
        lines.push(`${subject}.`, `Moved by ${actor}. It now runs ${at}.`);
      } else if (m.id === newOp) {
        subject = `You are operating the ${label.toLowerCase()} on ${afterWords.stillName}, ${mailWhen(after.startsAt, ws.timeZone)}`;
        lines.push(`${actor} put you down to operate the ${label.toLowerCase()} on ${at}.`);
      } else if (m.id === oldOp) {
        subject = `You are no longer operating the ${label.toLowerCase()} on ${afterWords.stillName}, ${mailWhen(after.startsAt, ws.timeZone)}`;
        lines.push(`${actor} took you off the ${label.toLowerCase()} on ${at}.`);
      } else {
        const who = newOp !== null ? (byId.get(newOp)?.name ?? 'someone') : 'nobody yet';
        subject = `${label} on ${afterWords.stillName}, ${mailWhen(after.startsAt, ws.timeZone)}: operator is now ${who}`;
        lines.push(`${actor} changed who operates the ${label.toLowerCase()} on ${at}: now ${who}.`);
      }
      if (!cancelled && operatorChanged && moved) {
        if (m.id === newOp) lines.push('You are now its operator.');
        else if (m.id === oldOp) lines.push('You are no longer its operator.');
      }
      if (!cancelled && after.type !== 'cleaning' && after.type !== 'maintenance') lines.push('Never leave a running still unattended.');
      const mail = noticeMail(subject, lines, link, prefsFooter(ws.name));
      await enqueue(tx, { workspaceId, kind: cancelled ? 'run_cancelled' : moved ? 'run_moved' : 'run_assigned', to: m.email, ...mail });
    }
  }

  if (earlyCheck && after.ferments.length) await notifyBookedEarly(tx, change, ws, members, afterWords, link);
}

/**
 * Planners hear when a run is now booked before a linked wash is likely ready: at risk by
 * the one test (it starts before the distillery's threshold quantile of the wash's ready
 * time), and it was not at risk for that wash before the change. Stalled and souring washes
 * have their own notice.
 */
async function notifyBookedEarly(
  tx: Tx,
  change: RunChange,
  ws: WorkspaceInfo,
  members: Member[],
  words: RunWords,
  link: { label: string; href: string },
): Promise<void> {
  const { before, after, actorId, workspaceId } = change;
  const ids = after.ferments.map((c) => c.fermentId);
  const rows = await tx
    .select({
      fermentId: fermentForecasts.fermentId,
      status: fermentForecasts.status,
      readyAt: fermentForecasts.readyAt,
      readyP10: fermentForecasts.readyP10,
      readyP90: fermentForecasts.readyP90,
      ruleMetAt: fermentForecasts.ruleMetAt,
      code: ferments.code,
    })
    .from(fermentForecasts)
    .innerJoin(ferments, eq(ferments.id, fermentForecasts.fermentId))
    .where(and(eq(fermentForecasts.workspaceId, workspaceId), inArray(fermentForecasts.fermentId, ids), isNull(ferments.emptiedAt)));
  const threshold = ws.atRiskThreshold;
  const state = (r: (typeof rows)[number]): Parameters<typeof fermentRisk>[1] => ({
    id: r.fermentId,
    status: r.status as FermentState['status'],
    emptiedAt: null,
    confirmedAt: r.status === 'finished' ? r.ruleMetAt : null,
    readyAt: r.readyAt,
    readyP10: r.readyP10,
    readyP90: r.readyP90,
  });
  const wasAtRisk = (r: (typeof rows)[number]) =>
    before !== null &&
    (before.status === 'planned' || before.status === 'confirmed') &&
    before.ferments.some((c) => c.fermentId === r.fermentId) &&
    isAtRisk(fermentRisk(before.startsAt, state(r), threshold));
  const early = rows
    .map((r) => ({ r, risk: fermentRisk(after.startsAt, state(r), threshold) }))
    .filter(({ r, risk }) => (risk === 'early' || risk === 'at_risk') && !wasAtRisk(r));
  if (!early.length) return;
  const label = RUN_TYPE_LABELS[after.type];
  const actor = members.find((m) => m.id === actorId)?.name ?? 'Someone';
  const pct = Math.round(threshold * 100);
  const subject = `${label} on ${words.stillName}, ${mailWhen(after.startsAt, ws.timeZone)}, booked before its wash is likely ready`;
  const lines = [
    `${actor} ${change.kind === 'create' ? 'booked' : 'moved'} the ${label.toLowerCase()} on ${words.stillName} to start ${mailWhen(after.startsAt, ws.timeZone)}.`,
    ...early.map(({ r, risk }) => {
      const window = formatReadyWindow(r, ws.timeZone, new Date()) ?? 'no window yet';
      const safe = readyQuantile(r, threshold);
      const when = safe ? ` It is ${pct} % likely to be confirmed by ${mailWhen(safe, ws.timeZone)}.` : '';
      return risk === 'early'
        ? `Wash ${r.code} will very likely still be fermenting then (${window}).${when}`
        : `Wash ${r.code} is less than ${pct} % likely to be confirmed stable by then (${window}).${when}`;
    }),
    'Check the readings, or move the run to when its wash is likely ready.',
  ];
  const mail = noticeMail(subject, lines, link, prefsFooter(ws.name));
  for (const m of members) {
    if (m.id === actorId || !m.prefs.run_early || (m.role !== 'planner' && m.role !== 'manager')) continue;
    await enqueue(tx, { workspaceId, kind: 'run_early', to: m.email, ...mail });
  }
}

// ---------------------------------------------------------------------------------------
// Ferment status

/** MariaDB duplicate key, or a Galera certification failure on the claim. */
export function isClaimTaken(err: unknown): boolean {
  let x: unknown = err;
  for (let depth = 0; x && depth < 5; depth++) {
    const errno = (x as { errno?: number }).errno;
    const code = (x as { code?: string }).code;
    if (errno === 1062 || code === 'ER_DUP_ENTRY' || errno === 1213 || code === 'ER_LOCK_DEADLOCK') return true;
    x = (x as { cause?: unknown }).cause;
  }
  return false;
}

/** Insert a once-only claim inside `tx`; false when another instance (or an earlier call) holds it. */
export async function claimOnce(tx: Pick<Db, 'insert'>, workspaceId: number, job: string, jobKey: string): Promise<boolean> {
  try {
    await tx.insert(jobClaims).values({ workspaceId, job, jobKey, claimedBy: `${env().PLATEAU_INSTANCE}-${process.pid}` });
    return true;
  } catch (err) {
    if (isClaimTaken(err)) return false;
    throw err;
  }
}

export interface FermentStatusChange {
  workspaceId: number;
  fermentId: number;
  before: string | null;
  after: string;
}

/**
 * Called where a ferment's forecast is recomputed. When the status has just turned
 * stalled or souring, tells the managers and planners (once per ferment, status and local
 * day, whichever instance noticed first), naming the runs it puts at risk. Never throws:
 * a failed notice must not break the forecast.
 */
export async function notifyFermentStatusChange(db: Pick<Db, 'transaction'>, change: FermentStatusChange): Promise<boolean> {
  const { workspaceId, fermentId, before, after } = change;
  if (after !== 'stalled' && after !== 'souring') return false;
  if (before === after) return false;
  try {
    return await db.transaction(async (tx) => {
      const ws = await workspaceInfo(tx, workspaceId);
      const day = wallClock(new Date(), ws.timeZone).ymd;
      const [f] = await tx
        .select({ code: ferments.code, emptiedAt: ferments.emptiedAt })
        .from(ferments)
        .where(and(eq(ferments.id, fermentId), eq(ferments.workspaceId, workspaceId)))
        .limit(1);
      // An emptied ferment's forecast is frozen history: nothing to act on.
      if (!f || f.emptiedAt) return false;
      // The claim commits with the mails: a second instance's insert fails and sends nothing.
      if (!(await claimOnce(tx, workspaceId, `ferment_${after}`, `${fermentId}:${day}`))) return false;
      const now = new Date();
      const atRisk = await selectRuns(tx, workspaceId, {
        takingFerment: fermentId,
        where: inArray(runs.status, ['planned', 'confirmed']),
        extra: { stillName },
      });
      const upcoming = atRisk.filter((r) => r.startsAt.getTime() > now.getTime()).sort((a, b) => a.startsAt.getTime() - b.startsAt.getTime());
      const subject = after === 'stalled' ? `Wash ${f.code} has stalled` : `Wash ${f.code} shows signs of souring`;
      const lines = [
        after === 'stalled'
          ? `The readings of wash ${f.code} have stopped falling above its finishing range: it is stuck, not finished. Check temperature, yeast health and nutrients before it goes anywhere near a still.`
          : `The readings of wash ${f.code} point to souring (gravity below the normal range, or a falling pH). Taste and smell it, and check pH, before it goes to a still.`,
        upcoming.length
          ? `Runs it is booked into:\n${upcoming.map((r) => `- ${RUN_TYPE_LABELS[r.type]} on ${r.stillName}, ${mailWhen(r.startsAt, ws.timeZone)}`).join('\n')}`
          : 'It is not booked into any run yet.',
      ];
      const mail = noticeMail(subject, lines, { label: 'Open the ferment', href: publicUrl(`/ferments/${fermentId}`) }, prefsFooter(ws.name));
      for (const m of await membersOf(tx, workspaceId)) {
        if (!m.prefs.ferment_trouble) continue;
        await enqueue(tx, { workspaceId, kind: `ferment_${after}`, to: m.email, ...mail });
      }
      return true;
    });
  } catch (err) {
    console.error('[plateau] ferment notice failed:', err instanceof Error ? err.message : String(err));
    return false;
  }
}
