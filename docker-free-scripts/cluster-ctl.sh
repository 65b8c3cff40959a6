#!/usr/bin/env bash
# The drill's hands on a running cluster (called by test/drill/cluster.ts with the drill's environment):
#   kill-node I   SIGKILL database node I          start-node I  start node I and wait until it has rejoined
#   kill-app I    SIGKILL app instance I            start-app I   start app instance I and wait for its health check
set -euo pipefail
source "$(dirname "$0")/lib.sh"
source "$(dirname "$0")/galera-lib.sh"
action="${1:-}" n="${2:-1}"
case "$action" in
  kill-node) galera_kill_node "$n" ;;
  start-node) galera_start_node "$n"; galera_wait_synced "$n" 300; log "node $n rejoined; cluster size $(galera_cluster_size "$n")" ;;
  kill-app) app_kill "$n" ;;
  start-app) app_start "$n"; wait_for_http "http://127.0.0.1:$(app_port "$n")/api/health" 60 || die "app instance $n did not come back" ;;
  *) die "usage: cluster-ctl.sh kill-node|start-node|kill-app|start-app N" ;;
esac
