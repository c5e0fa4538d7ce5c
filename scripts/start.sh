#!/usr/bin/env bash
# npm start: everything from a fresh clone — dependencies, the private MariaDB, migrations,
# the demo seed, the client build, then the server and the local mail sink.
source "$(dirname "$0")/lib.sh"
T0=$(date +%s.%N)
ensure_node_modules
ensure_mariadb_binaries
[ -n "${DATABASE_URL:-}" ] && DATABASE_URL_GIVEN=1
ensure_private_db
ensure_session_secret
# The media store npm run media:move switched to, once every file verified (decision 066): the
# demo seed writes its photos there too.
if [ -f "$DATA_DIR/media-store.env" ]; then set -a; source "$DATA_DIR/media-store.env"; set +a; fi
step "Migrating and seeding the demo (idempotent)"
npx tsx scripts/prepare-db.ts --seed
build_client_if_stale
export NODE_ENV="${NODE_ENV:-production}"
step "Starting Plumbline ($(node -e "console.log(((Date.now()/1000)-$T0).toFixed(1))") s of set-up)"

SERVER_PID=""
shutdown() {
  trap - INT TERM
  if [ -n "$SERVER_PID" ] && kill -0 "$SERVER_PID" 2>/dev/null; then
    kill -TERM "$SERVER_PID" 2>/dev/null || true
    wait "$SERVER_PID" 2>/dev/null || true
  fi
  [ -z "${DATABASE_URL_GIVEN:-}" ] && stop_private_db
  exit 0
}
trap shutdown INT TERM
node --import tsx server/index.ts --banner &
SERVER_PID=$!
wait "$SERVER_PID" || true
shutdown
