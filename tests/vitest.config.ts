import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    root: new URL('..', import.meta.url).pathname,
    include: ['tests/**/*.test.ts'],
    testTimeout: 120_000,
    hookTimeout: 60_000,
    pool: 'forks',
    // Two test files at a time on the 2-core CI machine: many files wait on browsers, servers and child
    // processes, so the suite's wall time drops by about a quarter (412 s → 319 s measured on one machine).
    maxWorkers: 2,
  },
});
