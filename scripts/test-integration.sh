#!/usr/bin/env bash
# Run by scripts/test.sh inside scripts/with-services.sh, so the API and browser tests share one throwaway
# PostgreSQL + Redis. Also usable by hand: bash scripts/with-services.sh bash scripts/test-integration.sh
set -uo pipefail
cd "$(dirname "$0")/.."
export PATH="$PWD/node_modules/.bin:$PATH"
# shellcheck source=lib/steps.sh
source scripts/lib/steps.sh
if [ -z "${GATEPOST_TEST_REPORTS:-}" ]; then
  GATEPOST_TEST_REPORTS=$(mktemp -d "${TMPDIR:-/tmp}/gatepost-reports-XXXXXX")
  export GATEPOST_TEST_REPORTS
  trap 'rm -rf "$GATEPOST_TEST_REPORTS"' EXIT
fi

# shellcheck disable=SC2046
step api vitest run --config tests/api/vitest.config.ts $(vitest_json api)
step build vite build
# shellcheck disable=SC2046
step e2e vitest run --config tests/e2e/vitest.config.ts $(vitest_json e2e)
