#!/usr/bin/env bash
# Sourced by cluster.sh, cluster-ctl.sh and drill.sh (after lib.sh): a MariaDB Galera cluster on
# loopback with HAProxy in front, everything under var/$CLUSTER_NAME. Ports come from one base
# (EBB_CLUSTER_BASE) so a drill and a demo cluster can run side by side:
#   base+1 HAProxy → database (one writer, the other nodes as backups)
#   base+2 HAProxy → app instances (HTTP, health-checked on /api/health)   base+3 HAProxy stats
#   base+5 SMTP fake, base+6 its HTTP view
#   base+10+i MariaDB of node i, base+20+i Galera replication, base+30+i IST, base+40+i SST (rsync)
#   base+50+i app instance i
CLUSTER_NAME="${CLUSTER_NAME:-cluster}"
CLUSTER_BASE="${EBB_CLUSTER_BASE:-13400}"
CLUSTER_NODES="${EBB_CLUSTER_NODES:-3}"
CLUSTER_APPS="${EBB_CLUSTER_APPS:-2}"
CLUSTER_DIR="$(reachable_var_dir "$CLUSTER_NAME")"
DB_PROXY_PORT=$((CLUSTER_BASE + 1))
APP_PROXY_PORT=$((CLUSTER_BASE + 2))
STATS_PORT=$((CLUSTER_BASE + 3))
node_port() { echo $((CLUSTER_BASE + 10 + $1)); }
app_port() { echo $((CLUSTER_BASE + 50 + $1)); }
node_dir() { echo "$CLUSTER_DIR/node$1"; }

galera_addresses() {
  local list="" i
  for i in $(seq 1 "$CLUSTER_NODES"); do list="$list${list:+,}127.0.0.1:$((CLUSTER_BASE + 20 + i))"; done
  echo "$list"
}

# The data folder belongs to mysql: the rsync state transfer drops to an unprivileged user that
# must be able to enter it (a root-owned folder makes the transfer fail).
galera_init_node() {
  local dir; dir="$(node_dir "$1")"
  mkdir -p "$dir"
  chown mysql:mysql "$dir"
  if [ ! -d "$dir/data/mysql" ]; then
    mariadb-install-db --no-defaults --user=mysql --datadir="$dir/data" --auth-root-authentication-method=normal \
      --skip-test-db >"$dir/install.log" 2>&1 || { cat "$dir/install.log"; die "mariadb-install-db failed for node $1"; }
  fi
  chown -R mysql:mysql "$dir"
}

# galera_start_node I [new]: starts node I in the background; "new" bootstraps a new cluster.
galera_start_node() {
  local i="$1" dir; dir="$(node_dir "$1")"
  local bootstrap=()
  [ "${2:-}" = new ] && bootstrap=(--wsrep-new-cluster)
  rm -f "$dir/mysqld.pid"
  # A node killed while it was the only one left may refuse to bootstrap without this flag.
  [ "${2:-}" = new ] && [ -f "$dir/data/grastate.dat" ] && sed -i 's/^safe_to_bootstrap: 0/safe_to_bootstrap: 1/' "$dir/data/grastate.dat"
  mariadbd --no-defaults --user=mysql --datadir="$dir/data" --socket="$dir/mysqld.sock" \
    --port="$(node_port "$i")" --bind-address=127.0.0.1 --pid-file="$dir/mysqld.pid" \
    --character-set-server=utf8mb4 --collation-server=utf8mb4_unicode_ci --default-time-zone='+00:00' \
    --innodb-buffer-pool-size=256M --log-error="$dir/error.log" \
    --binlog-format=ROW --innodb-autoinc-lock-mode=2 --wsrep-on=ON \
    --wsrep-provider=/usr/lib/galera/libgalera_smm.so --wsrep-cluster-name="ebbwatch-$CLUSTER_NAME" \
    --wsrep-cluster-address="gcomm://$(galera_addresses)" --wsrep-node-address=127.0.0.1 \
    --wsrep-provider-options="gmcast.listen_addr=tcp://127.0.0.1:$((CLUSTER_BASE + 20 + i));ist.recv_addr=127.0.0.1:$((CLUSTER_BASE + 30 + i))" \
    --wsrep-sst-method=rsync --wsrep-sst-receive-address="127.0.0.1:$((CLUSTER_BASE + 40 + i))" \
    --wsrep-node-name="node$i" "${bootstrap[@]}" >/dev/null 2>&1 &
  disown $! # a node the drill kills on purpose is not a job for this shell to report
}

node_sql() { mariadb --no-defaults --socket="$(node_dir "$1")/mysqld.sock" -uroot -N -B -e "$2" 2>/dev/null; }

# Waits until node I answers and reports itself synced with the cluster.
galera_wait_synced() {
  local i="$1" seconds="${2:-120}" state
  for _ in $(seq 1 $((seconds * 5))); do
    state="$(node_sql "$i" "SHOW STATUS LIKE 'wsrep_local_state_comment'" | cut -f2 || true)"
    [ "$state" = Synced ] && return 0
    sleep 0.2
  done
  tail -30 "$(node_dir "$i")/error.log"
  die "node $i did not join the cluster"
}

node_pid() { cat "$(node_dir "$1")/mysqld.pid" 2>/dev/null || true; }

galera_kill_node() {
  local pid; pid="$(node_pid "$1")"
  [ -n "$pid" ] && kill -9 "$pid" 2>/dev/null || true
  rm -f "$(node_dir "$1")/mysqld.pid"
}

galera_stop_all() {
  local i pid
  for i in $(seq "$CLUSTER_NODES" -1 1); do
    pid="$(node_pid "$i")"
    [ -n "$pid" ] && kill "$pid" 2>/dev/null || true
  done
  for i in $(seq 1 "$CLUSTER_NODES"); do
    pid="$(node_pid "$i")"
    for _ in $(seq 1 100); do { [ -z "$pid" ] || ! kill -0 "$pid" 2>/dev/null; } && break; sleep 0.1; done
  done
}

galera_cluster_size() { node_sql "$1" "SHOW STATUS LIKE 'wsrep_cluster_size'" | cut -f2 || true; }

# HAProxy: the database as one writer with the others as backups (the usual way to keep Galera
# free of certification conflicts), health-checked with a MariaDB handshake; the app instances
# round-robin, health-checked on /api/health.
haproxy_write_config() {
  local cfg="$CLUSTER_DIR/haproxy.cfg" i
  {
    echo "global"
    echo "  maxconn 4000"
    echo "defaults"
    echo "  timeout connect 2s"
    echo "  timeout client 1h"
    echo "  timeout server 1h"
    echo "  timeout check 2s"
    echo "listen database"
    echo "  bind 127.0.0.1:$DB_PROXY_PORT"
    echo "  mode tcp"
    echo "  option mysql-check user haproxy_check"
    # A node marked down loses its sessions at once, and when the first node is back the backup's
    # sessions end, so the app never writes to two nodes for long.
    echo "  default-server check inter 1s rise 2 fall 2 on-marked-down shutdown-sessions on-marked-up shutdown-backup-sessions"
    for i in $(seq 1 "$CLUSTER_NODES"); do
      echo "  server node$i 127.0.0.1:$(node_port "$i")$([ "$i" -gt 1 ] && echo ' backup')"
    done
    echo "listen app"
    echo "  bind 127.0.0.1:$APP_PROXY_PORT"
    echo "  mode http"
    echo "  balance roundrobin"
    echo "  option httpchk GET /api/health"
    echo "  http-check expect status 200"
    echo "  retry-on conn-failure empty-response 503"
    echo "  retries 2"
    echo "  option redispatch"
    for i in $(seq 1 "$CLUSTER_APPS"); do
      echo "  server app$i 127.0.0.1:$(app_port "$i") check inter 1s rise 2 fall 2"
    done
    echo "listen stats"
    echo "  bind 127.0.0.1:$STATS_PORT"
    echo "  mode http"
    echo "  stats enable"
    echo "  stats uri /"
  } >"$cfg"
}

haproxy_start() {
  haproxy -f "$CLUSTER_DIR/haproxy.cfg" -D -p "$CLUSTER_DIR/haproxy.pid" || die "HAProxy did not start"
}

haproxy_stop() {
  [ -f "$CLUSTER_DIR/haproxy.pid" ] && kill "$(cat "$CLUSTER_DIR/haproxy.pid")" 2>/dev/null || true
  rm -f "$CLUSTER_DIR/haproxy.pid"
}

# Starts app instance I against the database proxy, its log in var/$CLUSTER_NAME/appI.log.
app_start() {
  local i="$1"
  HOST=127.0.0.1 PORT="$(app_port "$i")" EBB_INSTANCE="app$i" node "$EBB_OUT_DIR/server/entry.mjs" >>"$CLUSTER_DIR/app$i.log" 2>&1 &
  echo $! >"$CLUSTER_DIR/app$i.pid"
  disown $!
}
app_pid() { cat "$CLUSTER_DIR/app$1.pid" 2>/dev/null || true; }
app_kill() { local pid; pid="$(app_pid "$1")"; [ -n "$pid" ] && kill -9 "$pid" 2>/dev/null || true; rm -f "$CLUSTER_DIR/app$1.pid"; }
app_stop_all() { local i pid; for i in $(seq 1 "$CLUSTER_APPS"); do pid="$(app_pid "$i")"; [ -n "$pid" ] && kill "$pid" 2>/dev/null || true; done; }

# Brings the whole database side up: nodes, the database and the app user, the proxy's check user.
cluster_db_up() {
  local i
  apt_install mariadb-server mariadb-client galera-4 rsync haproxy
  mkdir -p "$CLUSTER_DIR"
  for i in $(seq 1 "$CLUSTER_NODES"); do galera_init_node "$i"; done
  log "starting Galera node 1 (new cluster) on 127.0.0.1:$(node_port 1)"
  galera_start_node 1 new
  galera_wait_synced 1
  DB_SOCKET="$(node_dir 1)/mysqld.sock"
  create_database "$DB_NAME" "$DB_USER" "$DB_PASSWORD"
  mariadb --no-defaults --socket="$DB_SOCKET" -uroot -e "CREATE USER IF NOT EXISTS 'haproxy_check'@'127.0.0.1'"
  for i in $(seq 2 "$CLUSTER_NODES"); do
    log "starting Galera node $i on 127.0.0.1:$(node_port "$i")"
    galera_start_node "$i"
    galera_wait_synced "$i"
  done
  log "cluster size $(galera_cluster_size 1)"
  haproxy_write_config
  haproxy_start
}
