import { migrate } from 'drizzle-orm/mysql2/migrator';
import mysql from 'mysql2/promise';
import { drizzle } from 'drizzle-orm/mysql2';
import { fileURLToPath } from 'node:url';
import path from 'node:path';

const migrationsFolder = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../drizzle');

/** Apply drizzle/ migrations. A named lock keeps two instances from migrating at once. */
export async function runMigrations(url: string): Promise<void> {
  const conn = await mysql.createConnection({ uri: url, timezone: 'Z', multipleStatements: false });
  try {
    await conn.query("SELECT GET_LOCK('plateau_migrations', 60)");
    await migrate(drizzle(conn), { migrationsFolder });
    await conn.query("SELECT RELEASE_LOCK('plateau_migrations')");
  } finally {
    await conn.end();
  }
}
