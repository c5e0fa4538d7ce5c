#!/usr/bin/env bash
# npm run scale: brings up the whole layout beyond one machine on loopback — a three-node MariaDB
# Galera cluster, HAProxy (deploy/haproxy.cfg) in front of two web processes and the single
# writer, two worker processes, the fake S3 store and an SMTP sink — runs the scenarios of the
# kill test at full size and prints every figure; stops everything at the end.
#   npm run scale                 the scenarios
#   npm run scale -- --bench      also the benchmark: one vs two web processes, one vs two workers
#   npm run scale -- --bench-only the benchmark alone
#   npm run scale -- --keep       leaves the layout running until Ctrl-C (to look around)
source "$(dirname "$0")/lib.sh"
ensure_node_modules
ensure_galera
ensure_haproxy
# The AWS SDK says once that its releases after January 2027 need Node 22 (VERSIONS.md); not news here.
export AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED=true
exec npx tsx scripts/scale.ts "$@"
