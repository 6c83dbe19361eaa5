import { defineConfig } from 'vitest/config';

// Separate from vite.config.ts: the reactRouter() plugin must not run under vitest.
export default defineConfig({
  resolve: { tsconfigPaths: true },
  test: {
    projects: [
      {
        extends: true,
        test: {
          name: 'unit',
          // A test that asserts nothing is a defect.
          expect: { requireAssertions: true },
          // Every unit test lives in tests/unit (tests/unit/layout.test.ts fails on one anywhere else).
          include: ['tests/unit/**/*.test.{ts,tsx}'],
          environment: 'node',
          // npm test runs everything with NODE_ENV=production (the server under test); React's
          // production build has no act(), which component tests (testing-library) need.
          env: { NODE_ENV: 'test' },
          setupFiles: ['tests/setup/fail-on-console-error.ts'],
        },
      },
      {
        extends: true,
        test: {
          name: 'integration',
          expect: { requireAssertions: true },
          include: ['tests/integration/**/*.test.ts', 'tests/security/**/*.test.ts'],
          testTimeout: 30_000,
          hookTimeout: 30_000,
          setupFiles: ['tests/setup/require-test-server.ts'],
        },
      },
      {
        extends: true,
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.test.ts'],
          // A busy 2-core CI machine renders slower than a laptop: give pages time to change.
          expect: { requireAssertions: true, poll: { timeout: 15_000, interval: 100 } },
          testTimeout: 90_000,
          hookTimeout: 60_000,
          // Chromium is heavy on 2 cores: one browser file at a time.
          fileParallelism: false,
          setupFiles: ['tests/setup/require-test-server.ts'],
        },
      },
    ],
  },
});
