#!/usr/bin/env bash
# npm test: the same bootstrap as npm start, then the whole suite (domain, API against a
# throw-away MariaDB database, client components, Chromium). Ends with `N passed, N failed`.
source "$(dirname "$0")/lib.sh"
ensure_node_modules
ensure_mariadb_binaries
ensure_chromium
# The layout tests (tests/layout: a Galera cluster behind HAProxy, decision 067).
ensure_galera
ensure_haproxy
[ -n "${DATABASE_URL:-}" ] && DATABASE_URL_GIVEN=1
ensure_private_db
step "Building the client for the browser tests"
build_client_if_stale
export NODE_ENV=test
# A zone other than UTC, so a date that shifts by a day between machines shows up here.
export TZ="${TEST_TZ:-America/New_York}"
export SESSION_SECRET="${SESSION_SECRET:-test-secret-not-for-production-0123456789}"
step "Running the test suite"
set +e
npx vitest run "$@"
rc=$?
set -e
[ "$STARTED_DB" = "1" ] && [ -z "${DATABASE_URL_GIVEN:-}" ] && stop_private_db
exit $rc
