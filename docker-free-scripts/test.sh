#!/usr/bin/env bash
# `npm test`: everything the tests need, started here and stopped at the end — a fresh private
# MariaDB (never the demo's), the built app on a test port — then unit, integration and browser tests.
set -euo pipefail
source "$(dirname "$0")/lib.sh"

source "$(dirname "$0")/test-env.sh"

run_project() {
  local name="$1"
  log "running $name tests"
  # One file at a time: integration and browser files share one app and one database.
  npx vitest run --project "$name" --no-file-parallelism --passWithNoTests --reporter=default --reporter=json --outputFile="$RESULTS/$name.json" "${VITEST_FILTERS[@]}"
}

VITEST_FILTERS=("$@")
status=0
# The gate first: types (astro check for .astro files, tsc for the rest) and Biome's lint and format.
log "checking types, lint and format (npm run check)"
# EBB_CHECKS=off leaves them out of a filtered run while iterating (`npm run check` alone runs them).
CHECKS="passed"
if [ "${EBB_CHECKS:-on}" = off ]; then
  CHECKS="not run (EBB_CHECKS=off)"
else
  npm run --silent check >"$RESULTS/check.log" 2>&1 || { CHECKS="FAILED"; status=1; tail -60 "$RESULTS/check.log"; }
fi
log "checks: $CHECKS"
run_project unit || status=1

start_test_app

run_project integration || status=1
run_project browser || status=1
# Last: the short cluster drill (its own Galera cluster and app instances, reusing this build).
run_project cluster || status=1

# One closing line over all projects, in the plain form CI reads.
node -e '
  const fs = require("fs"); let passed = 0, failed = 0, skipped = 0;
  for (const f of fs.readdirSync(process.argv[1]).filter((f) => f.endsWith(".json"))) {
    const r = JSON.parse(fs.readFileSync(process.argv[1] + "/" + f, "utf8"));
    passed += r.numPassedTests; failed += r.numFailedTests; skipped += r.numPendingTests + (r.numTodoTests ?? 0);
  }
  console.log(`\nchecks (types, lint, format): ${process.argv[2]}`);
  console.log(`ebbwatch: ${passed} passed, ${failed} failed, ${skipped} skipped`);
' "$RESULTS" "$CHECKS"
exit $status
