import { defineConfig } from 'drizzle-kit';

const port = process.env.DB_PORT ?? '3307';
const url =
  process.env.DATABASE_URL ??
  `mysql://${process.env.DB_APP_USER ?? 'plateau'}:${process.env.DB_APP_PASSWORD ?? 'plateau-local-dev'}@127.0.0.1:${port}/${process.env.DB_NAME ?? 'plateau'}`;

export default defineConfig({
  dialect: 'mysql',
  schema: './src/db/schema/index.ts',
  out: './drizzle',
  dbCredentials: { url },
  strict: true,
  verbose: false,
});
