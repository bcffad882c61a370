import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vitest/config';

// Browser tests: Debian's Chromium through playwright-core against the app started on the throwaway services
// (tests/helpers/app-processes.ts). One database and a 2-core machine: files run one after another.
export default defineConfig({
  root: fileURLToPath(new URL('../..', import.meta.url)),
  test: {
    include: ['tests/e2e/**/*.e2e.ts'],
    environment: 'node',
    globalSetup: ['tests/helpers/services-global-setup.ts'],
    fileParallelism: false,
    testTimeout: 60_000,
    hookTimeout: 120_000,
  },
});
