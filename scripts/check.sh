#!/usr/bin/env bash
# npm run check: type-check every tsconfig, lint, then the whole test suite.
source "$(dirname "$0")/lib.sh"
ensure_node_modules
step "Type-checking (client, shared, server)"
npm run -s typecheck
step "Linting"
npx eslint .
bash scripts/test.sh
