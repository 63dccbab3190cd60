#!/usr/bin/env bash
# npm run db:reset: drop and rebuild the app database, then load the demo distillery.
. "$(dirname "$0")/lib.sh"
mkdir -p .data
. scripts/prepare.sh
export PLATEAU_MODE="${PLATEAU_MODE:-demo}"
export DB_NAME="${DB_NAME:-plateau}"
bash scripts/db.sh create "$DB_NAME" --fresh
node --import tsx scripts/migrate.ts
node --import tsx seed/load.ts
say "Database $DB_NAME rebuilt with the demo distillery."
