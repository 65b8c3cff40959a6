#!/usr/bin/env bash
# Shared helpers for start.sh and test.sh: install what is missing, run a private MariaDB.
# Sourced, not executed. Everything lives under var/ (git-ignored) so nothing touches the system's data.

EBB_ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$EBB_ROOT"

log() { printf '\033[1;36m[ebbwatch]\033[0m %s\n' "$*"; }
die() { printf '\033[1;31m[ebbwatch]\033[0m %s\n' "$*" >&2; exit 1; }

# Run as root directly, otherwise through sudo (a developer's own machine).
as_root() { if [ "$(id -u)" = 0 ]; then "$@"; else sudo "$@"; fi; }

APT_UPDATED=""
apt_install() {
  local missing=()
  for pkg in "$@"; do dpkg -s "$pkg" >/dev/null 2>&1 || missing+=("$pkg"); done
  [ ${#missing[@]} -eq 0 ] && return 0
  command -v apt-get >/dev/null || die "apt-get not found: install ${missing[*]} by hand (Debian packages)"
  log "installing Debian packages: ${missing[*]}"
  if [ -z "$APT_UPDATED" ]; then as_root apt-get update -qq; APT_UPDATED=1; fi
  as_root env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
}

# npm dependencies: install when missing or when the lock file changed since the last install.
ensure_node_modules() {
  local stamp="node_modules/.ebbwatch-lock-hash" want
  want="$(sha256sum package-lock.json | cut -d' ' -f1)"
  if [ ! -f "$stamp" ] || [ "$(cat "$stamp")" != "$want" ]; then
    log "installing npm dependencies (npm ci)"
    npm ci --no-audit --no-fund --loglevel=error
    echo "$want" > "$stamp"
  fi
}

# start_mariadb NAME PORT: a private server with data in var/NAME, socket and pid beside it.
# Sets DB_SOCKET and MARIADB_PID. Reuses the data folder when it exists.
start_mariadb() {
  local name="$1" port="$2"
  local dir="$EBB_ROOT/var/$name"
  DB_SOCKET="$dir/mysqld.sock"
  local pidfile="$dir/mysqld.pid"
  mkdir -p "$dir"
  if [ -f "$pidfile" ] && kill -0 "$(cat "$pidfile")" 2>/dev/null; then
    log "MariaDB ($name) already running on 127.0.0.1:$port"
    MARIADB_PID="$(cat "$pidfile")"; MARIADB_STARTED_HERE=""; return 0
  fi
  if [ ! -d "$dir/data/mysql" ]; then
    log "initialising MariaDB data folder var/$name/data"
    mariadb-install-db --no-defaults --datadir="$dir/data" --auth-root-authentication-method=normal \
      --skip-test-db --user="$(id -un)" >"$dir/install.log" 2>&1 || { cat "$dir/install.log"; die "mariadb-install-db failed"; }
  fi
  log "starting MariaDB ($name) on 127.0.0.1:$port"
  mariadbd --no-defaults --datadir="$dir/data" --socket="$DB_SOCKET" --port="$port" \
    --bind-address=127.0.0.1 --user="$(id -un)" --pid-file="$pidfile" \
    --character-set-server=utf8mb4 --collation-server=utf8mb4_unicode_ci \
    --default-time-zone='+00:00' --innodb-buffer-pool-size=512M \
    --log-error="$dir/error.log" >/dev/null 2>&1 &
  MARIADB_STARTED_HERE=1
  for _ in $(seq 1 150); do
    [ -S "$DB_SOCKET" ] && mariadb --no-defaults --socket="$DB_SOCKET" -uroot -e 'select 1' >/dev/null 2>&1 && break
    sleep 0.2
  done
  mariadb --no-defaults --socket="$DB_SOCKET" -uroot -e 'select 1' >/dev/null 2>&1 || { tail -20 "$dir/error.log"; die "MariaDB did not start"; }
  MARIADB_PID="$(cat "$pidfile")"; MARIADB_PIDFILE="$pidfile"
}

stop_mariadb() {
  [ -n "${MARIADB_STARTED_HERE:-}" ] && [ -n "${MARIADB_PID:-}" ] || return 0
  # A fault test may have stopped and restarted the server: stop the one the pid file names now.
  if [ -n "${MARIADB_PIDFILE:-}" ] && [ -f "$MARIADB_PIDFILE" ]; then MARIADB_PID="$(cat "$MARIADB_PIDFILE")"; fi
  log "stopping MariaDB"
  kill "$MARIADB_PID" 2>/dev/null || true
  for _ in $(seq 1 100); do kill -0 "$MARIADB_PID" 2>/dev/null || return 0; sleep 0.1; done
}

# create_database NAME USER PASSWORD: idempotent, over the root socket; sets the password every time.
create_database() {
  mariadb --no-defaults --socket="$DB_SOCKET" -uroot <<SQL
CREATE DATABASE IF NOT EXISTS \`$1\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
CREATE USER IF NOT EXISTS '$2'@'127.0.0.1' IDENTIFIED BY '$3';
CREATE USER IF NOT EXISTS '$2'@'localhost' IDENTIFIED BY '$3';
-- The password always follows .env, even when .env was made anew for an existing data folder.
ALTER USER '$2'@'127.0.0.1' IDENTIFIED BY '$3';
ALTER USER '$2'@'localhost' IDENTIFIED BY '$3';
GRANT ALL PRIVILEGES ON \`$1\`.* TO '$2'@'127.0.0.1';
GRANT ALL PRIVILEGES ON \`$1\`.* TO '$2'@'localhost';
SQL
}

# reachable_var_dir NAME: a folder for servers that run as another user (the Galera nodes run as
# `mysql`): var/NAME when every folder above var/ lets others in, else one under /var/tmp named after
# this checkout. A clone inside a root-only folder (root's home, `mktemp -d`) is out of mysql's reach,
# and no chown of the data folder itself helps then.
reachable_var_dir() {
  local dir="$EBB_ROOT/var"
  while [ "$dir" != / ]; do
    if [ -d "$dir" ] && [ "$(( 0$(stat -c '%a' "$dir") & 1 ))" = 0 ]; then
      local base="/var/tmp/ebbwatch-$(printf '%s' "$EBB_ROOT" | sha256sum | cut -c1-12)"
      mkdir -p "$base" && chmod 755 "$base"
      echo "$base/$1"; return 0
    fi
    dir="$(dirname "$dir")"
  done
  echo "$EBB_ROOT/var/$1"
}

# Wait until URL answers (any HTTP status), up to N seconds.
wait_for_http() {
  local url="$1" seconds="${2:-60}"
  for _ in $(seq 1 $((seconds * 5))); do
    node -e 'fetch(process.argv[1]).then(()=>process.exit(0),()=>process.exit(1))' "$url" && return 0
    sleep 0.2
  done
  return 1
}
