import { defineConfig } from 'vitest/config';

// Unit tests only. API and browser tests have their own configs (tests/api, tests/e2e) because they need
// PostgreSQL, Redis and Chromium, which scripts/test.sh starts around them.
export default defineConfig({
  test: {
    include: ['tests/unit/**/*.test.{ts,tsx}'],
    environment: 'node',
    setupFiles: ['tests/helpers/unit-setup.ts'],
    testTimeout: 20_000,
  },
});
