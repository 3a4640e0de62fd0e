import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    testTimeout: 120_000,
    hookTimeout: 120_000,
    // two cores: worker-thread tests and spawned CLIs compete for them
    maxWorkers: 2,
  },
});
