#!/usr/bin/env bash
# npm run media:move -- --to s3|local [--limit N]: moves the stored media between the local disk
# and an S3-compatible store, verified key by key; see scripts/media-move.ts and decision 066.
source "$(dirname "$0")/lib.sh"
ensure_node_modules
# The store in use now is the one npm start would use: its settings file, when an earlier move wrote one.
if [ -f "$DATA_DIR/media-store.env" ]; then
  set -a
  # shellcheck disable=SC1091
  source "$DATA_DIR/media-store.env"
  set +a
fi
exec npx tsx scripts/media-move.ts "$@"
