#!/usr/bin/env bash
# `npm run bench -- NAME`: runs test/bench/NAME.ts and prints its figures. Benchmarks that need the
# app get the same private services as the tests (test-env.sh) on ports of their own, with the
# production cadence for background work unless told otherwise. Nothing here asserts a time.
set -euo pipefail
source "$(dirname "$0")/lib.sh"
NAME="${1:-}"
[ -f "test/bench/$NAME.ts" ] || die "usage: npm run bench -- <name>, one of: $(ls test/bench | sed 's/\.ts$//' | tr '\n' ' ')"

if [ "$NAME" = computations ]; then
  ensure_node_modules
  exec node --import tsx test/bench/computations.ts
fi

export EBB_TEST_DB_PORT="${EBB_TEST_DB_PORT:-3457}" EBB_TEST_APP_PORT="${EBB_TEST_APP_PORT:-4459}" EBB_OUT_DIR="${EBB_OUT_DIR:-var/dist-bench}"
export EBB_SWEEP_INTERVAL_MS="${EBB_SWEEP_INTERVAL_MS:-20000}" EBB_OUTBOX_INTERVAL_MS="${EBB_OUTBOX_INTERVAL_MS:-2000}"
source "$(dirname "$0")/test-env.sh"
start_test_app
log "running test/bench/$NAME.ts"
node --import tsx "test/bench/$NAME.ts"
