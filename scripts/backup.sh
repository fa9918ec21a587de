#!/usr/bin/env bash
# npm run backup: see scripts/backup.ts. The MariaDB client tools come with Debian's mariadb-client.
set -euo pipefail
cd "$(dirname "$0")/.."
source scripts/lib/system.sh
command -v mariadb-dump >/dev/null 2>&1 || apt_install mariadb-client
exec node_modules/.bin/tsx scripts/backup.ts "$@"
