# Shared preparation for `npm start` and `npm test`: packages, MariaDB, database, migrations.
# Source after lib.sh. Sets STARTED_DB=1 when this run started the local MariaDB.
STARTED_DB=0
ensure_node_modules
if [ -z "${DATABASE_URL:-}" ]; then
  if ! bash scripts/db.sh status >/dev/null 2>&1; then STARTED_DB=1; fi
  bash scripts/db.sh start
fi

