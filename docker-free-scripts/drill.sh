#!/usr/bin/env bash
# `npm run drill -- cluster [--short]`: the hospital-group drill (test/drill/cluster.ts does the load
# and the account). First the same load against ONE MariaDB server, then against a three-node Galera
# cluster behind HAProxy, where it kills (SIGKILL) the writer node and restarts it, and kills an app
# instance and restarts it. Prints one figure a line; exit 1 when anything acknowledged was lost or
# anything was duplicated. DRILL_SECONDS (600) sets the cluster phase's length; --short is the form
# `npm test` runs: about two minutes, a small hospital, one node killed and restarted, no single run.
# --two-writers (with --short, also run by npm test): no faults, but each app instance writes to a
# different node, so background claims and escalation checks race across nodes; the unique
# constraints and certification must still leave each escalation and each mail exactly once.
set -euo pipefail
source "$(dirname "$0")/lib.sh"
[ "${1:-}" = cluster ] || die "usage: npm run drill -- cluster [--short] [--two-writers]"
SHORT="" TWO_WRITERS=""
for arg in "${@:2}"; do
  case "$arg" in --short) SHORT=1 ;; --two-writers) TWO_WRITERS=1 ;; *) die "unknown option $arg" ;; esac
done

export CLUSTER_NAME=drill EBB_CLUSTER_BASE="${EBB_DRILL_BASE:-13600}"
source "$(dirname "$0")/galera-lib.sh"
if [ -n "$SHORT" ]; then
  export DRILL_SECONDS="${DRILL_SECONDS:-110}" DRILL_UNITS="${DRILL_UNITS:-4}" DRILL_BEDS="${DRILL_BEDS:-10}"
  export DRILL_POLLERS="${DRILL_POLLERS:-6}" DRILL_NURSES="${DRILL_NURSES:-2}" DRILL_APP_FAULT=off
else
  export DRILL_SECONDS="${DRILL_SECONDS:-600}"
fi
SINGLE_SECONDS="${DRILL_SINGLE_SECONDS:-$(( DRILL_SECONDS / 3 < 120 ? DRILL_SECONDS / 3 : 120 ))}"

apt_install mariadb-server mariadb-client galera-4 rsync haproxy
ensure_node_modules

export AUTH_SECRET="drill-$(node -e 'console.log(require("crypto").randomBytes(16).toString("hex"))')"
export DB_HOST=127.0.0.1 DB_USER=ebbwatch_drill DB_PASSWORD=ebbwatch_drill DB_NAME=ebbwatch_drill
export PUBLIC_ORIGIN="http://127.0.0.1:$APP_PROXY_PORT" APP_URL="http://127.0.0.1:$APP_PROXY_PORT"
export SMTP_FAKE_PORT=$((CLUSTER_BASE + 5)) SMTP_FAKE_HTTP_PORT=$((CLUSTER_BASE + 6))
export SMTP_URL="smtp://127.0.0.1:$SMTP_FAKE_PORT" SMTP_FAKE_API_URL="http://127.0.0.1:$SMTP_FAKE_HTTP_PORT"
export EBB_OUT_DIR="${EBB_OUT_DIR:-var/dist-drill}"
export EBB_SWEEP_INTERVAL_MS="${EBB_SWEEP_INTERVAL_MS:-5000}" EBB_OUTBOX_INTERVAL_MS="${EBB_OUTBOX_INTERVAL_MS:-1000}"
SINGLE_PORT=$((CLUSTER_BASE + 9))

FAKE_PID=""
cleanup() {
  local code=$?
  trap - EXIT INT TERM
  app_stop_all
  [ -n "$FAKE_PID" ] && kill "$FAKE_PID" 2>/dev/null || true
  haproxy_stop
  galera_stop_all
  stop_mariadb
  exit $code
}
trap cleanup EXIT INT TERM

# Leftovers of an earlier drill (a fresh hospital every time).
[ -d "$CLUSTER_DIR" ] && { for i in $(seq 1 "$CLUSTER_NODES"); do galera_kill_node "$i"; done; for i in $(seq 1 "$CLUSTER_APPS"); do app_kill "$i"; done; haproxy_stop; }
pidfile="$EBB_ROOT/var/drill-single/mysqld.pid"
[ -f "$pidfile" ] && kill "$(cat "$pidfile")" 2>/dev/null && sleep 1
rm -rf "$CLUSTER_DIR" "$EBB_ROOT/var/drill-single"
mkdir -p "$CLUSTER_DIR"
log "drill files (data, logs, figures) in $CLUSTER_DIR"

# npm test has built the app already and says so (DRILL_REUSE_BUILD=1 with its EBB_OUT_DIR).
if [ "${DRILL_REUSE_BUILD:-}" = 1 ] && [ -f "$EBB_OUT_DIR/server/entry.mjs" ]; then
  log "using the app built in $EBB_OUT_DIR"
else
  log "building the app for the drill"
  npx astro build >"$CLUSTER_DIR/build.log" 2>&1 || { tail -40 "$CLUSTER_DIR/build.log"; die "build failed"; }
fi

start_fake() {
  [ -n "$FAKE_PID" ] && kill "$FAKE_PID" 2>/dev/null && sleep 0.5
  export SMTP_FAKE_DIR="$CLUSTER_DIR/smtp-fake-$1"
  node --import tsx docker-free-scripts/smtp-fake.ts >"$CLUSTER_DIR/smtp-fake-$1.log" 2>&1 &
  FAKE_PID=$!
  wait_for_http "$SMTP_FAKE_API_URL/health" 30 || die "the SMTP fake did not start"
}
start_apps() {
  local i
  for i in $(seq 1 "$CLUSTER_APPS"); do
    if [ -n "$TWO_WRITERS" ]; then DB_PORT="$(node_port $(( (i - 1) % CLUSTER_NODES + 1 )))" app_start "$i"; else app_start "$i"; fi
  done
  for i in $(seq 1 "$CLUSTER_APPS"); do wait_for_http "http://127.0.0.1:$(app_port "$i")/api/health" 60 || die "app instance $i did not start"; done
  wait_for_http "$APP_URL/api/health" 30 || die "the app proxy did not answer"
}

haproxy_write_config
haproxy_start

if [ -z "$SHORT" ] && [ -z "$TWO_WRITERS" ]; then
  log "phase 1: the same load against one MariaDB server for $SINGLE_SECONDS s"
  start_fake single
  start_mariadb drill-single "$SINGLE_PORT"
  create_database "$DB_NAME" "$DB_USER" "$DB_PASSWORD"
  DB_PORT="$SINGLE_PORT" npm run --silent migrate >/dev/null
  DB_PORT="$SINGLE_PORT" start_apps
  DB_PORT="$SINGLE_PORT" DRILL_PHASE=single DRILL_FAULTS=off DRILL_SECONDS="$SINGLE_SECONDS" DRILL_RESULT="$CLUSTER_DIR/single.json" \
    node --import tsx test/drill/cluster.ts || log "the single-server phase reported a problem"
  app_stop_all; sleep 1
  stop_mariadb
fi

FAULTS=on; [ -n "$TWO_WRITERS" ] && FAULTS=off
log "phase 2: $CLUSTER_NODES-node Galera cluster for $DRILL_SECONDS s, $([ -n "$TWO_WRITERS" ] && echo 'each app instance writing to its own node' || echo 'with faults')"
start_fake cluster
export DB_PORT="$DB_PROXY_PORT"
cluster_db_up
npm run --silent migrate >/dev/null
start_apps
status=0
DRILL_PHASE=cluster DRILL_FAULTS="$FAULTS" DRILL_RESULT="$CLUSTER_DIR/cluster.json" node --import tsx test/drill/cluster.ts || status=$?
# DRILL_FIGURES: where a caller (the cluster test) wants the cluster phase's figures as JSON.
if [ -n "${DRILL_FIGURES:-}" ] && [ -f "$CLUSTER_DIR/cluster.json" ]; then cp "$CLUSTER_DIR/cluster.json" "$DRILL_FIGURES"; fi

if [ -f "$CLUSTER_DIR/single.json" ] && [ -f "$CLUSTER_DIR/cluster.json" ]; then
  node -e '
    const s = require(process.argv[1]), c = require(process.argv[2]);
    console.log(`board p50 / p95 under load: cluster ${c.boardP50Ms.toFixed(1)} / ${c.boardP95Ms.toFixed(1)} ms beside one server ${s.boardP50Ms.toFixed(1)} / ${s.boardP95Ms.toFixed(1)} ms`);
  ' "$CLUSTER_DIR/single.json" "$CLUSTER_DIR/cluster.json"
fi
exit $status
