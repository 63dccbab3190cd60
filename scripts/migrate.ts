import { runMigrations } from '../src/db/migrate';
import { databaseUrl } from '../src/config';

const started = Date.now();
await runMigrations(databaseUrl());
console.log(`[plateau] Migrations applied (${Date.now() - started} ms)`);
