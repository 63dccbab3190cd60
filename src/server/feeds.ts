/**
 * Calendar feeds: a read-only capability URL per feed (whole distillery, one still, or the
 * runs one person operates). The token is 256 bits from the CSPRNG, shown once, stored
 * only as its SHA-256, and never logged. Events cover 30 days back to 180 days ahead;
 * STATUS carries the forecast (TENTATIVE until every linked wash is confirmed stable).
 */
import { createHash } from 'node:crypto';
import { and, desc, eq, inArray, isNotNull, isNull, lt, ne, or, sql, type SQL } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { z } from 'zod';
import { getDb } from '../db/client';
import { calendarFeeds, ferments, memberships, readings, runs, stills, users, workspaces } from '../db/schema';
import { toScheduleStill } from '../lib/board';
import { describeRunEvent, runEventStatus, runEventTitle, uidForRun, type EventStatus, type FeedEvent } from '../lib/calendar';
import { actualSpan, computeRunWarnings, runChargeLitres, timingWords, type FermentState, type Run, type RunStatus, type RunType } from '../lib/schedule';
import { env, publicUrl } from '../config';
import { audit } from './audit';
import { ACTIONS, can } from './authz';
import { getForecasts } from './forecasts';
import { notFound, invalid, HttpError } from './http';
import { hashToken, newToken } from './auth/tokens';
import { listStills } from './stills';
import { systemCtx, type Ctx } from './context';
import { toSettings } from './workspaces';
import { FEED_SCOPES, type FeedScope, type Role } from '../lib/vocabulary';
import { SnapshotCache } from './snapshot-cache';
import { selectRuns } from './run-query';
import { buildFeedWithStore } from './feed-blocks';

const DAY_MS = 86_400_000;
export const FEED_DAYS_BACK = 30;
export const FEED_DAYS_AHEAD = 180;
/** Active feeds one person may hold in one distillery. */
export const MAX_FEEDS_PER_PERSON = 20;
/** last_fetched_at is written at most this often per feed. */
const FETCH_STAMP_EVERY_MS = 5 * 60_000;
/** A token as newToken() makes it: 32 bytes, base64url. */
const TOKEN_SHAPE = /^[A-Za-z0-9_-]{43}$/;

export type { FeedScope } from '../lib/vocabulary';

export const createFeedSchema = z.object({
  scope: z.enum(FEED_SCOPES),
  stillId: z.number().int().positive().optional(),
  personId: z.number().int().positive().optional(),
  name: z.string().trim().min(1, 'Give the feed a name.').max(120).optional(),
});
export type CreateFeedInput = z.infer<typeof createFeedSchema>;

export interface FeedListRow {
  id: number;
  name: string;
  scope: FeedScope;
  stillId: number | null;
  stillName: string | null;
  personId: number | null;
  personName: string | null;
  createdAt: Date;
  createdById: number | null;
  createdByName: string | null;
  /** The creator's current role here, or null once they have left the distillery. */
  createdByRole: Role | null;
  lastFetchedAt: Date | null;
  /** False when the token no longer opens the feed (see feedIsLive); the row stays until revoked. */
  live: boolean;
  /** Why a feed that is not live stopped working, in the product's words. */
  stoppedBecause: string | null;
}

/** The feeds of one holder (the person who created them), for the manager's list. */
export interface FeedGroup {
  holderId: number | null;
  holderName: string;
  /** Null once the holder has left the distillery. */
  holderRole: Role | null;
  feeds: FeedListRow[];
}

/** The subscription URLs for a token: https (or http in development) and webcal. */
export function feedUrls(token: string): { url: string; webcal: string } {
  const url = publicUrl(`/api/feeds/${token}.ics`);
  return { url, webcal: url.replace(/^https?:\/\//, 'webcal://') };
}

// The holder of a feed is its creator; for a person feed, the subject is the person whose runs it shows.
const holderMember = alias(memberships, 'holder_member');
const holderUser = alias(users, 'holder_user');
const subjectMember = alias(memberships, 'subject_member');
const subjectUser = alias(users, 'subject_user');
const FEED_HOLDER_ROLES = ACTIONS['feeds.own'] as readonly Role[];
const FEED_MANAGER_ROLES = ACTIONS['feeds.manage'] as readonly Role[];

/**
 * True while a feed's token may open it. The rule the creation gate applies, re-checked against
 * who the holder is now: the holder is still a member of the feed's distillery, not disabled,
 * and their current role may hold feeds (feeds.own); a feed of someone else's runs also needs
 * feeds.manage, and that person must still be a member here. Reads the four joins below.
 */
const feedIsLive = (): SQL =>
  and(
    isNull(calendarFeeds.revokedAt),
    isNotNull(holderMember.userId),
    isNull(holderUser.disabledAt),
    inArray(holderMember.role, [...FEED_HOLDER_ROLES]),
    or(ne(calendarFeeds.scope, 'still'), isNotNull(calendarFeeds.stillId)),
    or(
      ne(calendarFeeds.scope, 'person'),
      and(
        isNotNull(subjectMember.userId),
        isNull(subjectUser.disabledAt),
        or(eq(calendarFeeds.personId, calendarFeeds.createdBy), inArray(holderMember.role, [...FEED_MANAGER_ROLES])),
      ),
    ),
  )!;

// The joins feedIsLive() reads, each on a unique key: the holder's and the subject's membership and account.
const HOLDER_MEMBER_ON = and(eq(holderMember.workspaceId, calendarFeeds.workspaceId), eq(holderMember.userId, calendarFeeds.createdBy));
const HOLDER_USER_ON = eq(holderUser.id, calendarFeeds.createdBy);
const SUBJECT_MEMBER_ON = and(eq(subjectMember.workspaceId, calendarFeeds.workspaceId), eq(subjectMember.userId, calendarFeeds.personId));
const SUBJECT_USER_ON = eq(subjectUser.id, calendarFeeds.personId);

interface StopFacts {
  scope: FeedScope;
  personId: number | null;
  createdById: number | null;
  createdByName: string | null;
  createdByRole: Role | null;
  holderDisabled: boolean;
  personName: string | null;
  personMember: boolean;
  personDisabled: boolean;
}

/** Explains (never decides) why feedIsLive() is false for a row. */
function stopReason(f: StopFacts): string {
  const holder = f.createdByName ?? 'Its creator';
  if (f.createdById === null) return "Its creator's account was deleted.";
  if (f.createdByRole === null) return `${holder} is no longer a member of this distillery.`;
  if (f.holderDisabled) return `${holder}'s account is disabled.`;
  if (!FEED_HOLDER_ROLES.includes(f.createdByRole)) return `${holder}'s role (${f.createdByRole}) may not hold calendar feeds.`;
  if (f.scope === 'person') {
    const subject = f.personName ?? 'The person it follows';
    if (!f.personMember) return `${subject} is no longer a member of this distillery.`;
    if (f.personDisabled) return `${subject}'s account is disabled.`;
    if (f.personId !== f.createdById && !FEED_MANAGER_ROLES.includes(f.createdByRole)) {
      return `${holder}'s role (${f.createdByRole}) may follow only their own runs.`;
    }
  }
  return 'It no longer opens.';
}

/**
 * Feeds this person may see, never a token: their own; a manager sees every feed of the
 * distillery, including those of people who have left (dead until revoked, shown as such).
 */
export async function listFeeds(ctx: Ctx, only?: { id: number }): Promise<FeedListRow[]> {
  const { ws, actor } = ctx;
  const db = getDb();
  const rows = await db
    .select({
      id: calendarFeeds.id,
      name: calendarFeeds.name,
      scope: calendarFeeds.scope,
      stillId: calendarFeeds.stillId,
      stillName: stills.name,
      personId: calendarFeeds.personId,
      personName: subjectUser.name,
      personMember: subjectMember.userId,
      personDisabledAt: subjectUser.disabledAt,
      createdAt: calendarFeeds.createdAt,
      createdById: calendarFeeds.createdBy,
      createdByName: holderUser.name,
      createdByRole: holderMember.role,
      holderDisabledAt: holderUser.disabledAt,
      lastFetchedAt: calendarFeeds.lastFetchedAt,
      live: sql<number | string>`(${feedIsLive()})`,
    })
    .from(calendarFeeds)
    .leftJoin(holderMember, HOLDER_MEMBER_ON)
    .leftJoin(holderUser, HOLDER_USER_ON)
    .leftJoin(subjectMember, SUBJECT_MEMBER_ON)
    .leftJoin(subjectUser, SUBJECT_USER_ON)
    .leftJoin(stills, and(eq(stills.id, calendarFeeds.stillId), eq(stills.workspaceId, calendarFeeds.workspaceId)))
    .where(
      and(
        eq(calendarFeeds.workspaceId, ws.id),
        isNull(calendarFeeds.revokedAt),
        can(actor.role, 'feeds.manage') ? undefined : eq(calendarFeeds.createdBy, actor.userId),
        only ? eq(calendarFeeds.id, only.id) : undefined,
      ),
    )
    .orderBy(desc(calendarFeeds.createdAt), desc(calendarFeeds.id));
  return rows.map((r) => {
    const live = Number(r.live) === 1;
    const row: FeedListRow = {
      id: r.id,
      name: r.name,
      scope: r.scope,
      stillId: r.stillId,
      stillName: r.stillName ?? null,
      personId: r.personId,
      personName: r.personName ?? null,
      createdAt: r.createdAt,
      createdById: r.createdById,
      createdByName: r.createdByName ?? null,
      createdByRole: r.createdByRole ?? null,
      lastFetchedAt: r.lastFetchedAt,
      live,
      stoppedBecause: null,
    };
    if (!live) {
      row.stoppedBecause = stopReason({
        ...row,
        holderDisabled: r.holderDisabledAt != null,
        personMember: r.personMember != null,
        personDisabled: r.personDisabledAt != null,
      });
    }
    return row;
  });
}

/** Group feeds by holder: current members by name, then people who have left, then deleted accounts. */
export function groupFeedsByHolder(feeds: FeedListRow[]): FeedGroup[] {
  const groups = new Map<string, FeedGroup>();
  for (const f of feeds) {
    const key = f.createdById === null ? 'none' : String(f.createdById);
    let g = groups.get(key);
    if (!g) {
      g = { holderId: f.createdById, holderName: f.createdByName ?? 'Deleted account', holderRole: f.createdByRole, feeds: [] };
      groups.set(key, g);
    }
    g.feeds.push(f);
  }
  const rank = (g: FeedGroup) => (g.holderId === null ? 2 : g.holderRole === null ? 1 : 0);
  return [...groups.values()].sort((a, b) => rank(a) - rank(b) || a.holderName.localeCompare(b.holderName, 'en') || (a.holderId ?? 0) - (b.holderId ?? 0));
}

export function feedJson(f: FeedListRow) {
  return {
    id: f.id,
    name: f.name,
    scope: f.scope,
    stillId: f.stillId,
    stillName: f.stillName,
    personId: f.personId,
    personName: f.personName,
    createdAt: f.createdAt.toISOString(),
    createdById: f.createdById,
    createdByName: f.createdByName,
    createdByRole: f.createdByRole,
    lastFetchedAt: f.lastFetchedAt ? f.lastFetchedAt.toISOString() : null,
    live: f.live,
    stoppedBecause: f.stoppedBecause,
  };
}

export function feedGroupJson(g: FeedGroup) {
  return { holderId: g.holderId, holderName: g.holderName, holderRole: g.holderRole, feeds: g.feeds.map(feedJson) };
}

/** Create a feed; the plain token is returned this once and never stored. */
export async function createFeed(ctx: Ctx, input: CreateFeedInput): Promise<{ feed: FeedListRow; token: string; url: string; webcal: string }> {
  const { ws, actor } = ctx;
  const db = getDb();
  let stillId: number | null = null;
  let personId: number | null = null;
  let defaultName = 'Whole distillery';
  if (input.scope === 'still') {
    if (!input.stillId) throw invalid('stillId', 'Choose a still.');
    const [s] = await db
      .select({ id: stills.id, name: stills.name })
      .from(stills)
      .where(and(eq(stills.id, input.stillId), eq(stills.workspaceId, ws.id)))
      .limit(1);
    if (!s) throw invalid('stillId', 'That still is not in this distillery.');
    stillId = s.id;
    defaultName = s.name;
  } else if (input.scope === 'person') {
    personId = input.personId ?? actor.userId;
    if (personId !== actor.userId && !can(actor.role, 'feeds.manage')) {
      throw new HttpError(403, 'forbidden', "You can subscribe to your own runs; a manager can make a feed of someone else's.");
    }
    const [m] = await db
      .select({ name: users.name })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(and(eq(memberships.workspaceId, ws.id), eq(memberships.userId, personId)))
      .limit(1);
    if (!m) throw invalid('personId', 'That person is not a member of this distillery.');
    defaultName = personId === actor.userId ? 'My runs' : `${m.name}'s runs`;
  }
  const [{ count }] = await db
    .select({ count: sql<number>`COUNT(*)` })
    .from(calendarFeeds)
    .where(and(eq(calendarFeeds.workspaceId, ws.id), eq(calendarFeeds.createdBy, actor.userId), isNull(calendarFeeds.revokedAt)));
  if (Number(count) >= MAX_FEEDS_PER_PERSON) {
    throw new HttpError(409, 'too_many', `You already have ${MAX_FEEDS_PER_PERSON} feeds here; revoke one you no longer use first.`);
  }
  const token = newToken();
  const name = input.name ?? defaultName;
  const id = await db.transaction(async (tx) => {
    const [row] = await tx
      .insert(calendarFeeds)
      .values({
        workspaceId: ws.id,
        scope: input.scope,
        stillId,
        personId,
        name,
        tokenHash: hashToken(token),
        createdBy: actor.userId,
      })
      .$returningId();
    await audit(
      {
        workspaceId: ws.id,
        userId: actor.userId,
        action: 'feed.create',
        entityType: 'calendar_feed',
        entityId: row!.id,
        details: { scope: input.scope, stillId, personId, name },
      },
      tx,
    );
    return row!.id;
  });
  const [feed] = await listFeeds({ ws, actor: { ...actor, role: 'manager' } }, { id });
  if (!feed) throw new HttpError(409, 'conflict', 'The feed was created but cannot be read back; reload the page.');
  return { feed, token, ...feedUrls(token) };
}

/** Revoke a feed: the creator, or a manager. Someone else's feed is "not found" (its existence is not revealed). */
export async function revokeFeed(ctx: Ctx, id: number): Promise<void> {
  const { ws, actor } = ctx;
  const db = getDb();
  const [row] = await db
    .select({ id: calendarFeeds.id, createdBy: calendarFeeds.createdBy })
    .from(calendarFeeds)
    .where(and(eq(calendarFeeds.id, id), eq(calendarFeeds.workspaceId, ws.id), isNull(calendarFeeds.revokedAt)))
    .limit(1);
  if (!row || (row.createdBy !== actor.userId && !can(actor.role, 'feeds.manage'))) throw notFound('No such feed.');
  await db.transaction(async (tx) => {
    await tx
      .update(calendarFeeds)
      .set({ revokedAt: new Date() })
      .where(and(eq(calendarFeeds.id, id), eq(calendarFeeds.workspaceId, ws.id)));
    await audit({ workspaceId: ws.id, userId: actor.userId, action: 'feed.revoke', entityType: 'calendar_feed', entityId: id }, tx);
  });
}

export interface FeedRecord {
  id: number;
  workspaceId: number;
  scope: FeedScope;
  stillId: number | null;
  personId: number | null;
  name: string;
  lastFetchedAt: Date | null;
}

/**
 * The live feed a token opens, or null: unknown, revoked, or its holder may no longer hold it
 * (left the distillery, disabled, or their current role does not allow it; see feedIsLive).
 * One query on unique keys: this is the hot path of every calendar poll.
 */
export async function feedForToken(token: string): Promise<FeedRecord | null> {
  if (!TOKEN_SHAPE.test(token)) return null;
  const [row] = await getDb()
    .select({
      id: calendarFeeds.id,
      workspaceId: calendarFeeds.workspaceId,
      scope: calendarFeeds.scope,
      stillId: calendarFeeds.stillId,
      personId: calendarFeeds.personId,
      name: calendarFeeds.name,
      lastFetchedAt: calendarFeeds.lastFetchedAt,
    })
    .from(calendarFeeds)
    .leftJoin(holderMember, HOLDER_MEMBER_ON)
    .leftJoin(holderUser, HOLDER_USER_ON)
    .leftJoin(subjectMember, SUBJECT_MEMBER_ON)
    .leftJoin(subjectUser, SUBJECT_USER_ON)
    .where(and(eq(calendarFeeds.tokenHash, hashToken(token)), feedIsLive()))
    .limit(1);
  return row ?? null;
}

/** Record the fetch, at most every few minutes per feed (a calendar app polls often). */
export async function stampFetched(feed: FeedRecord, now = new Date()): Promise<void> {
  if (feed.lastFetchedAt && now.getTime() - feed.lastFetchedAt.getTime() < FETCH_STAMP_EVERY_MS) return;
  await getDb()
    .update(calendarFeeds)
    .set({ lastFetchedAt: now })
    .where(
      and(
        eq(calendarFeeds.id, feed.id),
        or(isNull(calendarFeeds.lastFetchedAt), lt(calendarFeeds.lastFetchedAt, new Date(now.getTime() - FETCH_STAMP_EVERY_MS))),
      ),
    );
}

function uidHost(): string {
  try {
    const host = new URL(env().PUBLIC_URL).hostname;
    return /^[A-Za-z0-9.-]+$/.test(host) && !host.startsWith('.') && !host.endsWith('.') ? host : 'plateau.invalid';
  } catch {
    return 'plateau.invalid';
  }
}

const maxDate = (...ds: Array<Date | null | undefined>): Date | null => {
  let best: Date | null = null;
  for (const d of ds) if (d && (!best || d.getTime() > best.getTime())) best = d;
  return best;
};

export interface RenderedFeed {
  body: string;
  etag: string;
  lastModified: Date;
  eventCount: number;
}

interface LoadedRun extends Run {
  sequence: number;
  updatedAt: Date;
  startedAt?: Date | null;
  finishedAt?: Date | null;
}

/** Build the calendar of one feed. */
/** Rendered feeds, reused while the workspace is unchanged (at most 5 minutes: the window slides with time). */
const feedCache = new SnapshotCache<RenderedFeed>(5 * 60_000, 256);

/** The feed as served: from the cache while nothing in the workspace changed, else rendered anew. */
export function renderFeedCached(feed: FeedRecord, now = new Date()): Promise<RenderedFeed> {
  return feedCache.get(feed.workspaceId, `feed-${feed.id}`, now, () => renderFeed(feed, now));
}

export async function renderFeed(feed: FeedRecord, now = new Date()): Promise<RenderedFeed> {
  const db = getDb();
  const ws = feed.workspaceId;
  const from = new Date(now.getTime() - FEED_DAYS_BACK * DAY_MS);
  const to = new Date(now.getTime() + FEED_DAYS_AHEAD * DAY_MS);

  const [wsRow] = await db.select().from(workspaces).where(eq(workspaces.id, ws)).limit(1);
  if (!wsRow) throw notFound();
  const ctx = systemCtx(toSettings(wsRow)); // a feed is read by its token, for the workspace itself

  // Every run of the distillery in the window: warnings need the other stills' runs (operator
  // double-booked, spirit runs and their feeds) even when the feed shows one still or person.
  const runRows = await selectRuns(db, ws, { window: { from, to }, extra: { updatedAt: runs.updatedAt } });
  const byId = new Map<number, LoadedRun>(runRows.map((r) => [r.id, r]));

  // Feeding runs of spirit runs can sit outside the window: load them too (one level).
  const outside = [...new Set(runRows.flatMap((r) => r.feeds.map((l) => l.runId)).filter((id) => !byId.has(id)))];
  const extra = new Map<number, LoadedRun>((await selectRuns(db, ws, { ids: outside, extra: { updatedAt: runs.updatedAt } })).map((r) => [r.id, r]));
  const all = (id: number) => byId.get(id) ?? extra.get(id);

  const fermentIds = [...new Set([...byId.values(), ...extra.values()].flatMap((r) => r.ferments.map((c) => c.fermentId)))];
  const [fermentRows, forecasts, readingStamps, stillRows] = await Promise.all([
    fermentIds.length
      ? db
          .select({
            id: ferments.id,
            code: ferments.code,
            volumeLitres: ferments.volumeLitres,
            pitchedAt: ferments.pitchedAt,
            emptiedAt: ferments.emptiedAt,
            updatedAt: ferments.updatedAt,
          })
          .from(ferments)
          .where(and(eq(ferments.workspaceId, ws), inArray(ferments.id, fermentIds)))
      : [],
    getForecasts(ctx, fermentIds, now),
    fermentIds.length
      ? db
          .select({ fermentId: readings.fermentId, at: sql<Date | string>`MAX(${readings.updatedAt})` })
          .from(readings)
          .where(and(eq(readings.workspaceId, ws), inArray(readings.fermentId, fermentIds)))
          .groupBy(readings.fermentId)
      : [],
    listStills(ctx, { includeInactive: true }),
  ]);
  const fermentChanged = new Map<number, Date>();
  for (const f of fermentRows) fermentChanged.set(f.id, f.updatedAt);
  for (const r of readingStamps) {
    const at = r.at instanceof Date ? r.at : new Date(`${String(r.at).replace(' ', 'T')}Z`);
    fermentChanged.set(r.fermentId, maxDate(fermentChanged.get(r.fermentId), at)!);
  }
  const states = new Map<number, FermentState>();
  for (const f of fermentRows) {
    const fc = forecasts.get(f.id);
    const status = fc?.status ?? 'insufficient_data';
    states.set(f.id, {
      id: f.id,
      code: f.code,
      volumeLitres: f.volumeLitres,
      pitchedAt: f.pitchedAt,
      emptiedAt: f.emptiedAt,
      status,
      readyAt: fc?.readyAt ?? null,
      readyP10: fc?.readyP10 ?? null,
      readyP90: fc?.readyP90 ?? null,
      confirmedAt: status === 'finished' ? (fc?.ruleMetAt ?? null) : null,
    });
  }
  const stillById = new Map(stillRows.map((s) => [s.id, s]));

  // Operators' names.
  const operatorIds = [...new Set(runRows.map((r) => r.operatorId).filter((v): v is number => v !== null))];
  const people = operatorIds.length ? await db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, operatorIds)) : [];
  const personName = new Map(people.map((p) => [p.id, p.name]));

  // Event status: ferment-charged runs first, then spirit runs from their feeds (memoised, cycle-safe).
  const statusMemo = new Map<number, EventStatus>();
  const eventStatus = (run: LoadedRun, depth = 0): EventStatus => {
    const known = statusMemo.get(run.id);
    if (known) return known;
    const feeds =
      depth > 3
        ? []
        : run.feeds.map((f) => {
            const feedRun = all(f.runId);
            return feedRun ? { runStatus: feedRun.status as RunStatus, eventStatus: eventStatus(feedRun, depth + 1) } : { runStatus: 'cancelled' as RunStatus };
          });
    const status = runEventStatus({
      runType: run.type as RunType,
      runStatus: run.status as RunStatus,
      ferments: run.ferments.map((c) => states.get(c.fermentId) ?? { status: 'insufficient_data' as const, confirmedAt: null }),
      feeds,
    });
    statusMemo.set(run.id, status);
    return status;
  };
  const changedAt = (run: LoadedRun, depth = 0): Date => {
    let at = maxDate(run.updatedAt, ...run.ferments.map((c) => fermentChanged.get(c.fermentId)))!;
    if (depth < 3)
      for (const f of run.feeds) {
        const feedRun = all(f.runId);
        if (feedRun) at = maxDate(at, changedAt(feedRun, depth + 1))!;
      }
    return at;
  };

  const scheduleRuns = [...byId.values()];
  const inScope = scheduleRuns.filter(
    (r) => feed.scope === 'workspace' || (feed.scope === 'still' && r.stillId === feed.stillId) || (feed.scope === 'person' && r.operatorId === feed.personId),
  );
  inScope.sort((a, b) => a.startsAt.getTime() - b.startsAt.getTime() || a.id - b.id);

  const host = uidHost();
  const events: FeedEvent[] = [];
  let lastModified = maxDate(wsRow.updatedAt, new Date(0))!;
  for (const run of inScope) {
    const still = stillById.get(run.stillId);
    const stillName = still?.name ?? 'a retired still';
    // Warnings matter while a run is still to come; a run under way or done keeps its record only.
    const warnings =
      still && (run.status === 'planned' || run.status === 'confirmed')
        ? computeRunWarnings(run, {
            still: toScheduleStill(still),
            runs: scheduleRuns,
            ferments: states,
            timeZone: wsRow.timeZone,
            now,
            atRiskThreshold: wsRow.atRiskThreshold,
          })
        : [];
    const url = publicUrl(`/runs/${run.id}`);
    const modified = changedAt(run);
    lastModified = maxDate(lastModified, modified)!;
    // A started or done run sits at its actual times (a running one until its booked end, or its start when it overran).
    const span = actualSpan(run);
    events.push({
      uid: uidForRun(run.id, ws, host),
      start: span.start,
      // DTEND must come after DTSTART in whole seconds (RFC 5545 §3.8.2.2): a run finished within seconds is shown a minute long.
      end: Math.floor(span.end.getTime() / 1000) > Math.floor(span.start.getTime() / 1000) ? span.end : new Date(span.start.getTime() + 60_000),
      title: runEventTitle(run.type as RunType, stillName),
      description: describeRunEvent({
        runType: run.type as RunType,
        stillName,
        ferments: run.ferments.map((c) => ({
          ...(states.get(c.fermentId) ?? {
            code: `#${c.fermentId}`,
            status: 'insufficient_data' as const,
            readyAt: null,
            readyP10: null,
            readyP90: null,
            confirmedAt: null,
            emptiedAt: null,
          }),
          litres: c.litres,
        })),
        chargeLitres: runChargeLitres(run),
        operatorName: run.operatorId !== null ? (personName.get(run.operatorId) ?? null) : null,
        warnings,
        url,
        timeZone: wsRow.timeZone,
        actual: timingWords(run) ? { words: timingWords(run), bookedStart: run.startsAt, bookedEnd: run.endsAt } : undefined,
      }),
      location: stillName,
      url,
      status: eventStatus(run),
      sequence: run.sequence,
      lastModified: modified,
    });
  }

  const { body } = await buildFeedWithStore(ws, { name: `${wsRow.name} · ${feed.name}`, events, now });
  const etag = `"${createHash('sha256').update(body).digest('base64url').slice(0, 32)}"`;
  // HTTP dates have whole seconds.
  const lm = new Date(Math.floor(lastModified.getTime() / 1000) * 1000);
  return { body, etag, lastModified: lm, eventCount: events.length };
}

/** True when the client's copy is current (If-None-Match wins over If-Modified-Since, RFC 9110 §13.2.2). */
export function notModified(headers: Headers, etag: string, lastModified: Date): boolean {
  const inm = headers.get('if-none-match');
  if (inm !== null) {
    if (inm.trim() === '*') return true;
    return inm
      .split(',')
      .map((t) => t.trim().replace(/^W\//, ''))
      .includes(etag);
  }
  const ims = headers.get('if-modified-since');
  if (ims !== null) {
    const t = Date.parse(ims);
    return Number.isFinite(t) && lastModified.getTime() <= t;
  }
  return false;
}
