#!/usr/bin/env bash
# npm test: the same set-up as npm start against a separate, freshly wiped test database
# (.data/test, 127.0.0.1:3408), the app on 127.0.0.1:4322, then every vitest test (unit,
# integration, browser). Extra arguments go to `vitest run` (e.g. a file path). Stops everything it
# started, pass or fail, and exits with vitest's status.
set -euo pipefail
BM_REPO_ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
. "$BM_REPO_ROOT/scripts/lib/common.sh"
. "$BM_REPO_ROOT/scripts/lib/env-files.sh"
cd "$BM_REPO_ROOT"

bm_require_node
bm_ensure_node_modules
if [ ! -x "${CHROMIUM_PATH:-/usr/bin/chromium}" ]; then
  bm_apt_install chromium || bm_die "Chromium is missing for the browser tests. Install it by hand: sudo apt-get install chromium (or set CHROMIUM_PATH)"
fi
bm_write_test_env
bm_load_env ".env.${TEST_DATA_NAME:-test}" force
export BRINKMAP_ENV_FILE=".env.${TEST_DATA_NAME:-test}"
export CHROMIUM_PATH="${CHROMIUM_PATH:-/usr/bin/chromium}"
mariadb_ensure_installed

trap 'bm_stop_all' EXIT
trap 'exit 130' INT TERM

# TEST_DATA_NAME / TEST_DB_PORT / TEST_APP_PORT / TEST_SMTP_PORT let two people test side by side.
TEST_NAME="${TEST_DATA_NAME:-test}"
mariadb_init "$TEST_NAME"
mariadb_start "$TEST_NAME" "$DB_PORT"
[ "$MARIADBD_PID" != 0 ] && BM_DB_NAMES+=("$TEST_NAME")
mariadb_drop_db "$TEST_NAME" "$DB_NAME"
mariadb_create_db "$TEST_NAME" "$DB_NAME" "$DB_USER" "$DB_PASSWORD"
npm run --silent migrate >/dev/null
if [ -n "${TEST_SEED_ONLY:-}" ]; then
  npm run --silent knex -- seed:run --specific="$TEST_SEED_ONLY" >/dev/null   # e.g. 01_demo_workspace.ts
else
  npm run --silent seed >/dev/null
fi

LOGS="$DB_DIR/logs"
rm -rf "$LOGS"; mkdir -p "$LOGS"
bm_spawn "$LOGS/fake-smtp.log" node --import tsx scripts/fake-smtp.ts
bm_wait_port "$FAKE_SMTP_PORT" 30 "$BM_LAST_PID" || { cat "$LOGS/fake-smtp.log" >&2; bm_die "fake SMTP server did not start"; }

bm_log "building the app for tests (astro build --outDir dist-$TEST_NAME)"
npx astro build --outDir "dist-$TEST_NAME" >"$LOGS/build.log" 2>&1 || { tail -n 40 "$LOGS/build.log" >&2; bm_die "astro build failed (full log $LOGS/build.log)"; }

# DEV_PAGES=1 serves /dev/diagram-preview, which tests/e2e/diagram-island.test.ts drives (skips without it).
NODE_ENV=production DEV_PAGES=1 bm_spawn "$LOGS/app.log" node "dist-$TEST_NAME/server/entry.mjs"
APP_PID=$BM_LAST_PID
if [ -f src/worker/main.ts ]; then
  bm_spawn "$LOGS/worker.log" node --import tsx src/worker/main.ts
fi
bm_wait_http "$TEST_BASE_URL/api/health" 60 "$APP_PID" || { tail -n 40 "$LOGS/app.log" >&2; bm_die "the test app did not answer on $TEST_BASE_URL"; }
bm_log "test app on $TEST_BASE_URL (logs in $LOGS); running vitest"

# vitest runs as a tracked child so that a TERM/INT to this script stops it at once, too.
bm_spawn - npx vitest run "$@"
VITEST_PID=$BM_LAST_PID
set +e
wait "$VITEST_PID"
rc=$?
set -e
exit $rc
