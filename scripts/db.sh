#!/usr/bin/env bash
# npm run db:stop | npm run db:reset [-- --yes]
source "$(dirname "$0")/lib.sh"
cmd="${1:-}"; shift || true
case "$cmd" in
  stop)
    [ -n "${DATABASE_URL:-}" ] && fail "DATABASE_URL is set: Plumbline does not stop a server it did not start"
    stop_private_db
    ;;
  reset)
    yes=0
    for a in "$@"; do [ "$a" = "--yes" ] && yes=1; done
    if [ $yes -ne 1 ]; then
      read -r -p "Drop every table of the Plumbline database and reseed the demo? [y/N] " ans
      case "$ans" in y|Y|yes) ;; *) echo "Nothing changed."; exit 0 ;; esac
    fi
    ensure_node_modules
    ensure_mariadb_binaries
    ensure_private_db
    step "Dropping and reseeding"
    npx tsx scripts/prepare-db.ts --reset --seed
    [ "$STARTED_DB" = "1" ] && stop_private_db
    ;;
  *) fail "usage: scripts/db.sh stop|reset [--yes]" ;;
esac
