import { defineConfig } from 'vitest/config';

/**
 * Three projects: every unit suite against the sandbox; the workbook-layer suites again through
 * Microsoft's real Office.js client (@microsoft/office-js) whose requests the sandbox answers
 * (test/workbook/helpers.ts reads TAILMARK_TEST_CLIENT); and the browser end-to-end tests (e2e).
 */
export default defineConfig({
  test: {
    testTimeout: 60_000,
    hookTimeout: 120_000,
    projects: [
      {
        extends: true,
        test: { name: 'sandbox', include: ['test/**/*.test.ts', 'test/**/*.test.tsx'], exclude: ['test/e2e/**'] },
      },
      {
        extends: true,
        // Browser end-to-end tests (npm run test:e2e): the bundles are built once, before the files start.
        test: { name: 'e2e', include: ['test/e2e/**/*.test.ts'], globalSetup: ['test/e2e/global-setup.ts'] },
      },
      {
        extends: true,
        test: {
          name: 'office-js',
          include: ['test/workbook/**/*.test.ts'],
          exclude: ['test/workbook/sandbox-command.test.ts', 'test/workbook/api-members.test.ts'],
          env: { TAILMARK_TEST_CLIENT: 'office-js' },
        },
      },
    ],
  },
});
