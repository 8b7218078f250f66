#!/usr/bin/env bash
# Stops the cluster started by scripts/pg-start.sh (PGROOT in the environment) and removes it.
set -euo pipefail
[ -n "${PGROOT:-}" ] || exit 0
PGBIN=$(ls -d /usr/lib/postgresql/*/bin | sort -V | tail -1)
runuser -u postgres -- "$PGBIN/pg_ctl" -D "$PGROOT/data" -m fast -w stop >/dev/null 2>&1 || true
rm -rf "$PGROOT"
