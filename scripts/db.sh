#!/usr/bin/env bash
# Project-local MariaDB: install (apt), initialise .data/, start on 127.0.0.1:$DB_PORT, stop.
#   bash scripts/db.sh start   -> idempotent; prints nothing to do when already running
#   bash scripts/db.sh stop
#   bash scripts/db.sh status
#   bash scripts/db.sh create DBNAME [--fresh]  -> create (or recreate) a database for the app user
# With DATABASE_URL set, the local instance is not used and start/stop do nothing.
. "$(dirname "$0")/lib.sh"

admin() { mariadb-admin --no-defaults --socket="$DB_SOCKET" -uroot "$@"; }
sql() { mariadb --no-defaults --socket="$DB_SOCKET" -uroot "$@"; }

running() { [ -S "$DB_SOCKET" ] && admin ping >/dev/null 2>&1; }

install_if_missing() {
  if ! command -v mariadbd >/dev/null 2>&1 && [ ! -x /usr/sbin/mariadbd ]; then
    apt_install mariadb-server mariadb-client
  fi
  export PATH="$PATH:/usr/sbin"
}

start() {
  if [ -n "${DATABASE_URL:-}" ]; then say "DATABASE_URL is set: using that MariaDB, not starting a local one."; return 0; fi
  install_if_missing
  mkdir -p "$(dirname "$DB_DATA_DIR")"
  if running; then say "MariaDB already running on 127.0.0.1:$DB_PORT"; ensure_user; return 0; fi
  if [ -f "$DB_PID_FILE" ]; then
    pid="$(cat "$DB_PID_FILE" 2>/dev/null || true)"
    if [ -n "$pid" ] && kill -0 "$pid" 2>/dev/null && grep -q mariadbd "/proc/$pid/cmdline" 2>/dev/null; then
      say "MariaDB (pid $pid) is starting; waiting for it"
    else
      say "Removing stale pid file"; rm -f "$DB_PID_FILE" "$DB_SOCKET"
    fi
  fi
  if [ ! -d "$DB_DATA_DIR/mysql" ]; then
    say "Initialising a private MariaDB data directory in ${DB_DATA_DIR#$ROOT/}"
    mkdir -p "$DB_DATA_DIR"
    mariadb-install-db --no-defaults --datadir="$DB_DATA_DIR" --user="$(id -un)" \
      --auth-root-authentication-method=socket --skip-test-db >/dev/null
  fi
  if ! running && [ ! -f "$DB_PID_FILE" ]; then
    nohup mariadbd --no-defaults --datadir="$DB_DATA_DIR" --socket="$DB_SOCKET" --pid-file="$DB_PID_FILE" \
      --port="$DB_PORT" --bind-address=127.0.0.1 --user="$(id -un)" --log-error="$DB_LOG" \
      --skip-name-resolve --character-set-server=utf8mb4 --collation-server=utf8mb4_unicode_ci \
      --max-connections=400 --innodb-flush-log-at-trx-commit=2 >/dev/null 2>&1 &
  fi
  for _ in $(seq 1 150); do running && break; sleep 0.2; done
  if ! running; then say "MariaDB did not start; see ${DB_LOG}"; tail -20 "$DB_LOG" || true; exit 1; fi
  say "MariaDB running on 127.0.0.1:$DB_PORT (data in ${DB_DATA_DIR#$ROOT/})"
  ensure_user
}

ensure_user() {
  sql -e "CREATE USER IF NOT EXISTS '$DB_APP_USER'@'127.0.0.1' IDENTIFIED BY '$DB_APP_PASSWORD';
          CREATE USER IF NOT EXISTS '$DB_APP_USER'@'localhost' IDENTIFIED BY '$DB_APP_PASSWORD';
          GRANT ALL PRIVILEGES ON \`plateau%\`.* TO '$DB_APP_USER'@'127.0.0.1';
          GRANT ALL PRIVILEGES ON \`plateau%\`.* TO '$DB_APP_USER'@'localhost';
          GRANT RELOAD, PROCESS, LOCK TABLES ON *.* TO '$DB_APP_USER'@'127.0.0.1';
          GRANT RELOAD, PROCESS, LOCK TABLES ON *.* TO '$DB_APP_USER'@'localhost';
          FLUSH PRIVILEGES;"
}

create_db() {
  local name="$1" fresh="${2:-}"
  if [ -n "${DATABASE_URL:-}" ]; then return 0; fi
  if [ "$fresh" = "--fresh" ]; then sql -e "DROP DATABASE IF EXISTS \`$name\`"; fi
  sql -e "CREATE DATABASE IF NOT EXISTS \`$name\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci"
}

stop() {
  if [ -n "${DATABASE_URL:-}" ]; then return 0; fi
  if running; then admin shutdown && say "MariaDB stopped"; else say "MariaDB was not running"; fi
  rm -f "$DB_PID_FILE"
}

case "${1:-start}" in
  start) start ;;
  stop) stop ;;
  status) if running; then echo running; else echo stopped; exit 1; fi ;;
  create) create_db "$2" "${3:-}" ;;
  *) echo "usage: db.sh start|stop|status|create NAME [--fresh]"; exit 2 ;;
esac
