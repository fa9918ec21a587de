#!/usr/bin/env bash
# npm run cluster / npm run test:cluster: three Galera nodes, HAProxy and two Ferrolane processes on loopback.
set -euo pipefail
cd "$(dirname "$0")/.."
source scripts/lib/system.sh
ensure_galera
ensure_haproxy
ensure_node_modules
if [ "${1:-}" = "--test" ]; then exec node_modules/.bin/tsx scripts/cluster/test.ts; fi
exec node_modules/.bin/tsx scripts/cluster/run.ts
