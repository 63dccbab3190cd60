/**
 * npm run db:backup [-- --out DIR] : a consistent, timestamped dump of the app database
 * (mariadb-dump --single-transaction: one InnoDB snapshot, no table locks), gzip-compressed.
 * Prints the file written.
 */
import { spawn } from 'node:child_process';
import { createWriteStream, mkdirSync } from 'node:fs';
import { createGzip } from 'node:zlib';
import path from 'node:path';
import { pipeline } from 'node:stream/promises';
import { databaseUrl } from '../src/config';

export function connectionArgs(url: string): { args: string[]; database: string; password: string } {
  const u = new URL(url);
  const database = decodeURIComponent(u.pathname.replace(/^\//, ''));
  return {
    args: ['--no-defaults', `--host=${u.hostname}`, `--port=${u.port || '3306'}`, `--user=${decodeURIComponent(u.username)}`, '--protocol=TCP'],
    database,
    password: decodeURIComponent(u.password),
  };
}

export async function backup(url: string, outDir: string): Promise<string> {
  const { args, database, password } = connectionArgs(url);
  mkdirSync(outDir, { recursive: true });
  const stamp = new Date()
    .toISOString()
    .replace(/[-:]/g, '')
    .replace(/\.\d+Z$/, 'Z');
  const file = path.join(outDir, `${database}-${stamp}.sql.gz`);
  const dump = spawn(
    'mariadb-dump',
    [...args, '--single-transaction', '--quick', '--routines', '--triggers', '--hex-blob', '--no-tablespaces', '--skip-comments', '--databases', database],
    {
      env: { ...process.env, MYSQL_PWD: password },
      stdio: ['ignore', 'pipe', 'pipe'],
    },
  );
  let stderr = '';
  dump.stderr.on('data', (d) => (stderr += d));
  const done = new Promise<number>((resolve) => dump.on('close', resolve));
  await pipeline(dump.stdout, createGzip(), createWriteStream(file, { mode: 0o600 }));
  const code = await done;
  if (code !== 0) throw new Error(`mariadb-dump failed (${code}): ${stderr.trim()}`);
  return file;
}

if (process.argv[1]?.endsWith('db-backup.ts')) {
  const i = process.argv.indexOf('--out');
  const out = i > 0 ? process.argv[i + 1]! : 'backups';
  backup(databaseUrl(), out)
    .then((f) => console.log(`[plateau] Backup written: ${f}`))
    .catch((e) => {
      console.error(`[plateau] ${e.message}`);
      process.exit(1);
    });
}
