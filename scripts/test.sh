#!/usr/bin/env bash
# npm test: the same preparation as npm start, against a separate test database that is
# recreated, then every test (unit, integration on MariaDB, e2e in Chromium).
. "$(dirname "$0")/lib.sh"
mkdir -p .data
T0=$(date +%s)
. scripts/prepare.sh
if ! command -v chromium >/dev/null 2>&1 && [ ! -x /usr/bin/chromium ]; then apt_install chromium; fi

export DB_NAME="${TEST_DB_NAME:-plateau_test}"
export PLATEAU_MODE=test
bash scripts/db.sh create "$DB_NAME" --fresh
node --import tsx scripts/migrate.ts
build_if_stale

export TEST_PORT="${TEST_PORT:-4399}"
export TEST_SMTP_PORT="${TEST_SMTP_PORT:-2599}"
export MAILBOX_DIR="$ROOT/.data/test-mailbox"
rm -rf "$MAILBOX_DIR"; mkdir -p "$MAILBOX_DIR"
start_smtp "$TEST_SMTP_PORT" "$MAILBOX_DIR"
export SMTP_URL="smtp://127.0.0.1:$TEST_SMTP_PORT"
export PUBLIC_URL="http://127.0.0.1:$TEST_PORT"
export PLATEAU_TEST_URL="$PUBLIC_URL"

HOST=127.0.0.1 PORT="$TEST_PORT" OUTBOX_POLL_MS=300 node --import tsx scripts/serve.ts >.data/test-app.log 2>&1 &
APP_PID=$!
cleanup() {
  kill "$APP_PID" 2>/dev/null || true
  kill "$SMTP_PID" 2>/dev/null || true
  if [ "$STARTED_DB" = 1 ]; then bash scripts/db.sh stop >/dev/null; fi
}
trap cleanup EXIT
for _ in $(seq 1 150); do curl -fs "$PLATEAU_TEST_URL/api/health" >/dev/null 2>&1 && break; sleep 0.2; done

if [ $# -eq 0 ]; then
  # The whole suite starts with the linter and the formatter's check (npm run lint).
  say "Lint (ESLint, Prettier check)..."
  npm run --silent lint || { say "LINT FAILED: run npm run lint (and npm run format for formatting)"; exit 1; }
fi

set +e
if [ $# -eq 0 ]; then set -- --project unit --project integration --project e2e; fi
npx vitest run "$@"
rc=$?
set -e
T1=$(date +%s)
if [ $rc = 0 ]; then say "ALL TESTS PASSED in $((T1 - T0)) s (unit, integration on MariaDB, e2e in Chromium)";
else say "TESTS FAILED (exit $rc) after $((T1 - T0)) s; app log: .data/test-app.log"; fi
exit $rc
