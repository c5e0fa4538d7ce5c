#!/usr/bin/env bash
# npm run bench: every benchmark under tests/bench, one after another. Figures, not tests.
source "$(dirname "$0")/lib.sh"
ensure_node_modules
ensure_imagemagick
for f in tests/bench/*.bench.ts; do
  [ -e "$f" ] || continue
  step "$f"
  npx tsx "$f"
done
