import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import reactHooks from 'eslint-plugin-react-hooks';
import globals from 'globals';

export default tseslint.config(
  { ignores: ['dist', 'node_modules', '.data', '.cache', '.test-artifacts', 'coverage', '**/*.as.ts'] },
  // *.as.ts is AssemblyScript (compiled to WebAssembly by asc, which checks it): see shared/import/wasm/scan-rows-wasm.ts.
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node, ...globals.browser } },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/no-explicit-any': 'off',
    },
  },
  {
    files: ['src/**/*.{ts,tsx}'],
    plugins: { 'react-hooks': reactHooks },
    rules: { 'react-hooks/rules-of-hooks': 'error', 'react-hooks/exhaustive-deps': 'warn' },
  },
  {
    // shared/ is pure: the same code runs in the worker, the CLI and the browser.
    files: ['shared/**/*.ts'],
    rules: {
      'no-restricted-imports': ['error', {
        patterns: [
          { group: ['node:*', 'fs', 'path', 'os', 'stream', 'worker_threads', 'child_process'], message: 'shared/ must stay free of Node imports' },
          { group: ['react', 'react-*', 'express', 'sequelize', 'pg', 'bullmq', 'ioredis'], message: 'shared/ must stay free of framework imports' },
          { group: ['**/server/**', '**/worker/**', '**/src/**'], message: 'shared/ must not import app code' },
        ],
      }],
    },
  },
);
