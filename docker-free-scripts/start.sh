#!/usr/bin/env bash
# `npm start`: install what is missing, start a private MariaDB and the SMTP fake on loopback,
# migrate, seed the demo when empty, build and serve on http://127.0.0.1:4321. Ctrl-C stops it all.
set -euo pipefail
source "$(dirname "$0")/lib.sh"

DB_PORT="${EBB_DB_PORT:-3407}"
APP_PORT="${PORT:-4321}"

apt_install mariadb-server mariadb-client
ensure_node_modules

# AUTH_SECRET and the rest of the local settings live in a git-ignored .env, made once.
if [ ! -f .env ]; then
  log "writing .env with a new AUTH_SECRET"
  cat > .env <<ENV
AUTH_SECRET=$(node -e 'console.log(require("crypto").randomBytes(32).toString("base64url"))')
DB_HOST=127.0.0.1
DB_PORT=$DB_PORT
DB_USER=ebbwatch
DB_PASSWORD=$(node -e 'console.log(require("crypto").randomBytes(12).toString("hex"))')
DB_NAME=ebbwatch
PUBLIC_ORIGIN=http://127.0.0.1:$APP_PORT
ENV
fi
set -a; source .env; set +a

cleanup() {
  trap - EXIT INT TERM
  [ -n "${APP_PID:-}" ] && kill "$APP_PID" 2>/dev/null || true
  for pid in ${EXTRA_PIDS:-}; do kill "$pid" 2>/dev/null || true; done
  # Wait only for what we just stopped: a bare `wait` would also wait for mariadbd, which ignores
  # the terminal's SIGINT, so Ctrl-C would hang before stop_mariadb.
  # shellcheck disable=SC2086
  wait ${APP_PID:-} ${EXTRA_PIDS:-} 2>/dev/null || true
  stop_mariadb
}
trap cleanup EXIT INT TERM

# The SMTP fake's ports can move (EBB_SMTP_PORT) so a second demo can run beside the first.
export SMTP_FAKE_PORT="${EBB_SMTP_PORT:-2525}"
export SMTP_FAKE_HTTP_PORT=$((SMTP_FAKE_PORT + 55)) SMTP_FAKE_DIR="$EBB_ROOT/var/smtp-fake"
export SMTP_URL="${SMTP_URL:-smtp://127.0.0.1:$SMTP_FAKE_PORT}" SMTP_FAKE_API_URL="${SMTP_FAKE_API_URL:-http://127.0.0.1:$SMTP_FAKE_HTTP_PORT}"
log "starting the development SMTP fake on 127.0.0.1:$SMTP_FAKE_PORT (admins read it at /admin/mail)"
mkdir -p var
node --import tsx docker-free-scripts/smtp-fake.ts >var/smtp-fake.log 2>&1 &
EXTRA_PIDS="${EXTRA_PIDS:-} $!"

start_mariadb demo "$DB_PORT"
create_database "$DB_NAME" "$DB_USER" "$DB_PASSWORD"

log "migrating"
npm run --silent migrate
node --import tsx docker-free-scripts/seed-if-empty.ts

log "building"
npx astro build --silent >var/build.log 2>&1 || { tail -40 var/build.log; die "build failed (see var/build.log)"; }

log "serving on http://127.0.0.1:$APP_PORT"
HOST=127.0.0.1 PORT="$APP_PORT" node dist/server/entry.mjs &
APP_PID=$!
wait_for_http "http://127.0.0.1:$APP_PORT/api/health" 60 || die "the app did not answer"

# The HL7 v2 MLLP listener (its own process; EBB_MLLP=off skips it, e.g. on a second app host).
export EBB_MLLP_PORT="${EBB_MLLP_PORT:-2575}" EBB_MLLP_HOST="${EBB_MLLP_HOST:-127.0.0.1}"
if [ "${EBB_MLLP:-on}" != "off" ]; then
  log "HL7 v2 (MLLP) listener on $EBB_MLLP_HOST:$EBB_MLLP_PORT"
  node --import tsx docker-free-scripts/mllp.ts >var/mllp.log 2>&1 &
  EXTRA_PIDS="${EXTRA_PIDS:-} $!"
fi

# The demo feeder plays invented monitor readings into the demo beds through POST /api/ingest,
# or through the MLLP listener as HL7 v2 ORU^R01 with EBB_FEEDER_VIA=mllp.
if [ "${EBB_FEEDER:-on}" != "off" ]; then
  APP_URL="http://127.0.0.1:$APP_PORT" node --import tsx docker-free-scripts/feeder.ts &
  EXTRA_PIDS="${EXTRA_PIDS:-} $!"
fi
cat <<MSG

  Ebbwatch is running at http://127.0.0.1:$APP_PORT  (also http://localhost:$APP_PORT)
  Demo accounts, password ebbwatch-demo:
    nurse@harbourside.example        bedside nurse, Level 4 ICU
    charge@harbourside.example       charge nurse, Level 4 ICU
    intensivist@harbourside.example  intensivist, all units
    outreach@harbourside.example     outreach team, all units
    admin@harbourside.example        administrator
  Ctrl-C stops the app and the database.

MSG
wait "$APP_PID"
