import mysql from 'mysql2/promise';
import { drizzle, type MySql2Database } from 'drizzle-orm/mysql2';
import * as schema from './schema';
import { existsSync } from 'node:fs';
import { databaseUrl, env } from '../config';

export type Db = MySql2Database<typeof schema>;

let pool: mysql.Pool | null = null;
let db: Db | null = null;

/** One pool per process. Connections speak UTC so DATETIME values are UTC instants. */
export function getPool(): mysql.Pool {
  if (!pool) {
    // The project-local MariaDB is reached through its Unix socket when there is one: the same
    // server and account as the TCP URL, without loopback TCP's cost on every query.
    const e = env();
    const socketPath = !e.DATABASE_URL && e.DB_SOCKET && existsSync(e.DB_SOCKET) ? e.DB_SOCKET : undefined;
    pool = mysql.createPool({
      ...(socketPath ? { socketPath, user: e.DB_APP_USER, password: e.DB_APP_PASSWORD, database: e.DB_NAME } : { uri: databaseUrl() }),
      connectionLimit: 20,
      timezone: 'Z',
      dateStrings: false,
      connectTimeout: 3000,
      enableKeepAlive: true,
      decimalNumbers: true,
    });
    pool.on('connection', (conn) => {
      conn.query("SET time_zone = '+00:00'");
    });
  }
  return pool;
}

export function getDb(): Db {
  if (!db) db = drizzle(getPool(), { schema, mode: 'default' });
  return db;
}

export async function closeDb(): Promise<void> {
  if (pool) await pool.end();
  pool = null;
  db = null;
}

export { schema };
