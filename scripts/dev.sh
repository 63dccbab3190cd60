#!/usr/bin/env bash
# npm run dev [-- --name NAME --port PORT [--fresh] [--seed]]: astro dev with hot reload against
# its own database (plateau or plateau_NAME) and its own fake SMTP (port + 100).
# Several can run side by side with different names and ports.
. "$(dirname "$0")/lib.sh"
mkdir -p .data
NAME=""; DEV_PORT=4321; FRESH=""; SEED=1
while [ $# -gt 0 ]; do
  case "$1" in
    --name) NAME="$2"; shift 2 ;;
    --port) DEV_PORT="$2"; shift 2 ;;
    --fresh) FRESH="--fresh"; shift ;;
    --no-seed) SEED=0; shift ;;
    *) shift ;;
  esac
done
. scripts/prepare.sh
# Development mode: the demo distillery, its printed sign-ins and the local mailbox are on.
export PLATEAU_MODE="${PLATEAU_MODE:-development}"
export DB_NAME="plateau${NAME:+_$NAME}"
bash scripts/db.sh create "$DB_NAME" $FRESH
node --import tsx scripts/migrate.ts
if [ "$SEED" = 1 ]; then node --import tsx seed/load.ts; fi
SMTP_DEV_PORT=$((DEV_PORT + 100))
export MAILBOX_DIR="$ROOT/.data/mailbox${NAME:+-$NAME}"
start_smtp "$SMTP_DEV_PORT" "$MAILBOX_DIR"
export SMTP_URL="smtp://127.0.0.1:$SMTP_DEV_PORT"
export PUBLIC_URL="http://127.0.0.1:$DEV_PORT"
trap 'kill $SMTP_PID 2>/dev/null || true' EXIT
say "Dev server for database $DB_NAME on $PUBLIC_URL (mail in ${MAILBOX_DIR#$ROOT/})"
npx astro dev --host 127.0.0.1 --port "$DEV_PORT"
