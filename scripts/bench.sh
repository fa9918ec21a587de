#!/usr/bin/env bash
# npm run bench: performance figures printed as JSON lines (a benchmark, not a timed test).
# Chromium is needed too: the bundle and polls parts measure what a real browser fetches.
set -euo pipefail
cd "$(dirname "$0")/.."
source scripts/lib/system.sh
ensure_mariadb
ensure_chromium
ensure_node_modules
exec node_modules/.bin/tsx scripts/bench.ts "$@"
