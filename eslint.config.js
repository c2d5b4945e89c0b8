// Lint for src/, test/ and bench/: ESLint's recommended rules and typescript-eslint's
// recommended-type-checked (type information from tsconfig.json), plus React's hook rules for the
// task pane. `npm run lint` fails on any warning (--max-warnings 0).
import js from '@eslint/js';
import reactHooks from 'eslint-plugin-react-hooks';
import tseslint from 'typescript-eslint';

export default tseslint.config(
  {
    // Build output and the plain-JS helper scripts (scripts/*.mjs, the webpack and vitest configs) are not linted.
    ignores: ['dist/**', 'dist-web/**', 'out/**', 'test-output/**', 'node_modules/**', 'scripts/**', '*.js', '*.ts'],
  },
  {
    files: ['src/**/*.{ts,tsx}', 'test/**/*.{ts,tsx}', 'bench/**/*.ts'],
    extends: [js.configs.recommended, ...tseslint.configs.recommendedTypeChecked],
    languageOptions: {
      parserOptions: { projectService: true, tsconfigRootDir: import.meta.dirname },
    },
    rules: {
      // A leading underscore marks a parameter or variable that a signature needs but the body does not use
      // (e.g. an override that ignores its argument).
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrorsIgnorePattern: '^_' }],
      // Passing a caught `unknown` on unchanged (promise executor's reject) is fine; wrapping it would hide its type.
      '@typescript-eslint/prefer-promise-reject-errors': ['error', { allowThrowingUnknown: true }],
      // Cell values from Office.js/ExcelJS are typed unknown; the last-resort String(value) on them is deliberate,
      // and after narrowing out the primitives TypeScript calls them `{}`, which this rule reports at every such site.
      '@typescript-eslint/no-base-to-string': 'off',
    },
  },
  {
    // The two classic hook rules. The plugin's recommended set also enables the React Compiler rules,
    // which ask for compiler-oriented rewrites (e.g. no ref writes during render) that this code does not target.
    files: ['src/taskpane/**/*.{ts,tsx}'],
    plugins: { 'react-hooks': reactHooks },
    rules: {
      'react-hooks/rules-of-hooks': 'error',
      'react-hooks/exhaustive-deps': 'error',
    },
  },
);
