import mysql from 'mysql2/promise';
import { drizzle, type MySql2Database } from 'drizzle-orm/mysql2';
import * as schema from './schema';
import { databaseUrl } from '../config';

export type Db = MySql2Database<typeof schema>;

let pool: mysql.Pool | null = null;
let db: Db | null = null;

/** One pool per process. Connections speak UTC so DATETIME values are UTC instants. */
export function getPool(): mysql.Pool {
  if (!pool) {
    pool = mysql.createPool({
      uri: databaseUrl(),
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
