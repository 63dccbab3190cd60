import { sql } from 'drizzle-orm';
import { getDb } from '../db/client';
import { env } from '../config';

const HOUR_MS = 3_600_000;

/**
 * A fingerprint of what the board and the calendar feeds are made of in one workspace: the
 * latest change and the count of runs, stills, closures, ferments, forecasts, fermenters,
 * members and people. Every write to those tables moves it (rows are only ever updated with a
 * new updated_at, or inserted/deleted, which moves a count).
 */
export async function workspaceFingerprint(workspaceId: number): Promise<string> {
  const w = workspaceId;
  const [rows] = (await getDb().execute(sql`SELECT
    (SELECT CONCAT(COUNT(*), '/', COALESCE(SUM(version), 0), '/', COALESCE(MAX(updated_at), '')) FROM runs WHERE workspace_id = ${w}) AS r,
    (SELECT CONCAT(COUNT(*), '/', COALESCE(MAX(updated_at), '')) FROM stills WHERE workspace_id = ${w}) AS s,
    (SELECT CONCAT(COUNT(*), '/', COALESCE(MAX(updated_at), '')) FROM still_closures WHERE workspace_id = ${w}) AS c,
    (SELECT CONCAT(COUNT(*), '/', COALESCE(MAX(updated_at), '')) FROM ferments WHERE workspace_id = ${w}) AS f,
    (SELECT CONCAT(COUNT(*), '/', COALESCE(MAX(computed_at), '')) FROM ferment_forecasts WHERE workspace_id = ${w}) AS p,
    (SELECT CONCAT(COUNT(*), '/', COALESCE(MAX(updated_at), '')) FROM fermenters WHERE workspace_id = ${w}) AS v,
    (SELECT CONCAT(COUNT(*), '/', COALESCE(MAX(u.updated_at), '')) FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.workspace_id = ${w}) AS m,
    (SELECT CONCAT(updated_at, '') FROM workspaces WHERE id = ${w}) AS w`)) as unknown as [Array<Record<string, unknown>>];
  return JSON.stringify(rows[0] ?? {});
}

/**
 * How long a fingerprint read is trusted without asking the database again. Within one server
 * process every state-changing API request forgets all fingerprints as it completes (see
 * `forgetFingerprints`, called by the middleware), so a person always sees their own change at
 * once; a change made through another instance, or by a background job, shows within this time.
 */
export const FINGERPRINT_TTL_MS = env().PLATEAU_FINGERPRINT_TTL_MS;

const fingerprints = new Map<number, { value: string; at: number }>();
let epoch = 0;

/** Forget every remembered fingerprint: something may have changed. */
export function forgetFingerprints(): void {
  epoch++;
  fingerprints.clear();
}

/** The workspace's fingerprint, read at most once per FINGERPRINT_TTL_MS between changes. */
export async function currentFingerprint(workspaceId: number, nowMs = Date.now()): Promise<string> {
  const hit = fingerprints.get(workspaceId);
  if (hit && nowMs - hit.at < FINGERPRINT_TTL_MS) return hit.value;
  return freshFingerprint(workspaceId, nowMs);
}

async function freshFingerprint(workspaceId: number, nowMs = Date.now()): Promise<string> {
  const startedIn = epoch;
  const value = await workspaceFingerprint(workspaceId);
  // A change that completed while the query ran may not be in it: do not remember it then.
  if (startedIn === epoch) {
    if (fingerprints.size > 1000) fingerprints.clear();
    fingerprints.set(workspaceId, { value, at: nowMs });
  }
  return value;
}

/**
 * Values built from a workspace's state, reused while its fingerprint is unchanged, within the
 * same hour (forecast statuses move with time alone) and for at most `maxAgeMs`. A value is
 * only kept when the fingerprint did not move while it was being built. Concurrent requests
 * for the same missing value share one build.
 */
export class SnapshotCache<T> {
  private entries = new Map<string, { fingerprint: string; at: number; hour: number; value: T }>();
  private building = new Map<string, Promise<T>>();
  constructor(
    private maxAgeMs: number,
    private maxEntries = 64,
  ) {}

  /** `fresh`: read the fingerprint now rather than trust a recent read (the client just changed something). */
  async get(workspaceId: number, key: string, now: Date, build: () => Promise<T>, opts: { fresh?: boolean } = {}): Promise<T> {
    const fingerprint = opts.fresh ? await freshFingerprint(workspaceId, now.getTime()) : await currentFingerprint(workspaceId, now.getTime());
    const hour = Math.floor(now.getTime() / HOUR_MS);
    const hit = this.entries.get(key);
    if (hit && hit.fingerprint === fingerprint && hit.hour === hour && now.getTime() - hit.at < this.maxAgeMs) return hit.value;
    const flightKey = `${key}|${fingerprint}|${hour}`;
    const inFlight = this.building.get(flightKey);
    if (inFlight) return inFlight;
    const job = (async () => {
      const value = await build();
      if ((await freshFingerprint(workspaceId)) === fingerprint) {
        this.entries.delete(key);
        if (this.entries.size >= this.maxEntries) this.entries.delete(this.entries.keys().next().value!);
        this.entries.set(key, { fingerprint, at: now.getTime(), hour, value });
      }
      return value;
    })();
    this.building.set(flightKey, job);
    try {
      return await job;
    } finally {
      this.building.delete(flightKey);
    }
  }
}
