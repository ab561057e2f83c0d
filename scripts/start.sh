#!/usr/bin/env bash
# npm start: everything a new user needs, on a fresh clone with only Node.js 20 present.
# Installs dependencies, starts the project-local MariaDB (data in .data/), applies
# migrations, seeds the demo team into an empty database (not with a real SMTP_URL), starts
# the local fake mail server with the app (server/index.ts; mail kept in .data/mail), builds,
# and serves the production build on http://localhost:${PORT:-3000}.
# Ctrl-C stops all of it; the next start reuses the data.
set -euo pipefail
cd "$(dirname "$0")/.."
source scripts/lib.sh

export PORT=${PORT:-3000}
export TWISTLOG_DB_DIR=${TWISTLOG_DB_DIR:-.data/mariadb}

if port_busy "$PORT"; then
  log "port $PORT is already in use: stop the other program or choose another, e.g. PORT=3001 npm start"
  exit 1
fi

# Installs the devDependencies too (the build needs them), whatever NODE_ENV says.
ensure_node_modules
export NODE_ENV=production

server_pid=""
stop_all() {
  trap - EXIT INT TERM
  if [ -n "$server_pid" ] && kill -0 "$server_pid" 2>/dev/null; then
    kill -TERM "$server_pid" 2>/dev/null || true
    wait "$server_pid" 2>/dev/null || true
  fi
  bash scripts/mariadb.sh stop || true
}
trap stop_all EXIT
trap 'exit 130' INT TERM

bash scripts/mariadb.sh start
node_modules/.bin/tsx scripts/migrate.ts
signins=""
if [ -z "${SMTP_URL:-}" ]; then signins=$(node_modules/.bin/tsx scripts/seed.ts --if-empty); fi
log "building ..."
npm run -s build >/dev/null
node_modules/.bin/tsx server/index.ts &
server_pid=$!
if wait_for_http "http://127.0.0.1:$PORT/healthz" "$server_pid" 60; then
  [ -n "$signins" ] && printf '%s\n' "$signins" >&2
  [ -z "${SMTP_URL:-}" ] && log "e-mail stays local: admins read it under Outbox in the user menu"
  log "open http://localhost:$PORT  (Ctrl-C stops the app and its database)"
fi
wait "$server_pid"
