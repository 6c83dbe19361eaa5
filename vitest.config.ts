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
          include: ['app/**/*.test.{ts,tsx}', 'realtime/**/*.test.ts', 'tests/unit/**/*.test.{ts,tsx}'],
          environment: 'node',
          setupFiles: ['tests/setup/fail-on-console-error.ts'],
        },
      },
      {
        extends: true,
        test: {
          name: 'integration',
          include: ['tests/integration/**/*.test.ts'],
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
