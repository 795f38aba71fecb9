import { defineConfig } from 'vitest/config';

// Browser tests: real Chromium against real servers. One file at a time in one fork (2 cores,
// shared), long timeouts for the first lab build and kernel start-up.
export default defineConfig({
  test: {
    include: ['tests/browser/**/*.test.ts'],
    testTimeout: 180_000,
    hookTimeout: 300_000,
    pool: 'forks',
    fileParallelism: false,
    maxWorkers: 1,
  },
});
