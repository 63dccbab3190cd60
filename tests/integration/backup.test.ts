import { describe, it, expect, afterAll } from 'vitest';
import mysql from 'mysql2/promise';
import { mkdtempSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { backup } from '../../scripts/db-backup';
import { restore } from '../../scripts/db-restore';
import { databaseUrl } from '../../src/config';
import { createTestWorkspace } from '../helpers/api';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';

const target = `plateau_restore_${process.pid}`;
const urlFor = (db: string) => {
  const u = new URL(databaseUrl());
  u.pathname = `/${db}`;
  return u.toString();
};

async function fingerprint(db: string): Promise<Record<string, { rows: number; checksum: string }>> {
  const c = await mysql.createConnection({ uri: urlFor(db) });
  try {
    const [tables] = await c.query(
      "SELECT table_name AS t FROM information_schema.tables WHERE table_schema = ? AND table_type = 'BASE TABLE' ORDER BY table_name",
      [db],
    );
    const out: Record<string, { rows: number; checksum: string }> = {};
    for (const { t: name } of tables as Array<{ t: string }>) {
      const [[count]] = (await c.query(`SELECT COUNT(*) AS n FROM \`${name}\``)) as any;
      const [[sum]] = (await c.query(`CHECKSUM TABLE \`${name}\` EXTENDED`)) as any;
      out[name] = { rows: Number(count.n), checksum: String(sum.Checksum) };
    }
    return out;
  } finally {
    await c.end();
  }
}

describe('backup and restore', () => {
  afterAll(async () => {
    const u = new URL(databaseUrl());
    u.pathname = '/';
    const c = await mysql.createConnection({ uri: u.toString() });
    await c.query(`DROP DATABASE IF EXISTS \`${target}\``);
    await c.end();
  });

  it('restores a dump into a fresh database with identical row counts and checksums', async () => {
    // Make sure there is something worth restoring, including text that needs care.
    const ws = await createTestWorkspace("Backup «Ünïcode» 'quotes'");
    await getDb().insert(t.fermenters).values({ workspaceId: ws.workspaceId, name: 'FV "one"; DROP TABLE x; --', capacityLitres: 1234.5 });
    const source = new URL(databaseUrl()).pathname.slice(1);
    const dir = mkdtempSync(path.join(tmpdir(), 'plateau-backup-'));
    const file = await backup(databaseUrl(), dir);
    expect(path.basename(file)).toMatch(new RegExp(`^${source}-\\d{8}T\\d{6}Z\\.sql\\.gz$`));
    expect(statSync(file).size).toBeGreaterThan(1000);
    await restore(urlFor(target), file);
    const [a, b] = await Promise.all([fingerprint(source), fingerprint(target)]);
    expect(Object.keys(b).sort()).toEqual(Object.keys(a).sort());
    // The running app may touch these in the background (outbox sender, sessions, forecast cache).
    const volatile = new Set(['mail_outbox', 'sessions', 'ferment_forecasts', 'forecast_history', 'sign_in_throttle', 'scheduled_jobs']);
    for (const name of Object.keys(a).filter((n) => !volatile.has(n))) expect(b[name], name).toEqual(a[name]);
    expect(b.fermenters!.rows).toBeGreaterThan(0);
    const c = await mysql.createConnection({ uri: urlFor(target) });
    const [rows] = await c.query('SELECT name, capacity_litres FROM fermenters WHERE workspace_id = ?', [ws.workspaceId]);
    await c.end();
    expect(rows).toEqual([{ name: 'FV "one"; DROP TABLE x; --', capacity_litres: 1234.5 }]);
    // The restored copy is a faithful snapshot: dump it again and compare with itself restored twice.
    const again = await backup(urlFor(target), dir);
    const second = `${target}_b`;
    await restore(urlFor(second), again);
    const [x, y] = await Promise.all([fingerprint(target), fingerprint(second)]);
    expect(y).toEqual(x);
    const u = new URL(databaseUrl());
    u.pathname = '/';
    const admin = await mysql.createConnection({ uri: u.toString() });
    await admin.query(`DROP DATABASE IF EXISTS \`${second}\``);
    await admin.end();
  });
});
