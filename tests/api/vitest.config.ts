import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vitest/config';

// API tests: supertest and real clients against the throwaway PostgreSQL + Redis of scripts/with-services.sh.
// One database is shared by every file, so files run one after another.
export default defineConfig({
  root: fileURLToPath(new URL('../..', import.meta.url)),
  test: {
    include: ['tests/api/**/*.test.ts'],
    environment: 'node',
    globalSetup: ['tests/helpers/services-global-setup.ts'],
    fileParallelism: false,
    testTimeout: 30_000,
    hookTimeout: 60_000,
  },
});
