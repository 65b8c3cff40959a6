#!/usr/bin/env bash
# `npm test`: everything the tests need, started here and stopped at the end — a fresh private
# MariaDB (never the demo's), the built app on a test port — then unit, integration and browser tests.
set -euo pipefail
source "$(dirname "$0")/lib.sh"

# Ports and folders can be moved so two suites can run side by side on one machine.
# Extra arguments go to vitest as file filters: `npm test -- test/integration/charting.test.ts`.
TEST_DB_PORT="${EBB_TEST_DB_PORT:-3417}"
TEST_APP_PORT="${EBB_TEST_APP_PORT:-4399}"
TEST_DB_NAME="test-db-$TEST_DB_PORT"
export EBB_OUT_DIR="${EBB_OUT_DIR:-dist}"
RESULTS="$EBB_ROOT/var/test-results-$TEST_APP_PORT"

apt_install mariadb-server mariadb-client chromium
ensure_node_modules

export AUTH_SECRET="test-secret-$(node -e 'console.log(require("crypto").randomBytes(16).toString("hex"))')"
export DB_HOST=127.0.0.1 DB_PORT="$TEST_DB_PORT" DB_USER=ebbwatch_test DB_PASSWORD=ebbwatch_test DB_NAME=ebbwatch_test
export MIGRATIONS_DB_NAME=ebbwatch_migrations_test
export APP_URL="http://127.0.0.1:$TEST_APP_PORT"
export PUBLIC_ORIGIN="$APP_URL"
export CHROMIUM_PATH="${CHROMIUM_PATH:-/usr/bin/chromium}"
export EBB_SWEEP_INTERVAL_MS="${EBB_SWEEP_INTERVAL_MS:-1000}"
export EBB_OUTBOX_INTERVAL_MS="${EBB_OUTBOX_INTERVAL_MS:-300}" EBB_MAIL_RETRY_BASE_MS="${EBB_MAIL_RETRY_BASE_MS:-1000}"
# The SMTP fake: ports follow the app port so side-by-side suites never share a mailbox.
export SMTP_FAKE_PORT=$((TEST_APP_PORT + 1100)) SMTP_FAKE_HTTP_PORT=$((TEST_APP_PORT + 1101))
export SMTP_FAKE_DIR="$EBB_ROOT/var/smtp-fake-$TEST_APP_PORT"
export SMTP_URL="smtp://127.0.0.1:$SMTP_FAKE_PORT" SMTP_FAKE_API_URL="http://127.0.0.1:$SMTP_FAKE_HTTP_PORT"

cleanup() {
  local code=$?
  trap - EXIT INT TERM
  [ -n "${APP_PID:-}" ] && kill "$APP_PID" 2>/dev/null || true
  for pid in ${EXTRA_PIDS:-}; do kill "$pid" 2>/dev/null || true; done
  stop_mariadb
  exit $code
}
trap cleanup EXIT INT TERM

# A fresh database every run: tests never depend on what an earlier run left.
pidfile="var/$TEST_DB_NAME/mysqld.pid"
if [ -f "$pidfile" ] && kill -0 "$(cat "$pidfile")" 2>/dev/null; then kill "$(cat "$pidfile")"; sleep 1; fi
rm -rf "var/$TEST_DB_NAME" "$RESULTS" "$SMTP_FAKE_DIR"
mkdir -p "$RESULTS"
start_mariadb "$TEST_DB_NAME" "$TEST_DB_PORT"
create_database "$DB_NAME" "$DB_USER" "$DB_PASSWORD"
create_database "$MIGRATIONS_DB_NAME" "$DB_USER" "$DB_PASSWORD"

node --import tsx docker-free-scripts/smtp-fake.ts >"var/smtp-fake-$TEST_APP_PORT.log" 2>&1 &
EXTRA_PIDS="${EXTRA_PIDS:-} $!"
wait_for_http "$SMTP_FAKE_API_URL/health" 30 || { cat "var/smtp-fake-$TEST_APP_PORT.log"; die "the SMTP fake did not start"; }

log "migrating and seeding the test database"
npm run --silent migrate
node --import tsx docker-free-scripts/seed-if-empty.ts

run_project() {
  local name="$1"
  log "running $name tests"
  # One file at a time: integration and browser files share one app and one database.
  npx vitest run --project "$name" --no-file-parallelism --passWithNoTests --reporter=default --reporter=json --outputFile="$RESULTS/$name.json" "${VITEST_FILTERS[@]}"
}

VITEST_FILTERS=("$@")
status=0
run_project unit || status=1

log "building the app"
npx astro build >"var/test-build-$TEST_APP_PORT.log" 2>&1 || { tail -40 "var/test-build-$TEST_APP_PORT.log"; die "build failed"; }
HOST=127.0.0.1 PORT="$TEST_APP_PORT" node "$EBB_OUT_DIR/server/entry.mjs" >"var/test-app-$TEST_APP_PORT.log" 2>&1 &
APP_PID=$!
wait_for_http "$APP_URL/api/health" 60 || { tail -40 "var/test-app-$TEST_APP_PORT.log"; die "the test app did not start"; }

run_project integration || status=1
run_project browser || status=1

# One closing line over all projects, in the plain form CI reads.
node -e '
  const fs = require("fs"); let passed = 0, failed = 0, skipped = 0;
  for (const f of fs.readdirSync(process.argv[1]).filter((f) => f.endsWith(".json"))) {
    const r = JSON.parse(fs.readFileSync(process.argv[1] + "/" + f, "utf8"));
    passed += r.numPassedTests; failed += r.numFailedTests; skipped += r.numPendingTests + (r.numTodoTests ?? 0);
  }
  console.log(`\nebbwatch: ${passed} passed, ${failed} failed, ${skipped} skipped`);
' "$RESULTS"
exit $status
