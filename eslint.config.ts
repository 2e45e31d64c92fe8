import { readdirSync, existsSync } from 'node:fs';
import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import reactHooks from 'eslint-plugin-react-hooks';
import globals from 'globals';
import type { Linter } from 'eslint';

const featuresDir = new URL('./client/src/features/', import.meta.url);
const features = existsSync(featuresDir)
  ? readdirSync(featuresDir, { withFileTypes: true }).filter((d) => d.isDirectory()).map((d) => d.name)
  : [];

export default tseslint.config(
  { ignores: ['node_modules/', 'dist/', '.data/', 'test-results/', 'playwright-report/', 'artifacts/', '**/*.py'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node }, ecmaVersion: 2023, sourceType: 'module' },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/no-namespace': 'off',
      'no-console': 'off',
    },
  },
  {
    files: ['client/**/*.{ts,tsx}', 'tests/client/**/*.{ts,tsx}'],
    languageOptions: { globals: { ...globals.browser } },
    plugins: { 'react-hooks': reactHooks },
    rules: {
      'react-hooks/rules-of-hooks': 'error',
      'react-hooks/exhaustive-deps': 'warn',
    },
  },
  // shared/ is isomorphic code: it may not reach into any one side.
  {
    files: ['shared/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            { group: ['**/client/**', '**/server/**', '**/workers/**', '@/*'], message: 'shared/ must not import from client/, server/ or workers/.' },
            { group: ['node:*', 'fs', 'path', 'os', 'child_process'], message: 'shared/ runs in the browser too: no Node built-ins.' },
          ],
        },
      ],
    },
  },
  // A feature owns its folder; features do not import each other.
  ...features.map((f): Linter.Config => ({
    files: [`client/src/features/${f}/**/*.{ts,tsx}`],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              group: ['@/features/*', `!@/features/${f}`, `!@/features/${f}/**`, '**/features/*/**', `!**/features/${f}/**`],
              message: 'Features do not import each other: move the shared piece to components/ or lib/.',
            },
          ],
        },
      ],
    },
  })),
);
