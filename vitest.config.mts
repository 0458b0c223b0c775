import { defineConfig } from 'vitest/config';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.dirname(fileURLToPath(import.meta.url));

/**
 * Three projects:
 * - unit: plain node tests (tests/lib/**: numerics, datasets, designer, …).
 * - api: route handlers and data functions against a real temporary SQLite
 *   file, migrated and seeded fresh for every test file (tests/helpers/api-setup.ts).
 * - e2e: the built app in headless Chromium; its globalSetup builds, migrates,
 *   seeds, starts `next start` with its own mail sink, and stops it afterwards.
 */
export default defineConfig({
  resolve: {
    alias: {
      '@': root,
      // `server-only` throws outside the React server build; tests import server modules directly.
      'server-only': path.join(root, 'tests/helpers/server-only-stub.ts'),
    },
  },
  test: {
    environment: 'node',
    testTimeout: 60_000,
    hookTimeout: 300_000,
    projects: [
      {
        extends: true,
        test: {
          name: 'unit',
          include: ['tests/**/*.test.ts'],
          exclude: ['tests/api/**', 'tests/e2e/**', '**/node_modules/**'],
        },
      },
      {
        extends: true,
        test: { name: 'api', include: ['tests/api/**/*.test.ts'], setupFiles: ['tests/helpers/api-setup.ts'] },
      },
      {
        // The API suite's Postgres subset (package.json test:api:pg): concurrency, jobs, estimates, arrays,
        // links, hand-offs, sign-in rate limits, datasets, studies and reviews, each file on its own database of
        // one throwaway cluster. The rest of the API suite runs on SQLite only (see DEVELOPERS.md, "Postgres").
        extends: true,
        test: {
          name: 'api-pg',
          include: [
            'tests/api/postgres-concurrency.test.ts',
            'tests/api/jobs.test.ts',
            'tests/api/estimates.test.ts',
            'tests/api/arrays.test.ts',
            'tests/api/links.test.ts',
            'tests/api/handoff.test.ts',
            'tests/api/sign-in-rate-limit.test.ts',
            'tests/api/datasets.test.ts',
            'tests/api/studies.test.ts',
            'tests/api/reviews.test.ts',
            'tests/api/calibration*.test.ts',
            'tests/api/bearing-time-records*.test.ts',
          ],
          setupFiles: ['tests/helpers/api-setup.ts'],
          globalSetup: ['tests/helpers/pg-global-setup.ts'],
          env: { STEERWISE_TEST_ON_PG: '1' },
        },
      },
      {
        extends: true,
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.test.ts'],
          globalSetup: ['tests/e2e/global-setup.ts'],
          fileParallelism: false,
          testTimeout: 120_000,
        },
      },
    ],
  },
});
