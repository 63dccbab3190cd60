/**
 * npm run db:restore FILE [-- --into DBNAME] : restore a backup made by db:backup into the app
 * database (or DBNAME), replacing what is there. The dump names its database, so the
 * restore rewrites that name to the target.
 */
import { spawn } from 'node:child_process';
import { createReadStream } from 'node:fs';
import { createGunzip } from 'node:zlib';
import { Transform } from 'node:stream';
import mysql from 'mysql2/promise';
import { databaseUrl } from '../src/config';
import { connectionArgs } from './db-backup';

export async function restore(url: string, file: string): Promise<void> {
  const { args, database, password } = connectionArgs(url);
  if (!/^[A-Za-z0-9_]+$/.test(database)) throw new Error(`Unsafe database name: ${database}`);
  const admin = new URL(url);
  admin.pathname = '/';
  const conn = await mysql.createConnection({ uri: admin.toString() });
  await conn.query(`DROP DATABASE IF EXISTS \`${database}\``);
  await conn.query(`CREATE DATABASE \`${database}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  await conn.end();
  // Point the dump's CREATE DATABASE / USE statements at the target database.
  let carry = '';
  const rename = new Transform({
    transform(chunk, _enc, cb) {
      const text = carry + chunk.toString('utf8');
      const cut = text.lastIndexOf('\n');
      carry = cut >= 0 ? text.slice(cut + 1) : text;
      const ready = cut >= 0 ? text.slice(0, cut + 1) : '';
      cb(null, ready.replace(/^(CREATE DATABASE \/\*!32312 IF NOT EXISTS\*\/ |USE )`[^`]+`/gm, `$1\`${database}\``));
    },
    flush(cb) {
      cb(null, carry);
    },
  });
  const client = spawn('mariadb', [...args, database], { env: { ...process.env, MYSQL_PWD: password }, stdio: ['pipe', 'ignore', 'pipe'] });
  let stderr = '';
  client.stderr.on('data', (d) => (stderr += d));
  const done = new Promise<number>((resolve) => client.on('close', resolve));
  createReadStream(file).pipe(createGunzip()).pipe(rename).pipe(client.stdin);
  const code = await done;
  if (code !== 0) throw new Error(`restore failed (${code}): ${stderr.trim()}`);
}

if (process.argv[1]?.endsWith('db-restore.ts')) {
  const file = process.argv[2];
  if (!file) {
    console.error('usage: npm run db:restore FILE [-- --into DBNAME]');
    process.exit(2);
  }
  const i = process.argv.indexOf('--into');
  const url = new URL(databaseUrl());
  if (i > 0) url.pathname = `/${process.argv[i + 1]}`;
  restore(url.toString(), file)
    .then(() => console.log(`[plateau] Restored ${file} into ${url.pathname.slice(1)}`))
    .catch((e) => {
      console.error(`[plateau] ${e.message}`);
      process.exit(1);
    });
}
