#!/usr/bin/env bash
# npm run dev: the same private services as npm start, with Vite's dev server and a watching API.
set -euo pipefail
cd "$(dirname "$0")/.."
source scripts/lib/system.sh
ensure_mariadb
ensure_node_modules
exec node_modules/.bin/tsx scripts/start.ts --dev
