import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    projects: [
      { test: { name: 'unit', include: ['tests/unit/**/*.test.ts'], environment: 'node' } },
      {
        test: {
          name: 'integration',
          include: ['tests/integration/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/integration/global-setup.ts'],
          fileParallelism: false,
          testTimeout: 30000,
          hookTimeout: 60000,
        },
      },
      {
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/e2e/global-setup.ts'],
          fileParallelism: false,
          testTimeout: 60000,
          hookTimeout: 120000,
        },
      },
      {
        // Only under `npm run test:cluster` (scripts/test-cluster.sh starts the cluster and the apps).
        test: {
          name: 'cluster',
          include: ['tests/cluster/**/*.test.ts'],
          environment: 'node',
          fileParallelism: false,
          testTimeout: 240000,
          hookTimeout: 240000,
        },
      },
    ],
  },
});
