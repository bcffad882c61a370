#!/usr/bin/env bash
# npm test: type check, lint, unit tests, then API and browser tests against one throwaway PostgreSQL + Redis
# (scripts/with-services.sh). Stops at the first failure with its exit code. See scripts/README.md.
set -uo pipefail
cd "$(dirname "$0")/.."
export PATH="$PWD/node_modules/.bin:$PATH"
# shellcheck source=lib/steps.sh
source scripts/lib/steps.sh

test_started=$(now)
GATEPOST_TEST_REPORTS=$(mktemp -d "${TMPDIR:-/tmp}/gatepost-reports-XXXXXX")
export GATEPOST_TEST_REPORTS

summary() {
  local code=$?
  printf '\nnpm test %s in %s s\n' "$([ "$code" -eq 0 ] && echo passed || echo FAILED)" "$(elapsed "$test_started")"
  # The last line: tests passed and failed over every vitest run that got as far as writing its report.
  node -e '
    const fs = require("fs"), path = require("path");
    let passed = 0, failed = 0;
    for (const file of fs.readdirSync(process.argv[1]).filter((f) => f.endsWith(".json"))) {
      const report = JSON.parse(fs.readFileSync(path.join(process.argv[1], file), "utf8"));
      passed += report.numPassedTests; failed += report.numFailedTests;
    }
    console.log(`${passed} passed, ${failed} failed`);
  ' "$GATEPOST_TEST_REPORTS" || echo '0 passed, 0 failed'
  rm -rf "$GATEPOST_TEST_REPORTS"
  exit "$code"
}
trap summary EXIT

step typecheck tsc -p .
step lint eslint . --max-warnings=0
# shellcheck disable=SC2046
step unit vitest run $(vitest_json unit)
step services bash scripts/with-services.sh bash scripts/test-integration.sh
