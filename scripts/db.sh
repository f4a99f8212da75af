#!/usr/bin/env bash
# Start or stop one embedded MariaDB by hand (the same one npm start / npm test use):
#   bash scripts/db.sh start test    # test database on 127.0.0.1:3408, writes .env.test, migrates
#   bash scripts/db.sh start dev     # development database on 127.0.0.1:3407 (uses .env)
#   bash scripts/db.sh stop test|dev
#   bash scripts/db.sh reset test    # drop + recreate + migrate the test database
set -euo pipefail
BM_REPO_ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
. "$BM_REPO_ROOT/scripts/lib/common.sh"
. "$BM_REPO_ROOT/scripts/lib/env-files.sh"
cd "$BM_REPO_ROOT"

cmd="${1:-}"; which="${2:-test}"
case "$which" in dev|test) ;; *) bm_die "second argument must be dev or test" ;; esac

if [ "$which" = test ]; then bm_write_test_env; envfile=".env.${TEST_DATA_NAME:-test}"; else bm_write_dev_env; envfile=.env; fi
[ "$which" = test ] && bm_load_env "$envfile" force || bm_load_env "$envfile"

case "$cmd" in
  start|reset)
    mariadb_ensure_installed
    name="$which"; [ "$which" = test ] && name="${TEST_DATA_NAME:-test}"
    mariadb_init "$name"
    mariadb_start "$name" "$DB_PORT"
    [ "$cmd" = reset ] && mariadb_drop_db "$name" "$DB_NAME"
    mariadb_create_db "$name" "$DB_NAME" "$DB_USER" "$DB_PASSWORD"
    npm run --silent migrate
    bm_log "MariaDB '$which' is up; stop it with: bash scripts/db.sh stop $which"
    ;;
  stop)
    mariadb_ensure_installed
    name="$which"; [ "$which" = test ] && name="${TEST_DATA_NAME:-test}"
    mariadb_stop "$name"
    bm_log "MariaDB '$which' stopped"
    ;;
  *) bm_die "usage: bash scripts/db.sh start|stop|reset dev|test" ;;
esac
