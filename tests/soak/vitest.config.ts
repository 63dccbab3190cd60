/**
 * `npm run test:soak` (bash scripts/test.sh --config tests/soak/vitest.config.ts): the long
 * versions of the fault and hostile-input tests, against the app and database scripts/test.sh
 * prepares, exactly as `npm test` runs its short versions.
 */
import { defineConfig } from 'vitest/config';
import { fileURLToPath } from 'node:url';

const alias = { '@': fileURLToPath(new URL('../../src', import.meta.url)) };

export default defineConfig({
  root: fileURLToPath(new URL('../..', import.meta.url)),
  resolve: { alias },
  test: {
    include: ['tests/soak/**/*.soak.test.ts'],
    environment: 'node',
    globalSetup: ['tests/integration/global-setup.ts'],
    fileParallelism: false,
    testTimeout: 30 * 60_000,
    hookTimeout: 120_000,
  },
});
