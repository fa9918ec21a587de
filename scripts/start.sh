#!/usr/bin/env bash
# npm start: everything a newcomer needs, then Ferrolane with its demo data.
set -euo pipefail
cd "$(dirname "$0")/.."
source scripts/lib/system.sh
ensure_mariadb
ensure_node_modules
exec node_modules/.bin/tsx scripts/start.ts
