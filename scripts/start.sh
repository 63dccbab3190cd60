#!/usr/bin/env bash
# npm start: install what is missing, start MariaDB, migrate, load the demo, build, serve.
. "$(dirname "$0")/lib.sh"
mkdir -p .data
. scripts/prepare.sh
export DB_NAME="${DB_NAME:-plateau}"
bash scripts/db.sh create "$DB_NAME"
node --import tsx scripts/migrate.ts
node --import tsx seed/load.ts
build_if_stale

SMTP_PID=""
if [ -z "${SMTP_URL:-}" ]; then
  start_smtp "$SMTP_PORT" "$ROOT/.data/mailbox"
  export SMTP_URL="smtp://127.0.0.1:$SMTP_PORT"
  export MAILBOX_DIR="$ROOT/.data/mailbox"
fi
export PLATEAU_MODE="${PLATEAU_MODE:-demo}"
export PUBLIC_URL="${PUBLIC_URL:-http://$HOST:$PORT}"

cleanup() {
  trap - INT TERM EXIT
  [ -n "${APP_PID:-}" ] && kill "$APP_PID" 2>/dev/null || true
  [ -n "$SMTP_PID" ] && kill "$SMTP_PID" 2>/dev/null || true
  if [ "$STARTED_DB" = 1 ]; then bash scripts/db.sh stop; fi
  exit 0
}
trap cleanup INT TERM EXIT

HOST="$HOST" PORT="$PORT" node dist/server/entry.mjs &
APP_PID=$!
for _ in $(seq 1 100); do curl -fs "http://$HOST:$PORT/api/health" >/dev/null 2>&1 && break; sleep 0.2; done
feed_token="$(cat ".data/demo-feed-token-$DB_NAME" 2>/dev/null || true)"
cat <<MSG

  Plateau is running:  http://$HOST:$PORT

  Demo sign-ins (password: plateau-demo), Quillan Ridge Distillery
    manager    mara@quillanridge.example
    planner    tomas@quillanridge.example
    distiller  ines@quillanridge.example
    staff      ollie@quillanridge.example
MSG
if [ -n "$feed_token" ]; then
  echo "  Whole-distillery calendar feed (subscribe in any calendar app):"
  echo "    http://$HOST:$PORT/api/feeds/$feed_token.ics"
else
  echo "  Calendar feed: the demo's feed token was shown when it was first loaded; run npm run db:reset for a new one."
fi
echo "  Fake mailbox (development only): sign in as the manager, Settings -> Mailbox"
echo
echo "  Press Ctrl-C to stop Plateau and the MariaDB it started."
wait "$APP_PID"
