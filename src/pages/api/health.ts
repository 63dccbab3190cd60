import type { APIRoute } from 'astro';
import { sql } from 'drizzle-orm';
import { getDb } from '../../db/client';
import { json, jsonError } from '../../server/http';

/** 200 with the database round-trip time, or 503 JSON while MariaDB does not answer. */
export const GET: APIRoute = async () => {
  const started = performance.now();
  try {
    await Promise.race([getDb().execute(sql`SELECT 1`), new Promise((_, reject) => setTimeout(() => reject(new Error('timeout')), 2000))]);
    return json({ status: 'ok', database: { ok: true, roundTripMs: Math.round((performance.now() - started) * 100) / 100 } });
  } catch {
    return jsonError(503, 'unavailable', 'The database is not answering.', undefined, { 'retry-after': '5' });
  }
};
