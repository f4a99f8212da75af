#!/usr/bin/env bash
# npm start: everything a fresh Debian machine with Node.js 20 needs, then the app on
# http://127.0.0.1:4321. Plain bash so it works before `npm install`. Ctrl-C stops what it started.
set -euo pipefail
BM_REPO_ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
. "$BM_REPO_ROOT/scripts/lib/common.sh"
. "$BM_REPO_ROOT/scripts/lib/env-files.sh"
cd "$BM_REPO_ROOT"

bm_require_node
bm_ensure_node_modules
bm_write_dev_env
bm_load_env .env
mariadb_ensure_installed

trap 'bm_stop_all' EXIT
trap 'echo; bm_log "stopping"; exit 130' INT TERM

mariadb_init dev
mariadb_start dev "$DB_PORT"
[ "$MARIADBD_PID" != 0 ] && BM_DB_NAMES+=(dev)
mariadb_create_db dev "$DB_NAME" "$DB_USER" "$DB_PASSWORD"

bm_log "applying database migrations"
npm run --silent migrate
if [ ! -f "$DB_DIR/seeded" ]; then
  bm_log "loading the demo data (first run only; again with: npm run seed)"
  npm run --silent seed
  touch "$DB_DIR/seeded"
fi

mkdir -p "$DB_DIR/logs"
bm_spawn "$DB_DIR/logs/fake-smtp.log" node --import tsx scripts/fake-smtp.ts
bm_wait_port "$FAKE_SMTP_PORT" 30 "$BM_LAST_PID" || bm_die "fake SMTP server did not start (see $DB_DIR/logs/fake-smtp.log)"

bm_log "building the app (astro build)"
npx astro build >"$DB_DIR/logs/build.log" 2>&1 || { tail -n 40 "$DB_DIR/logs/build.log" >&2; bm_die "astro build failed (log above, full log $DB_DIR/logs/build.log)"; }

export NODE_ENV=production
bm_spawn - node dist/server/entry.mjs
APP_PID=$BM_LAST_PID
if [ -f src/worker/main.ts ]; then
  bm_log "starting the run worker (npm run worker)"
  bm_spawn - node --import tsx src/worker/main.ts
fi
bm_wait_http "http://$HOST:$PORT/api/health" 60 "$APP_PID" || bm_die "the app did not answer on http://$HOST:$PORT"

node -e '
const d = JSON.parse(require("fs").readFileSync("seeds/demo-accounts.json", "utf8"));
const url = process.argv[1];
console.log("\n  Brinkmap is running at " + url + "\n");
console.log("  Demo sign-ins (invented demo team \"" + d.workspace.name + "\"):");
for (const u of d.users) console.log("    " + u.role.padEnd(9) + u.email.padEnd(34) + u.password);
console.log("\n  Mails sent by the app (invitations) are caught locally: " + url + "/dev/mail (owner)");
console.log("  Press Ctrl-C to stop the app and its database.\n");
' "$PUBLIC_ORIGIN"

# Stay up until Ctrl-C or until a started process ends.
wait -n "${BM_PIDS[@]}" || true
bm_log "a process ended; stopping the rest"
