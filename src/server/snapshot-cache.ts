import { sql } from 'drizzle-orm';
import { getDb } from '../db/client';

const HOUR_MS = 3_600_000;

/**
 * A fingerprint of what the board and the calendar feeds are made of in one workspace: the
 * latest change and the count of runs, stills, closures, ferments, forecasts, fermenters,
 * members and people. Every write to those tables moves it (rows are only ever updated with a
 * new updated_at, or inserted/deleted, which moves a count).
 */
export async function workspaceFingerprint(workspaceId: number): Promise<string> {
  const w = workspaceId;
  const [rows] = await getDb().execute(sql`SELECT
    (SELECT CONCAT(COUNT(*), '/', COALESCE(SUM(version), 0), '/', COALESCE(MAX(updated_at), '')) FROM runs WHERE workspace_id = ${w}) AS r,
    (SELECT CONCAT(COUNT(*), '/', COALESCE(MAX(updated_at), '')) FROM stills WHERE workspace_id = ${w}) AS s,
    (SELECT CONCAT(COUNT(*), '/', COALESCE(MAX(updated_at), '')) FROM still_closures WHERE workspace_id = ${w}) AS c,
    (SELECT CONCAT(COUNT(*), '/', COALESCE(MAX(updated_at), '')) FROM ferments WHERE workspace_id = ${w}) AS f,
    (SELECT CONCAT(COUNT(*), '/', COALESCE(MAX(computed_at), '')) FROM ferment_forecasts WHERE workspace_id = ${w}) AS p,
    (SELECT CONCAT(COUNT(*), '/', COALESCE(MAX(updated_at), '')) FROM fermenters WHERE workspace_id = ${w}) AS v,
    (SELECT CONCAT(COUNT(*), '/', COALESCE(MAX(u.updated_at), '')) FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.workspace_id = ${w}) AS m,
    (SELECT CONCAT(updated_at, '') FROM workspaces WHERE id = ${w}) AS w`) as unknown as [Array<Record<string, unknown>>];
  return JSON.stringify(rows[0] ?? {});
}

/**
 * Values built from a workspace's state, reused while its fingerprint is unchanged, within the
 * same hour (forecast statuses move with time alone) and for at most `maxAgeMs`. A value is
 * only kept when the fingerprint did not move while it was being built.
 */
export class SnapshotCache<T> {
  private entries = new Map<string, { fingerprint: string; at: number; hour: number; value: T }>();
  constructor(private maxAgeMs: number, private maxEntries = 64) {}

  async get(workspaceId: number, key: string, now: Date, build: () => Promise<T>): Promise<T> {
    const fingerprint = await workspaceFingerprint(workspaceId);
    const hour = Math.floor(now.getTime() / HOUR_MS);
    const hit = this.entries.get(key);
    if (hit && hit.fingerprint === fingerprint && hit.hour === hour && now.getTime() - hit.at < this.maxAgeMs) return hit.value;
    const value = await build();
    if ((await workspaceFingerprint(workspaceId)) === fingerprint) {
      this.entries.delete(key);
      if (this.entries.size >= this.maxEntries) this.entries.delete(this.entries.keys().next().value!);
      this.entries.set(key, { fingerprint, at: now.getTime(), hour, value });
    }
    return value;
  }
}
