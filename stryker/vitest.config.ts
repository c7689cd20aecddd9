import { defineConfig } from 'vitest/config';

// The test files Stryker runs for one folder (set by stryker.config.mjs in STRYKER_TESTS), one
// worker: Stryker itself runs one test process at a time on the shared two-core machines.
const include: string[] = JSON.parse(process.env.STRYKER_TESTS ?? '["test/shared/plan/**/*.test.ts"]');

export default defineConfig({
  test: {
    include,
    pool: 'forks',
    maxWorkers: 1,
    testTimeout: 120_000,
    hookTimeout: 120_000,
  },
});
