#!/usr/bin/env bash
# npm run dev: Vite with hot reload on PORT (default 5173 here), /api proxied to the server
# running under watch on API_PORT (default 3001).
source "$(dirname "$0")/lib.sh"
ensure_node_modules
ensure_mariadb_binaries
[ -n "${DATABASE_URL:-}" ] && DATABASE_URL_GIVEN=1
ensure_private_db
ensure_session_secret
npx tsx scripts/prepare-db.ts --seed
export NODE_ENV=development
export API_PORT="${API_PORT:-3001}"
cleanup() {
  trap - INT TERM
  kill $(jobs -p) 2>/dev/null || true
  wait 2>/dev/null || true
  # Stop MariaDB only when this command started it (a running npm start keeps its database).
  [ "$STARTED_DB" = "1" ] && [ -z "${DATABASE_URL_GIVEN:-}" ] && stop_private_db
  exit 0
}
trap cleanup INT TERM
PORT="$API_PORT" npx tsx watch server/index.ts &
npx vite --port "${PORT:-5173}" --strictPort &
wait
