import { describe, it, expect, afterAll } from 'vitest';
import mysql from 'mysql2/promise';
import { drizzle } from 'drizzle-orm/mysql2';
import { eq } from 'drizzle-orm';
import { execFileSync } from 'node:child_process';
import { runMigrations } from '../../src/db/migrate';
import { databaseUrl } from '../../src/config';
import * as schema from '../../src/db/schema';
import { loadDemo } from '../../seed/load';
import { getDb } from '../../src/db/client';
import { Client, createTestWorkspace } from '../helpers/api';

const scratchName = `plateau_scratch_${process.pid}`;
const scratchUrl = () => {
  const u = new URL(databaseUrl());
  u.pathname = `/${scratchName}`;
  return u.toString();
};

async function withAdmin<T>(fn: (c: mysql.Connection) => Promise<T>): Promise<T> {
  const u = new URL(databaseUrl());
  u.pathname = '/';
  const c = await mysql.createConnection({ uri: u.toString() });
  try {
    return await fn(c);
  } finally {
    await c.end();
  }
}

const TABLES = [
  'workspaces',
  'users',
  'memberships',
  'sessions',
  'invitations',
  'email_tokens',
  'stills',
  'still_closures',
  'fermenters',
  'wash_types',
  'ferments',
  'ferment_ingredients',
  'readings',
  'ferment_forecasts',
  'forecast_history',
  'runs',
  'run_ferments',
  'run_feeds',
  'run_outcomes',
  'calendar_feeds',
  'mail_outbox',
  'audit_log',
  'sign_in_throttle',
  'reading_uploads',
];

describe('database foundation', () => {
  afterAll(async () => {
    await withAdmin((c) => c.query(`DROP DATABASE IF EXISTS \`${scratchName}\``));
  });

  it('applies every migration to an empty database', async () => {
    await withAdmin((c) => c.query(`DROP DATABASE IF EXISTS \`${scratchName}\``).then(() => c.query(`CREATE DATABASE \`${scratchName}\``)));
    await runMigrations(scratchUrl());
    const tables = await withAdmin(async (c) => {
      const [rows] = await c.query('SELECT table_name AS t FROM information_schema.tables WHERE table_schema = ?', [scratchName]);
      return (rows as Array<{ t: string }>).map((r) => r.t);
    });
    for (const t of TABLES) expect(tables).toContain(t);
    // A second run is a no-op, not an error.
    await runMigrations(scratchUrl());
  });

  it('seeding twice leaves the same counts', async () => {
    const pool = mysql.createPool({ uri: scratchUrl(), timezone: 'Z' });
    const db = drizzle(pool, { schema, mode: 'default' });
    const count = async () => {
      const out: Record<string, number> = {};
      for (const t of ['workspaces', 'users', 'ferments', 'readings', 'runs', 'run_ferments', 'run_feeds', 'stills', 'fermenters', 'wash_types']) {
        const [rows] = await pool.query(`SELECT COUNT(*) AS n FROM \`${t}\``);
        out[t] = Number((rows as Array<{ n: number }>)[0]!.n);
      }
      return out;
    };
    const first = await loadDemo({ db, quiet: true, tokenFile: null });
    expect(first.created).toBe(true);
    const afterFirst = await count();
    const second = await loadDemo({ db, quiet: true, tokenFile: null });
    expect(second.created).toBe(false);
    expect(await count()).toEqual(afterFirst);
    // The demo has the shape the brief asks for.
    expect(afterFirst.stills).toBeGreaterThanOrEqual(3);
    expect(afterFirst.stills).toBeLessThanOrEqual(4);
    expect(afterFirst.fermenters).toBeGreaterThanOrEqual(6);
    expect(afterFirst.ferments).toBeGreaterThanOrEqual(12);
    const [past] = await pool.query('SELECT COUNT(*) AS n FROM runs WHERE starts_at < NOW() - INTERVAL 7 DAY');
    const [future] = await pool.query('SELECT COUNT(*) AS n FROM runs WHERE starts_at > NOW() + INTERVAL 7 DAY');
    expect(Number((past as any)[0].n)).toBeGreaterThan(0);
    expect(Number((future as any)[0].n)).toBeGreaterThan(0);
    await pool.end();
  });

  it('round-trips a ferment with readings and a run charged by two ferments', async () => {
    const ws = await createTestWorkspace('Round trip');
    const db = getDb();
    const wsId = ws.workspaceId;
    const [still] = await db
      .insert(schema.stills)
      .values({
        workspaceId: wsId,
        name: 'Still A',
        kind: 'pot',
        capacityLitres: 1000,
        heatingKw: 20,
        operatingHours: [{ weekday: 1, open: '06:00', close: '18:00' }],
        typicalMinutes: { stripping: 240 },
      })
      .$returningId();
    const [wt] = await db
      .insert(schema.washTypes)
      .values({ workspaceId: wsId, name: 'Grain', category: 'grain', terminalMin: 1.002, terminalMax: 1.008 })
      .$returningId();
    const pitchedAt = new Date('2026-11-02T09:30:00.123Z');
    const ids: number[] = [];
    for (const code of ['RT-1', 'RT-2']) {
      const [f] = await db
        .insert(schema.ferments)
        .values({ workspaceId: wsId, code, washTypeId: wt!.id, volumeLitres: 500, pitchedAt, og: 1.06 })
        .$returningId();
      ids.push(f!.id);
    }
    await db.insert(schema.readings).values([
      {
        workspaceId: wsId,
        fermentId: ids[0]!,
        takenAt: new Date('2026-11-03T08:00:00Z'),
        method: 'hydrometer',
        rawValue: 1.05,
        rawUnit: 'sg',
        sampleTempC: 28,
        sampleTempUnit: 'C',
        correctedSg: 1.0521,
        takenBy: ws.users.distiller.id,
      },
      {
        workspaceId: wsId,
        fermentId: ids[0]!,
        takenAt: new Date('2026-11-04T08:00:00Z'),
        method: 'refractometer',
        rawValue: 9.5,
        rawUnit: 'brix',
        sampleTempC: null,
        correctedSg: 1.012,
        lowConfidence: true,
      },
    ]);
    const [run] = await db
      .insert(schema.runs)
      .values({
        workspaceId: wsId,
        stillId: still!.id,
        type: 'stripping',
        startsAt: new Date('2026-11-10T07:00:00Z'),
        endsAt: new Date('2026-11-10T12:00:00Z'),
        chargeLitres: 900,
      })
      .$returningId();
    await db.insert(schema.runFerments).values([
      { runId: run!.id, fermentId: ids[0]!, workspaceId: wsId, litres: 500 },
      { runId: run!.id, fermentId: ids[1]!, workspaceId: wsId, litres: 400 },
    ]);

    const readings = await db.select().from(schema.readings).where(eq(schema.readings.fermentId, ids[0]!)).orderBy(schema.readings.takenAt);
    expect(readings).toHaveLength(2);
    expect(readings[0]!.rawValue).toBe(1.05);
    expect(readings[0]!.sampleTempC).toBe(28);
    expect(readings[0]!.correctedSg).toBe(1.0521);
    expect(readings[0]!.takenAt.toISOString()).toBe('2026-11-03T08:00:00.000Z');
    expect(readings[1]!.lowConfidence).toBe(true);
    const [f1] = await db.select().from(schema.ferments).where(eq(schema.ferments.id, ids[0]!));
    expect(f1!.pitchedAt.toISOString()).toBe('2026-11-02T09:30:00.123Z');
    const links = await db.select().from(schema.runFerments).where(eq(schema.runFerments.runId, run!.id));
    expect(links.map((l) => [l.fermentId, l.litres]).sort()).toEqual(
      [
        [ids[0], 500],
        [ids[1], 400],
      ].sort(),
    );
    const [r] = await db.select().from(schema.runs).where(eq(schema.runs.id, run!.id));
    expect(r!.version).toBe(1);
    expect(r!.sequence).toBe(0);
    expect(r!.status).toBe('planned');
  });
});

describe('/api/health', () => {
  const local = !process.env.DATABASE_URL;
  it('answers 200 with the round-trip time while MariaDB is up', async () => {
    const r = await new Client().get('/api/health');
    expect(r.status).toBe(200);
    expect(r.json.database.ok).toBe(true);
    expect(typeof r.json.database.roundTripMs).toBe('number');
  });

  it.runIf(local)('answers 503 JSON while MariaDB is stopped, and recovers by itself', async () => {
    const ws = await createTestWorkspace('Health');
    const signedIn = await ws.client('staff');
    execFileSync('bash', ['scripts/db.sh', 'stop'], { stdio: 'ignore' });
    try {
      const down = await new Client().get('/api/health');
      expect(down.status).toBe(503);
      expect(down.json.error.code).toBe('unavailable');
      expect(down.headers.get('retry-after')).toBeTruthy();
      // A signed-in person's page load gets a friendly 503, not a crash.
      const page = await signedIn.get('/', { accept: 'text/html' });
      expect(page.status).toBe(503);
      expect(page.text).toContain('Back in a moment');
      expect(page.text).not.toMatch(/at .*\.(js|ts):\d+/);
    } finally {
      execFileSync('bash', ['scripts/db.sh', 'start'], { stdio: 'ignore' });
    }
    let up = await new Client().get('/api/health');
    for (let i = 0; i < 20 && up.status !== 200; i++) {
      await new Promise((r) => setTimeout(r, 250));
      up = await new Client().get('/api/health');
    }
    expect(up.status).toBe(200);
  });
});
