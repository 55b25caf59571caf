import { defineConfig } from 'vitest/config';

// Node-side tests: solver, shared schemas, server and the cross-boundary tests. Angular specs under src/
// run through `ng test` instead.
export default defineConfig({
  test: {
    environment: 'node',
    include: ['solver/**/*.test.ts', 'shared/**/*.test.ts', 'server/**/*.test.ts', 'tests/**/*.test.ts'],
    testTimeout: 60_000,
    hookTimeout: 120_000,
    fileParallelism: false,
  },
});
