#!/usr/bin/env bash
# Sourced by test.sh and bench.sh: starts everything the tests need on loopback — a fresh private
# MariaDB (never the demo's), the SMTP fake, the migrated and seeded database — and defines
# start_test_app, which builds and serves the app. Cleans up on exit.
# Ports and folders can be moved so two suites can run side by side on one machine.
# Extra arguments go to vitest as file filters: `npm test -- test/integration/charting.test.ts`.
TEST_DB_PORT="${EBB_TEST_DB_PORT:-3417}"
TEST_APP_PORT="${EBB_TEST_APP_PORT:-4399}"
TEST_DB_NAME="test-db-$TEST_DB_PORT"
# The fault tests stop and restart this server by its pid file.
export EBB_TEST_DB_DIR="$EBB_ROOT/var/$TEST_DB_NAME"
export EBB_OUT_DIR="${EBB_OUT_DIR:-dist}"
RESULTS="$EBB_ROOT/var/test-results-$TEST_APP_PORT"

apt_install mariadb-server mariadb-client chromium poppler-utils galera-4 rsync haproxy
ensure_node_modules

export AUTH_SECRET="test-secret-$(node -e 'console.log(require("crypto").randomBytes(16).toString("hex"))')"
export DB_HOST=127.0.0.1 DB_PORT="$TEST_DB_PORT" DB_USER=ebbwatch_test DB_PASSWORD=ebbwatch_test DB_NAME=ebbwatch_test
export MIGRATIONS_DB_NAME=ebbwatch_migrations_test
export APP_URL="http://127.0.0.1:$TEST_APP_PORT"
export PUBLIC_ORIGIN="$APP_URL"
# Tests stand in for callers at different addresses with X-Forwarded-For (sign-in throttling per address).
export EBB_TRUST_PROXY=1
export CHROMIUM_PATH="${CHROMIUM_PATH:-/usr/bin/chromium}"
export EBB_SWEEP_INTERVAL_MS="${EBB_SWEEP_INTERVAL_MS:-1000}"
export EBB_OUTBOX_INTERVAL_MS="${EBB_OUTBOX_INTERVAL_MS:-300}" EBB_MAIL_RETRY_BASE_MS="${EBB_MAIL_RETRY_BASE_MS:-1000}"
# A worker killed mid-send leaves its claim: the fault tests wait for it to lapse, so keep it short here.
export EBB_MAIL_LEASE_MS="${EBB_MAIL_LEASE_MS:-15000}"
# The SMTP fake: ports follow the app port so side-by-side suites never share a mailbox.
export SMTP_FAKE_PORT=$((TEST_APP_PORT + 1100)) SMTP_FAKE_HTTP_PORT=$((TEST_APP_PORT + 1101))
export SMTP_FAKE_DIR="$EBB_ROOT/var/smtp-fake-$TEST_APP_PORT"
export SMTP_URL="smtp://127.0.0.1:$SMTP_FAKE_PORT" SMTP_FAKE_API_URL="http://127.0.0.1:$SMTP_FAKE_HTTP_PORT"
# The HL7 v2 MLLP listener: its port follows the app port too.
export EBB_MLLP_PORT=$((TEST_APP_PORT + 1200)) EBB_MLLP_HOST=127.0.0.1

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

# The MLLP listener is its own process (see docker-free-scripts/mllp.ts); it needs the migrated database.
node --import tsx docker-free-scripts/mllp.ts >"var/mllp-$TEST_APP_PORT.log" 2>&1 &
EXTRA_PIDS="${EXTRA_PIDS:-} $!"
for _ in $(seq 1 300); do # up to 60 s: tsx compiles it first, slow on a busy 2-core machine
  grep -q "HL7 v2 listener on" "var/mllp-$TEST_APP_PORT.log" 2>/dev/null && break
  sleep 0.2
done
grep -q "HL7 v2 listener on" "var/mllp-$TEST_APP_PORT.log" || { cat "var/mllp-$TEST_APP_PORT.log"; die "the MLLP listener did not start"; }


start_test_app() {
  log "building the app"
  npx astro build >"var/test-build-$TEST_APP_PORT.log" 2>&1 || { tail -40 "var/test-build-$TEST_APP_PORT.log"; die "build failed"; }
  HOST=127.0.0.1 PORT="$TEST_APP_PORT" node "$EBB_OUT_DIR/server/entry.mjs" >"var/test-app-$TEST_APP_PORT.log" 2>&1 &
  APP_PID=$!
  wait_for_http "$APP_URL/api/health" 60 || { tail -40 "var/test-app-$TEST_APP_PORT.log"; die "the test app did not start"; }
}
