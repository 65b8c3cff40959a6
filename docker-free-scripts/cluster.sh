#!/usr/bin/env bash
# `npm run cluster`: a hospital group's production shape on loopback — a three-node MariaDB Galera
# cluster behind HAProxy (one writer, the others as backups), two app instances behind HAProxy,
# the SMTP fake and the demo feeder. Migrates once, seeds the demo when empty, prints the URLs;
# Ctrl-C stops everything it started. Ports and counts: EBB_CLUSTER_BASE (13400),
# EBB_CLUSTER_NODES (3), EBB_CLUSTER_APPS (2); see galera-lib.sh for the port plan.
set -euo pipefail
source "$(dirname "$0")/lib.sh"
source "$(dirname "$0")/galera-lib.sh"

ensure_node_modules
mkdir -p "$CLUSTER_DIR"
# Settings made once, like npm start's .env, but the cluster's own.
settings="$CLUSTER_DIR/cluster.env"
if [ ! -f "$settings" ]; then
  cat >"$settings" <<ENV
AUTH_SECRET=$(node -e 'console.log(require("crypto").randomBytes(32).toString("base64url"))')
DB_USER=ebbwatch
DB_PASSWORD=$(node -e 'console.log(require("crypto").randomBytes(12).toString("hex"))')
DB_NAME=ebbwatch
ENV
fi
set -a; source "$settings"; set +a
export DB_HOST=127.0.0.1 DB_PORT="$DB_PROXY_PORT" PUBLIC_ORIGIN="http://127.0.0.1:$APP_PROXY_PORT"
export SMTP_FAKE_PORT=$((CLUSTER_BASE + 5)) SMTP_FAKE_HTTP_PORT=$((CLUSTER_BASE + 6)) SMTP_FAKE_DIR="$CLUSTER_DIR/smtp-fake"
export SMTP_URL="smtp://127.0.0.1:$SMTP_FAKE_PORT" SMTP_FAKE_API_URL="http://127.0.0.1:$SMTP_FAKE_HTTP_PORT"
export EBB_OUT_DIR="${EBB_OUT_DIR:-var/dist-cluster}"

cleanup() {
  trap - EXIT INT TERM
  log "stopping the cluster"
  app_stop_all
  for pid in ${EXTRA_PIDS:-}; do kill "$pid" 2>/dev/null || true; done
  haproxy_stop
  galera_stop_all
  wait 2>/dev/null || true
}
trap cleanup EXIT INT TERM

node --import tsx docker-free-scripts/smtp-fake.ts >"$CLUSTER_DIR/smtp-fake.log" 2>&1 &
EXTRA_PIDS="$!"

cluster_db_up

log "migrating once, through the proxy"
npm run --silent migrate
node --import tsx docker-free-scripts/seed-if-empty.ts

log "building"
npx astro build --silent >"$CLUSTER_DIR/build.log" 2>&1 || { tail -40 "$CLUSTER_DIR/build.log"; die "build failed"; }
for i in $(seq 1 "$CLUSTER_APPS"); do app_start "$i"; done
for i in $(seq 1 "$CLUSTER_APPS"); do wait_for_http "http://127.0.0.1:$(app_port "$i")/api/health" 60 || die "app instance $i did not answer"; done
wait_for_http "http://127.0.0.1:$APP_PROXY_PORT/api/health" 30 || die "the app proxy did not answer"

if [ "${EBB_FEEDER:-on}" != off ]; then
  APP_URL="http://127.0.0.1:$APP_PROXY_PORT" node --import tsx docker-free-scripts/feeder.ts >"$CLUSTER_DIR/feeder.log" 2>&1 &
  EXTRA_PIDS="$EXTRA_PIDS $!"
fi

cat <<MSG

  Ebbwatch on a $CLUSTER_NODES-node Galera cluster with $CLUSTER_APPS app instances:
    app (through HAProxy)       http://127.0.0.1:$APP_PROXY_PORT
    database (through HAProxy)  127.0.0.1:$DB_PROXY_PORT   (nodes on $(for i in $(seq 1 "$CLUSTER_NODES"); do printf '%s ' "$(node_port "$i")"; done))
    HAProxy status              http://127.0.0.1:$STATS_PORT
    app instances               $(for i in $(seq 1 "$CLUSTER_APPS"); do printf 'http://127.0.0.1:%s ' "$(app_port "$i")"; done)
    SMTP fake                   127.0.0.1:$SMTP_FAKE_PORT (admins read it at /admin/mail)
  Demo accounts as for npm start (password ebbwatch-demo). Logs in var/$CLUSTER_NAME/.
  Ctrl-C stops everything.

MSG
while true; do sleep 3600 & wait $!; done
