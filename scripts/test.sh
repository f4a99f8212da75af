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
bm_load_env .env.test
export CHROMIUM_PATH="${CHROMIUM_PATH:-/usr/bin/chromium}"
mariadb_ensure_installed

trap 'bm_stop_all' EXIT
trap 'exit 130' INT TERM

mariadb_init test
mariadb_start test "$DB_PORT"
[ "$MARIADBD_PID" != 0 ] && BM_DB_NAMES+=(test)
mariadb_drop_db test "$DB_NAME"
mariadb_create_db test "$DB_NAME" "$DB_USER" "$DB_PASSWORD"
npm run --silent migrate >/dev/null
npm run --silent seed >/dev/null

LOGS="$DB_DIR/logs"
rm -rf "$LOGS"; mkdir -p "$LOGS"
bm_spawn "$LOGS/fake-smtp.log" node --import tsx scripts/fake-smtp.ts
bm_wait_port "$FAKE_SMTP_PORT" 30 "$BM_LAST_PID" || { cat "$LOGS/fake-smtp.log" >&2; bm_die "fake SMTP server did not start"; }

bm_log "building the app for tests (astro build --outDir dist-test)"
npx astro build --outDir dist-test >"$LOGS/build.log" 2>&1 || { tail -n 40 "$LOGS/build.log" >&2; bm_die "astro build failed (full log $LOGS/build.log)"; }

NODE_ENV=production bm_spawn "$LOGS/app.log" node dist-test/server/entry.mjs
APP_PID=$BM_LAST_PID
if [ -f src/worker/main.ts ]; then
  bm_spawn "$LOGS/worker.log" node --import tsx src/worker/main.ts
fi
bm_wait_http "$BASE_URL/api/health" 60 "$APP_PID" || { tail -n 40 "$LOGS/app.log" >&2; bm_die "the test app did not answer on $BASE_URL"; }
bm_log "test app on $BASE_URL (logs in $LOGS); running vitest"

set +e
npx vitest run "$@"
rc=$?
set -e
exit $rc
