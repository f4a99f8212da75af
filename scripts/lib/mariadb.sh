#!/usr/bin/env bash
# Embedded MariaDB for local use and tests: our own data directory, port and socket on loopback,
# never the system service and never port 3306. Sourced by scripts/start.sh, scripts/test.sh and
# scripts/db.sh; every function is safe to call twice.
#
#   MARIADB_BIN_DIR   folder holding mariadbd / mariadb-install-db / mariadb of another install
#   DB_DATA_ROOT      where data directories live (default: <repo>/.data)

BM_REPO_ROOT="${BM_REPO_ROOT:-$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)}"
DB_DATA_ROOT="${DB_DATA_ROOT:-$BM_REPO_ROOT/.data}"

bm_log() { printf '[brinkmap] %s\n' "$*" >&2; }
bm_die() { printf '[brinkmap] ERROR: %s\n' "$*" >&2; exit 1; }

# Runs apt-get as root directly, or through sudo (non-interactive) otherwise.
bm_apt_install() {
  local pkgs=("$@")
  local runner=()
  if [ "$(id -u)" -ne 0 ]; then
    if command -v sudo >/dev/null 2>&1 && sudo -n true 2>/dev/null; then
      runner=(sudo -n)
    elif command -v sudo >/dev/null 2>&1 && [ -t 0 ]; then
      runner=(sudo)
    else
      return 1
    fi
  fi
  command -v apt-get >/dev/null 2>&1 || return 1
  bm_log "installing ${pkgs[*]} with apt-get (one-time)"
  DEBIAN_FRONTEND=noninteractive "${runner[@]}" apt-get -o DPkg::Lock::Timeout=600 update -qq >/dev/null 2>&1 || true
  DEBIAN_FRONTEND=noninteractive "${runner[@]}" apt-get -o DPkg::Lock::Timeout=600 install -y -qq --no-install-recommends "${pkgs[@]}" >/dev/null
}

# Finds a binary in MARIADB_BIN_DIR, PATH, /usr/sbin or /usr/bin (mysqld-era names as fallback).
bm_find_bin() {
  local name
  for name in "$@"; do
    if [ -n "${MARIADB_BIN_DIR:-}" ] && [ -x "$MARIADB_BIN_DIR/$name" ]; then echo "$MARIADB_BIN_DIR/$name"; return 0; fi
    if command -v "$name" >/dev/null 2>&1; then command -v "$name"; return 0; fi
    for d in /usr/sbin /usr/bin /usr/local/bin /usr/local/sbin; do
      if [ -x "$d/$name" ]; then echo "$d/$name"; return 0; fi
    done
  done
  return 1
}

# Sets MARIADBD, MARIADB_INSTALL_DB, MARIADB_CLIENT, MARIADB_ADMIN; installs mariadb-server when missing.
mariadb_ensure_installed() {
  if ! bm_find_bin mariadbd mysqld >/dev/null; then
    if [ -n "${MARIADB_BIN_DIR:-}" ]; then
      bm_die "MARIADB_BIN_DIR=$MARIADB_BIN_DIR has no mariadbd"
    fi
    bm_apt_install mariadb-server mariadb-client || bm_die "mariadbd is missing and could not be installed automatically.
  Install it by hand:   sudo apt-get install mariadb-server
  or point MARIADB_BIN_DIR at a folder holding mariadbd, mariadb-install-db and mariadb."
  fi
  MARIADBD="$(bm_find_bin mariadbd mysqld)" || bm_die "mariadbd not found after install"
  MARIADB_INSTALL_DB="$(bm_find_bin mariadb-install-db mysql_install_db)" || bm_die "mariadb-install-db not found"
  MARIADB_CLIENT="$(bm_find_bin mariadb mysql)" || bm_die "mariadb client not found (apt-get install mariadb-client)"
  MARIADB_ADMIN="$(bm_find_bin mariadb-admin mysqladmin)" || bm_die "mariadb-admin not found (apt-get install mariadb-client)"
  export MARIADBD MARIADB_INSTALL_DB MARIADB_CLIENT MARIADB_ADMIN
}

# mariadb_paths NAME -> sets DB_DIR, DB_DATADIR, DB_SOCKET_PATH, DB_PIDFILE, DB_LOGFILE
mariadb_paths() {
  local name="$1"
  DB_DIR="$DB_DATA_ROOT/$name"
  DB_DATADIR="$DB_DIR/data"
  DB_SOCKET_PATH="$DB_DIR/mariadb.sock"
  DB_PIDFILE="$DB_DIR/mariadbd.pid"
  DB_LOGFILE="$DB_DIR/mariadbd.log"
}

# mariadb_init NAME: creates the data directory on first use (kept afterwards).
mariadb_init() {
  mariadb_paths "$1"
  mkdir -p "$DB_DIR"
  if [ ! -d "$DB_DATADIR/mysql" ]; then
    bm_log "creating MariaDB data directory $DB_DATADIR"
    rm -rf "$DB_DATADIR"
    local as_user=()
    [ "$(id -u)" -eq 0 ] && as_user=(--user=root)
    local basedir=()
    [ -n "${MARIADB_BIN_DIR:-}" ] && basedir=(--basedir="$(dirname "$MARIADB_BIN_DIR")")
    "$MARIADB_INSTALL_DB" --no-defaults "${as_user[@]}" "${basedir[@]}" --datadir="$DB_DATADIR" \
      --auth-root-authentication-method=socket --skip-test-db >"$DB_DIR/install.log" 2>&1 \
      || { cat "$DB_DIR/install.log" >&2; bm_die "mariadb-install-db failed (log above)"; }
  fi
}

mariadb_ping() {
  "$MARIADB_ADMIN" --no-defaults --protocol=socket --socket="$DB_SOCKET_PATH" -uroot ping >/dev/null 2>&1
}

# mariadb_start NAME PORT: starts mariadbd in the background (if not already answering) and waits.
# Sets MARIADBD_PID when this call started it (0 when it was already running).
mariadb_start() {
  local name="$1" port="$2"
  mariadb_paths "$name"
  MARIADBD_PID=0
  if mariadb_ping; then
    bm_log "MariaDB '$name' already running on 127.0.0.1:$port"
    return 0
  fi
  if (exec 3<>"/dev/tcp/127.0.0.1/$port") 2>/dev/null; then
    bm_die "port $port is taken by another program; set DB_PORT to a free port"
  fi
  local as_user=()
  [ "$(id -u)" -eq 0 ] && as_user=(--user=root)
  local detach=()
  command -v setsid >/dev/null 2>&1 && detach=(setsid)
  "${detach[@]}" "$MARIADBD" --no-defaults "${as_user[@]}" --datadir="$DB_DATADIR" --socket="$DB_SOCKET_PATH" \
    --port="$port" --bind-address=127.0.0.1 --pid-file="$DB_PIDFILE" --log-error="$DB_LOGFILE" \
    --character-set-server=utf8mb4 --collation-server=utf8mb4_unicode_ci \
    --default-storage-engine=InnoDB --innodb-buffer-pool-size=64M --max-connections=200 --max-allowed-packet=256M \
    --skip-name-resolve >/dev/null 2>&1 &
  MARIADBD_PID=$!
  local i
  for i in $(seq 1 120); do
    if mariadb_ping; then
      bm_log "MariaDB '$name' answering on 127.0.0.1:$port (socket $DB_SOCKET_PATH)"
      return 0
    fi
    if ! kill -0 "$MARIADBD_PID" 2>/dev/null; then
      tail -n 30 "$DB_LOGFILE" >&2 || true
      bm_die "mariadbd exited during start-up (log above, full log $DB_LOGFILE)"
    fi
    sleep 0.5
  done
  bm_die "mariadbd did not answer within 60 s (see $DB_LOGFILE)"
}

# mariadb_sql NAME SQL: runs SQL as the local root user over the socket.
mariadb_sql() {
  mariadb_paths "$1"
  "$MARIADB_CLIENT" --no-defaults --protocol=socket --socket="$DB_SOCKET_PATH" -uroot -e "$2"
}

# mariadb_create_db NAME DBNAME USER PASSWORD: database + user allowed from loopback only.
mariadb_create_db() {
  local name="$1" db="$2" user="$3" pass="$4"
  mariadb_sql "$name" "CREATE DATABASE IF NOT EXISTS \`$db\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
CREATE USER IF NOT EXISTS '$user'@'127.0.0.1' IDENTIFIED BY '$pass';
CREATE USER IF NOT EXISTS '$user'@'localhost' IDENTIFIED BY '$pass';
ALTER USER '$user'@'127.0.0.1' IDENTIFIED BY '$pass';
ALTER USER '$user'@'localhost' IDENTIFIED BY '$pass';
GRANT ALL PRIVILEGES ON \`$db\`.* TO '$user'@'127.0.0.1';
GRANT ALL PRIVILEGES ON \`$db\`.* TO '$user'@'localhost';
FLUSH PRIVILEGES;"
}

# mariadb_drop_db NAME DBNAME
mariadb_drop_db() {
  mariadb_sql "$1" "DROP DATABASE IF EXISTS \`$2\`;"
}

# mariadb_stop NAME: clean shutdown of the server using this data directory.
mariadb_stop() {
  mariadb_paths "$1"
  if mariadb_ping; then
    "$MARIADB_ADMIN" --no-defaults --protocol=socket --socket="$DB_SOCKET_PATH" -uroot shutdown >/dev/null 2>&1 || true
  fi
  local pid=""
  [ -f "$DB_PIDFILE" ] && pid="$(cat "$DB_PIDFILE" 2>/dev/null || true)"
  local i
  for i in $(seq 1 60); do
    if [ -z "$pid" ] || ! kill -0 "$pid" 2>/dev/null; then return 0; fi
    sleep 0.5
  done
  [ -n "$pid" ] && kill -9 "$pid" 2>/dev/null || true
}
