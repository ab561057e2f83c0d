#!/usr/bin/env bash
# npm start: everything a new user needs, on a fresh clone with only Node.js 20 present.
# Installs dependencies, starts the project-local MariaDB (data in .data/), applies
# migrations, seeds the demo team into an empty database (not with a real SMTP_URL), starts
# the local fake mail server with the app (server/index.ts; mail kept in .data/mail), builds,
# and serves the production build on http://localhost:${PORT:-3000}.
# Ctrl-C stops all of it; the next start reuses the data. If the app dies on its own it is
# restarted (the database keeps running), up to 5 times within 60 s.
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
# `node --import tsx` rather than the tsx wrapper: $server_pid is then the server itself.
start_app() {
  node --import tsx server/index.ts &
  server_pid=$!
}
start_app
if wait_for_http "http://127.0.0.1:$PORT/healthz" "$server_pid" 60; then
  [ -n "$signins" ] && printf '%s\n' "$signins" >&2
  [ -z "${SMTP_URL:-}" ] && log "e-mail stays local: admins read it under Outbox in the user menu"
  log "open http://localhost:$PORT  (Ctrl-C stops the app and its database)"
elif ! kill -0 "$server_pid" 2>/dev/null; then
  # It never came up (a setting, a port): its own message says why; restarting would not help.
  log "the app did not start: see its message above"
  exit 1
fi

# The app ending on its own (a crash, the kernel's OOM killer) must not take the database
# with it: start it again, unless it keeps dying. Ctrl-C and SIGTERM reach the trap above
# instead (the shell runs it as soon as `wait` is interrupted).
MAX_RESTARTS=5 RESTART_WINDOW_S=60
restarts=()
while true; do
  code=0
  wait "$server_pid" || code=$?
  server_pid=""
  if [ "$code" -eq 0 ]; then
    log "the app stopped (exit 0, e.g. a signal sent to it alone); stopping the database too"
    exit 0
  fi
  now=$(date +%s)
  recent=()
  for t in "${restarts[@]}"; do [ $((now - t)) -lt "$RESTART_WINDOW_S" ] && recent+=("$t"); done
  restarts=("${recent[@]}" "$now")
  if [ "${#restarts[@]}" -gt "$MAX_RESTARTS" ]; then
    log "the app stopped unexpectedly (exit $code) for the $((MAX_RESTARTS + 1))th time within $RESTART_WINDOW_S s; giving up: stopping the database too (see the messages above)"
    exit 1
  fi
  log "the app stopped unexpectedly (exit $code); restarting in 2 s — the database keeps running"
  sleep 2
  start_app
done
