#!/usr/bin/env bash
# Shared by scripts/start.sh and scripts/test.sh: node checks, dependencies, env files, process
# bookkeeping. Plain bash so that it runs before any npm install.

BM_REPO_ROOT="${BM_REPO_ROOT:-$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)}"
# shellcheck source=./mariadb.sh
. "$BM_REPO_ROOT/scripts/lib/mariadb.sh"

bm_require_node() {
  command -v node >/dev/null 2>&1 || bm_die "Node.js is missing: install Node.js 20 (https://nodejs.org) and npm"
  command -v npm >/dev/null 2>&1 || bm_die "npm is missing: install npm beside Node.js 20"
  local major
  major="$(node -p 'process.versions.node.split(".")[0]')"
  if [ "$major" -lt 20 ]; then bm_die "Node.js $(node -v) is too old; Brinkmap needs Node.js 20 or newer"; fi
}

# npm ci when node_modules is missing or older than package-lock.json.
bm_ensure_node_modules() {
  cd "$BM_REPO_ROOT"
  if [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
    bm_log "installing npm dependencies (npm ci)"
    npm ci --no-audit --no-fund --loglevel=error || bm_die "npm ci failed"
    touch node_modules/.package-lock.json
  fi
}

# bm_random_secret: 24 url-safe characters from /dev/urandom.
bm_random_secret() {
  head -c 64 /dev/urandom | od -An -tx1 | tr -d ' \n' | cut -c1-24
}

# bm_env_default FILE KEY VALUE: appends KEY=VALUE unless FILE already sets KEY.
bm_env_default() {
  local file="$1" key="$2" value="$3"
  touch "$file"
  if ! grep -qE "^[[:space:]]*$key=" "$file"; then
    printf '%s=%s\n' "$key" "$value" >>"$file"
  fi
}

# bm_load_env FILE [force]: exports every KEY=VALUE of FILE that the caller's environment does not
# set yet (with "force": every one, so a stray DB_PORT in the shell cannot point tests at real data).
bm_load_env() {
  local file="$1" force="${2:-}" line key value
  [ -f "$file" ] || return 0
  while IFS= read -r line || [ -n "$line" ]; do
    case "$line" in ''|'#'*) continue ;; esac
    key="${line%%=*}"
    value="${line#*=}"
    key="$(echo "$key" | tr -d '[:space:]')"
    value="${value%\"}"; value="${value#\"}"
    if [ -n "$force" ] || [ -z "${!key+x}" ]; then export "$key=$value"; fi
  done <"$file"
}

# Processes started by this script (each in its own process group), stopped in reverse order.
BM_PIDS=()
BM_DB_NAMES=()

# bm_spawn LOGFILE CMD...: starts CMD in the background in its own session/process group, so that
# stopping it also stops whatever it spawned; LOGFILE "-" keeps output on the terminal.
bm_spawn() {
  local log="$1"; shift
  if command -v setsid >/dev/null 2>&1; then
    if [ "$log" = "-" ]; then setsid "$@" & else setsid "$@" >>"$log" 2>&1 & fi
  else
    if [ "$log" = "-" ]; then "$@" & else "$@" >>"$log" 2>&1 & fi
  fi
  BM_LAST_PID=$!
  BM_PIDS+=("$BM_LAST_PID")
}

bm_stop_all() {
  local i pid n name
  for ((i=${#BM_PIDS[@]}-1; i>=0; i--)); do
    pid="${BM_PIDS[$i]}"
    kill -TERM -- "-$pid" 2>/dev/null || kill -TERM "$pid" 2>/dev/null || true
  done
  for ((i=${#BM_PIDS[@]}-1; i>=0; i--)); do
    pid="${BM_PIDS[$i]}"
    n=0
    while kill -0 "$pid" 2>/dev/null && [ $n -lt 40 ]; do sleep 0.25; n=$((n+1)); done
    kill -KILL -- "-$pid" 2>/dev/null || kill -KILL "$pid" 2>/dev/null || true
  done
  BM_PIDS=()
  for name in "${BM_DB_NAMES[@]}"; do
    mariadb_stop "$name"
  done
  BM_DB_NAMES=()
}

# bm_wait_http URL SECONDS PID: waits until URL answers (any status) or PID dies.
bm_wait_http() {
  local url="$1" secs="$2" pid="${3:-}" i
  for i in $(seq 1 $((secs * 4))); do
    if node -e "fetch(process.argv[1],{redirect:'manual'}).then(()=>process.exit(0),()=>process.exit(1))" "$url" 2>/dev/null; then
      return 0
    fi
    if [ -n "$pid" ] && ! kill -0 "$pid" 2>/dev/null; then return 1; fi
    sleep 0.25
  done
  return 1
}

# bm_wait_port PORT SECONDS PID: waits until something listens on 127.0.0.1:PORT.
bm_wait_port() {
  local port="$1" secs="$2" pid="${3:-}" i
  for i in $(seq 1 $((secs * 4))); do
    if (exec 3<>"/dev/tcp/127.0.0.1/$port") 2>/dev/null; then return 0; fi
    if [ -n "$pid" ] && ! kill -0 "$pid" 2>/dev/null; then return 1; fi
    sleep 0.25
  done
  return 1
}
