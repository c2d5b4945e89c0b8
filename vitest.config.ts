import { defineConfig } from 'vitest/config';

/**
 * Two projects: every suite against the sandbox, and the workbook-layer suites again through
 * Microsoft's real Office.js client (@microsoft/office-js) whose requests the sandbox answers
 * (test/workbook/helpers.ts reads TAILMARK_TEST_CLIENT).
 */
export default defineConfig({
  test: {
    testTimeout: 60_000,
    hookTimeout: 120_000,
    projects: [
      {
        extends: true,
        test: { name: 'sandbox', include: ['test/**/*.test.ts', 'test/**/*.test.tsx'] },
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
