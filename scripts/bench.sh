#!/usr/bin/env bash
# npm run bench: the benchmarks under tests/bench, one after another. Figures, not tests.
#   npm run bench                  every benchmark
#   npm run bench -- health        only tests/bench/health.bench.ts (several names may be given)
#   npm run bench -- pages         the public pages in Chromium as a throttled phone (builds the client when stale)
# Like npm test, it starts the private MariaDB when DATABASE_URL is not given (the digest and
# public-pages benchmarks each make a database of their own in it) and stops it afterwards if
# this run started it.
source "$(dirname "$0")/lib.sh"
ensure_node_modules

files=()
if [ $# -eq 0 ]; then
  for f in tests/bench/*.bench.ts; do [ -e "$f" ] && files+=("$f"); done
else
  for name in "$@"; do
    f="tests/bench/${name%.bench.ts}.bench.ts"
    [ -e "$f" ] || fail "No benchmark called $name. There are: $(cd tests/bench && ls ./*.bench.ts | sed 's|^\./||; s|\.bench\.ts$||' | tr '\n' ' ')"
    files+=("$f")
  done
fi

for f in "${files[@]}"; do
  [ "$f" = "tests/bench/images.bench.ts" ] && ensure_imagemagick
  # The phone page benchmark loads the built client.
  [ "$f" = "tests/bench/pages.bench.ts" ] && build_client_if_stale
done

ensure_mariadb_binaries
[ -n "${DATABASE_URL:-}" ] && DATABASE_URL_GIVEN=1
ensure_private_db
# Stop what this run started, whether the benchmarks finish or fail.
trap '[ "$STARTED_DB" = "1" ] && [ -z "${DATABASE_URL_GIVEN:-}" ] && stop_private_db' EXIT

for f in "${files[@]}"; do
  step "$f"
  npx tsx "$f"
done
