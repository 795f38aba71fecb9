import { defineConfig } from 'vitest/config';

// The cluster layer (tests/cluster/run.sh starts Slurm first): one file, run alone.
export default defineConfig({
  test: {
    include: ['tests/cluster/**/*.test.ts'],
    testTimeout: 300_000,
    hookTimeout: 60_000,
    pool: 'forks',
    fileParallelism: false,
  },
});
