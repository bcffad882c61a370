#!/usr/bin/env bash
# Runs a command against a throwaway PostgreSQL and Redis (see scripts/with-services.ts), e.g.
#   bash scripts/with-services.sh vitest run --config tests/api/vitest.config.ts
set -euo pipefail
cd "$(dirname "$0")/.."
# npm puts node_modules/.bin on PATH for its scripts; do the same when this file is run by hand.
export PATH="$PWD/node_modules/.bin:$PATH"
exec node_modules/.bin/tsx scripts/with-services.ts "$@"
