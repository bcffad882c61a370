#!/usr/bin/env bash
# npm start: everything happens in scripts/start.ts (see scripts/README.md). exec keeps signals going straight to it.
set -euo pipefail
cd "$(dirname "$0")/.."
exec node_modules/.bin/tsx scripts/start.ts "$@"
