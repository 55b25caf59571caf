import { defineConfig } from 'vitest/config';

// Browser tests: Debian's chromium drives the built client served by a real server on a fresh database.
// Run by scripts/test.sh after the production build; the files end in .e2e.ts so the node-side vitest
// run (vitest.config.ts, *.test.ts) never picks them up.
export default defineConfig({
  test: {
    root: new URL('../..', import.meta.url).pathname,
    environment: 'node',
    include: ['tests/e2e/**/*.e2e.ts'],
    globalSetup: ['tests/e2e/global-setup.ts'],
    testTimeout: 300_000,
    // Browser steps wait up to a minute on a busy machine (see STEP_TIMEOUT_MS in browser.ts).
    expect: { poll: { timeout: 60_000, interval: 100 } },
    hookTimeout: 120_000,
    fileParallelism: false,
  },
});
