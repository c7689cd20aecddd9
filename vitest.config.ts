import { defineConfig } from 'vitest/config';

// Two cores on the shared machines: keep the worker count at two so suites do not thrash.
export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    pool: 'forks',
    maxWorkers: 2,
    testTimeout: 60_000,
    hookTimeout: 60_000,
  },
});
