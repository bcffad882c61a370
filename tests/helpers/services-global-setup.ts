// globalSetup of the API and browser test configs: these tests need the throwaway PostgreSQL and Redis that
// scripts/with-services.sh starts, so running them bare fails at once with what to do instead.
export default function requireTestServices(): void {
  const missing = ['GATEPOST_TEST_DATABASE_URL', 'GATEPOST_TEST_REDIS_URL'].filter((name) => !process.env[name]);
  if (missing.length > 0) {
    throw new Error(
      `${missing.join(' and ')} not set: these tests need the throwaway PostgreSQL and Redis; ` +
        'run them through npm test or npm run test:api / npm run test:e2e',
    );
  }
}
