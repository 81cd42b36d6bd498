import { defineConfig } from 'vitest/config';

// the json report feeds .ci/run's plain "N passed, N failed" line
export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    reporters: ['default', 'json'],
    outputFile: { json: 'test-results/results.json' },
    testTimeout: 60_000,
    pool: 'forks',
  },
});
