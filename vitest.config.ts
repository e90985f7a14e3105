import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    reporters: ['default', './tests/support/summary-reporter.ts'],
    projects: [
      {
        extends: true,
        test: { name: 'engine', include: ['tests/unit/**/*.test.ts'], testTimeout: 120_000 },
      },
      {
        extends: true,
        test: {
          name: 'server',
          include: ['tests/integration/**/*.test.ts'],
          globalSetup: ['tests/support/build-dist.ts'],
          testTimeout: 120_000,
        },
      },
      {
        extends: true,
        test: {
          name: 'browser',
          include: ['tests/browser/**/*.test.ts'],
          testTimeout: 180_000,
          hookTimeout: 180_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
