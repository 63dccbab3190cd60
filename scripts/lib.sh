# Shared helpers for the project's shell scripts. Source it; do not run it.
# Reads .env when present, then sets defaults for everything the scripts need.
set -euo pipefail
ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$ROOT"
if [ -f .env ]; then set -a; . ./.env; set +a; fi

export ASTRO_TELEMETRY_DISABLED=1
export DB_PORT="${DB_PORT:-3307}"
export DB_DATA_DIR="${DB_DATA_DIR:-$ROOT/.data/mariadb}"
export DB_SOCKET="${DB_SOCKET:-$ROOT/.data/mariadb.sock}"
export DB_PID_FILE="${DB_PID_FILE:-$ROOT/.data/mariadb.pid}"
export DB_LOG="${DB_LOG:-$ROOT/.data/mariadb.log}"
export DB_APP_USER="${DB_APP_USER:-plateau}"
export DB_APP_PASSWORD="${DB_APP_PASSWORD:-plateau-local-dev}"
export SMTP_PORT="${SMTP_PORT:-2525}"
export HOST="${HOST:-127.0.0.1}"
export PORT="${PORT:-4321}"

say() { printf '\033[1;33m[plateau]\033[0m %s\n' "$*"; }

as_root() {
  if [ "$(id -u)" = 0 ]; then "$@";
  elif command -v sudo >/dev/null 2>&1 && sudo -n true 2>/dev/null; then sudo "$@";
  else
    say "Missing system packages. Please run as root:"
    say "  apt-get update && apt-get install -y --no-install-recommends $*"
    exit 1
  fi
}

apt_install() {
  # apt_install pkg... : install Debian packages that are missing
  say "Installing $* with apt (first run only)..."
  if [ "$(id -u)" != 0 ] && ! (command -v sudo >/dev/null 2>&1 && sudo -n true 2>/dev/null); then
    say "Not root and no password-less sudo. Please run:"
    say "  sudo apt-get update && sudo apt-get install -y --no-install-recommends $*"
    exit 1
  fi
  as_root env DEBIAN_FRONTEND=noninteractive apt-get update -qq
  as_root env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends "$@" >/dev/null
}

ensure_node_modules() {
  # npm ci when node_modules is missing or older than package-lock.json
  if [ ! -d node_modules ] || [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
    say "Installing npm packages (npm ci)..."
    npm ci --no-audit --no-fund --loglevel=error
  fi
}

# build_if_stale: astro build unless dist/ is newer than every source file.
build_if_stale() {
  if [ -f dist/server/entry.mjs ] && [ -z "$(find src public astro.config.mjs package-lock.json -newer dist/server/entry.mjs -print -quit 2>/dev/null)" ]; then
    say "Build is up to date"
  else
    say "Building..."
    npx astro build --silent >/dev/null 2>.data/build.log || { cat .data/build.log; exit 1; }
    # The Content-Security-Policy allows exactly the inline scripts this build emits.
    node --import tsx scripts/csp-hashes.ts >>.data/build.log 2>&1 || { cat .data/build.log; exit 1; }
  fi
}

# start_smtp PORT DIR: the fake SMTP server in the background (development and tests only).
start_smtp() {
  mkdir -p "$2"
  SMTP_PORT="$1" MAILBOX_DIR="$2" nohup node --import tsx scripts/fake-smtp.ts >"$ROOT/.data/smtp-$1.log" 2>&1 &
  SMTP_PID=$!
  for _ in $(seq 1 50); do (exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null && break; sleep 0.1; done
}
