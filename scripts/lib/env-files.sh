#!/usr/bin/env bash
# Default settings of the embedded local setup. .env (development) is merged: keys a person set are
# kept, missing keys are added. .env.test is rewritten on every test run.

bm_write_dev_env() {
  local f="$BM_REPO_ROOT/.env"
  if [ ! -f "$f" ]; then
    printf '# Brinkmap local settings (written by npm start; edit freely, missing keys get defaults).\n' >"$f"
  fi
  bm_env_default "$f" DB_HOST 127.0.0.1
  bm_env_default "$f" DB_PORT 3407
  bm_env_default "$f" DB_USER brinkmap
  bm_env_default "$f" DB_PASSWORD "$(bm_random_secret)"
  bm_env_default "$f" DB_NAME brinkmap
  bm_env_default "$f" HOST 127.0.0.1
  bm_env_default "$f" PORT 4321
  bm_env_default "$f" PUBLIC_ORIGIN http://127.0.0.1:4321
  bm_env_default "$f" FAKE_SMTP_PORT 2525
  bm_env_default "$f" SMTP_URL smtp://127.0.0.1:2525
  bm_env_default "$f" MAIL_FROM '"Brinkmap <no-reply@brinkmap.invalid>"'
  bm_env_default "$f" DEV_MAIL_PAGE 1
}

bm_write_test_env() {
  local f="$BM_REPO_ROOT/.env.${TEST_DATA_NAME:-test}"
  cat >"$f" <<ENV
# Written by scripts/test.sh / scripts/db.sh on every run; vitest.config.ts loads it.
DB_HOST=127.0.0.1
DB_PORT=${TEST_DB_PORT:-3408}
DB_USER=brinkmap_test
DB_PASSWORD=brinkmap-test
DB_NAME=brinkmap_test
HOST=127.0.0.1
PORT=${TEST_APP_PORT:-4322}
PUBLIC_ORIGIN=http://127.0.0.1:${TEST_APP_PORT:-4322}
TEST_BASE_URL=http://127.0.0.1:${TEST_APP_PORT:-4322}
FAKE_SMTP_PORT=${TEST_SMTP_PORT:-2526}
SMTP_URL=smtp://127.0.0.1:${TEST_SMTP_PORT:-2526}
MAIL_FROM=Brinkmap Test <no-reply@brinkmap.invalid>
DEV_MAIL_PAGE=1
TRUST_PROXY=1
RATE_LIMIT_ACCOUNT_FAILURES=5
RATE_LIMIT_ADDRESS_FAILURES=12
ENV
}
