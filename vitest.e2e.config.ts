// End-to-end tests (npm run test:e2e, after the renderer is built): browser mode driven by
// playwright-core in the system's Chromium. Kept apart from the unit suite (vitest.config.ts).
import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['tests/e2e/**/*.test.ts'],
    testTimeout: 240_000,
    hookTimeout: 120_000,
    pool: 'forks',
    fileParallelism: false,
  },
});
