#!/usr/bin/env bash
# npm test: type-check, unit, API and browser tests against a private MariaDB and maildev.
set -euo pipefail
cd "$(dirname "$0")/.."
source scripts/lib/system.sh
ensure_mariadb
ensure_chromium
ensure_node_modules
exec node_modules/.bin/tsx scripts/test.ts "$@"
