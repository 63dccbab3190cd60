#!/usr/bin/env bash
# npm start: install what is missing, start MariaDB, migrate, load the demo, build, serve.
. "$(dirname "$0")/lib.sh"
mkdir -p .data
. scripts/prepare.sh
# npm start is the demo: it turns demo mode on (the app itself defaults to production, which
# never loads or accepts the demo distillery). PLATEAU_MODE=production npm start serves for real.
export PLATEAU_MODE="${PLATEAU_MODE:-demo}"
export DB_NAME="${DB_NAME:-plateau}"
bash scripts/db.sh create "$DB_NAME"
node --import tsx scripts/migrate.ts
if [ "$PLATEAU_MODE" = demo ] || [ "$PLATEAU_MODE" = development ]; then node --import tsx seed/load.ts; fi
build_if_stale

SMTP_PID=""
if [ -z "${SMTP_URL:-}" ]; then
  start_smtp "$SMTP_PORT" "$ROOT/.data/mailbox"
  export SMTP_URL="smtp://127.0.0.1:$SMTP_PORT"
  export MAILBOX_DIR="$ROOT/.data/mailbox"
fi
export PUBLIC_URL="${PUBLIC_URL:-http://$HOST:$PORT}"

cleanup() {
  trap - INT TERM EXIT
  [ -n "${APP_PID:-}" ] && kill "$APP_PID" 2>/dev/null || true
  [ -n "$SMTP_PID" ] && kill "$SMTP_PID" 2>/dev/null || true
  if [ "$STARTED_DB" = 1 ]; then bash scripts/db.sh stop; fi
  exit 0
}
trap cleanup INT TERM EXIT

HOST="$HOST" PORT="$PORT" node --import tsx scripts/serve.ts &
APP_PID=$!
for _ in $(seq 1 100); do curl -fs "http://$HOST:$PORT/api/health" >/dev/null 2>&1 && break; sleep 0.2; done
if [ "$PLATEAU_MODE" = demo ] || [ "$PLATEAU_MODE" = development ]; then
feed_token="$(cat ".data/demo-feed-token-$DB_NAME" 2>/dev/null || true)"
cat <<MSG

  Plateau is running in $PLATEAU_MODE mode:  http://$HOST:$PORT
  (demo mode: the invented demo distillery, its published sign-ins and the local mailbox are on;
   never expose this server to the internet. README, "Running it for real", says how.)

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
echo "  Mail goes to a local fake SMTP server (kept in .data/mailbox). Links that open an account"
echo "  (sign-up confirmations, password resets, invitations) are printed below as they are sent."
else
cat <<MSG

  Plateau is running in $PLATEAU_MODE mode:  http://$HOST:$PORT
  No demo distillery; set up the first one at http://$HOST:$PORT/sign-up.
MSG
fi
echo
echo "  Press Ctrl-C to stop Plateau and the MariaDB it started."
wait "$APP_PID"
