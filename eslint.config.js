// ESLint (flat config). Rules that catch bugs, not style: promises nobody awaits or that are
// handed where a plain function is expected, the React Hooks rules, and the one-way imports that
// DEVELOPERS.md "Layout" states. Formatting is Prettier's job (`npm run format`).
import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import reactHooks from 'eslint-plugin-react-hooks';
import { importX } from 'eslint-plugin-import-x';
import { createTypeScriptImportResolver } from 'eslint-import-resolver-typescript';
import globals from 'globals';
import { readdirSync } from 'node:fs';

const features = readdirSync('client/src/features', { withFileTypes: true })
  .filter((entry) => entry.isDirectory())
  .map((entry) => entry.name);

export default tseslint.config(
  { ignores: ['dist/**', 'node_modules/**', 'test-results/**', 'playwright-report/**', 'coverage/**'] },
  js.configs.recommended,
  ...tseslint.configs.recommendedTypeChecked,
  {
    languageOptions: {
      parserOptions: {
        projectService: {
          allowDefaultProject: [
            'eslint.config.js',
            'server/src/services/geometry/worker.mjs',
            'client/public/push-sw.js',
            'client/public/locale-data.js',
          ],
        },
        tsconfigRootDir: import.meta.dirname,
      },
      globals: { ...globals.node, ...globals.browser },
    },
    plugins: { 'import-x': importX },
    settings: { 'import-x/resolver-next': [createTypeScriptImportResolver({ project: 'tsconfig.json' })] },
    rules: {
      '@typescript-eslint/no-floating-promises': 'error',
      '@typescript-eslint/no-misused-promises': ['error', { checksVoidReturn: { attributes: false } }],
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrors: 'none' }],
      // Where the types are honest these add noise, not safety (zod, JSON and pg answers are typed
      // at the edge; the issue of `unknown` answers is tracked apart).
      '@typescript-eslint/no-unsafe-assignment': 'off',
      '@typescript-eslint/no-unsafe-member-access': 'off',
      '@typescript-eslint/no-unsafe-argument': 'off',
      '@typescript-eslint/no-unsafe-return': 'off',
      '@typescript-eslint/no-unsafe-call': 'off',
      '@typescript-eslint/restrict-template-expressions': 'off',
      '@typescript-eslint/no-redundant-type-constituents': 'off',
      '@typescript-eslint/only-throw-error': 'off',
      '@typescript-eslint/no-base-to-string': 'off',
      '@typescript-eslint/require-await': 'off',
      '@typescript-eslint/unbound-method': 'off',
      '@typescript-eslint/prefer-promise-reject-errors': 'off',
      '@typescript-eslint/no-unnecessary-type-assertion': 'off',
      'import-x/no-restricted-paths': [
        'error',
        {
          zones: [
            { target: './shared', from: ['./client', './server', './db'], message: 'shared/ imports nothing of client/, server/ or db/.' },
            { target: './db', from: ['./client', './server'], message: 'db/ imports nothing of ours but shared/.' },
            { target: './client', from: ['./server', './db'], message: 'The client never imports the server or db/ (use shared/).' },
            ...features.map((feature) => ({
              target: `./client/src/features/${feature}`,
              from: './client/src/features',
              except: [`./${feature}`],
              message: 'Features do not import each other: move what both need to client/src/components or lib, or compose in app/.',
            })),
          ],
        },
      ],
    },
  },
  {
    files: ['client/**/*.{ts,tsx}'],
    plugins: { 'react-hooks': reactHooks },
    rules: {
      'react-hooks/rules-of-hooks': 'error',
      'react-hooks/exhaustive-deps': 'error',
    },
  },
  {
    // Kysely's own pattern: a migration sees the database as it was then, not today's types.
    files: ['db/migrations/**'],
    rules: { '@typescript-eslint/no-explicit-any': 'off' },
  },
  {
    files: ['**/*.test.{ts,tsx}', 'e2e/**', 'server/test/**'],
    rules: {
      '@typescript-eslint/no-non-null-assertion': 'off',
      '@typescript-eslint/no-explicit-any': 'off',
    },
  },
);
