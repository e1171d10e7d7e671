import { defineConfig } from 'vitest/config'

/**
 * Browser journeys (tests/e2e): the real server and the built client in Debian's Chromium, against a
 * stack of their own (tests/e2e/support/global.ts). One file at a time: they share one app and its
 * demo data, and two headless browsers at once would starve the two cores.
 * Run with `npm run test:e2e`; `npm test` runs them after the unit and API tests.
 */
export default defineConfig({
  test: {
    include: ['tests/e2e/**/*.e2e.ts'],
    environment: 'node',
    globalSetup: ['tests/e2e/support/global.ts'],
    pool: 'forks',
    maxWorkers: 1,
    fileParallelism: false,
    testTimeout: 180_000,
    hookTimeout: 120_000,
    teardownTimeout: 60_000,
  },
})
