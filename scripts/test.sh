#!/usr/bin/env bash
# npm test: the same bootstrap as npm start, but into a throwaway data directory, database
# and ports, so it can run beside a running `npm start`. Then the type check, vitest (unit and
# integration tests against the real MariaDB), the production build and the browser tests in
# Debian's Chromium. Every step runs; the exit code is non-zero if any failed.
#
#   npm test                      everything (what CI runs)
#   npm test -- FILTER...         the same bootstrap, then only the test files whose path contains a
#                                 FILTER (vitest's own filter), without the type check; the browser
#                                 step runs when a filter names a file under tests/e2e
set -uo pipefail
cd "$(dirname "$0")/.."
source scripts/lib.sh

ensure_node_modules || exit 1

if ! command -v chromium >/dev/null && [ ! -x /usr/bin/chromium ]; then
  if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null; then
    log "installing Debian's chromium for the browser tests (first run only) ..."
    DEBIAN_FRONTEND=noninteractive apt-get update -qq >/dev/null
    DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium >/dev/null || exit 1
  else
    log "chromium is missing: install it (Debian/Ubuntu: sudo apt-get install chromium) for the browser tests"
    exit 1
  fi
fi

TEST_ROOT=$(mktemp -d "${TMPDIR:-/tmp}/twistlog-test.XXXXXX")
export TWISTLOG_TEST_ROOT=$TEST_ROOT
export TWISTLOG_DB_DIR=$TEST_ROOT/mariadb
export DATABASE_PORT=${TEST_DATABASE_PORT:-3408}
export DATABASE_NAME=twistlog_test
export TEST_PORT=${TEST_PORT:-3101}
export TWISTLOG_BASE_URL="http://127.0.0.1:$TEST_PORT"
# The test server's fake SMTP server: its own port (npm start uses 2525) and folder.
export FAKE_SMTP_PORT=${TEST_SMTP_PORT:-2526}
export MAIL_DIR=$TEST_ROOT/mail
export TWISTLOG_STORAGE_DIR=$TEST_ROOT/blobs
unset SMTP_URL APP_URL

server_pid=""
teardown() {
  if [ -n "$server_pid" ] && kill -0 "$server_pid" 2>/dev/null; then
    kill -TERM "$server_pid" 2>/dev/null; wait "$server_pid" 2>/dev/null
  fi
  bash scripts/mariadb.sh stop >/dev/null 2>&1
  rm -rf "$TEST_ROOT"
}
trap teardown EXIT
trap 'exit 130' INT TERM

passed=0 failed=0 failed_steps=()
step() {
  local name=$1; shift
  log "── $name"
  if "$@"; then passed=$((passed + 1)); else failed=$((failed + 1)); failed_steps+=("$name"); fi
}

filters=("$@")
if [ ${#filters[@]} -eq 0 ]; then step "type check" npm run -s typecheck; fi
step "test database" bash -c 'bash scripts/mariadb.sh start && node_modules/.bin/tsx scripts/migrate.ts && node_modules/.bin/tsx scripts/seed.ts >/dev/null'
# Built before vitest: integration tests start the production server with broken settings.
step "production build" bash -c 'npm run -s build >/dev/null'
step "unit and integration tests" node_modules/.bin/vitest run --passWithNoTests "${filters[@]}"

start_server() {
  if port_busy "$TEST_PORT"; then log "port $TEST_PORT is in use: set TEST_PORT to a free port"; return 1; fi
  NODE_ENV=production PORT=$TEST_PORT node_modules/.bin/tsx server/index.ts >"$TEST_ROOT/server.log" 2>&1 &
  server_pid=$!
  wait_for_http "$TWISTLOG_BASE_URL/healthz" "$server_pid" 60 || { cat "$TEST_ROOT/server.log" >&2; return 1; }
}
# On a failure the test server's log goes to the output too: it is deleted with the test folder.
browser_tests() {
  node_modules/.bin/vitest run --config vitest.e2e.config.ts --passWithNoTests "${filters[@]}" && return 0
  log "the test server's log (last 80 lines):"
  tail -n 80 "$TEST_ROOT/server.log" >&2
  return 1
}
wants_browser() {
  [ ${#filters[@]} -eq 0 ] && return 0
  local f; for f in "${filters[@]}"; do case "$f" in *e2e*) return 0 ;; esac; done
  return 1
}
if wants_browser; then
  step "test server" start_server
  step "browser tests" browser_tests
fi

echo
if [ "$failed" -gt 0 ]; then log "failed: ${failed_steps[*]}"; fi
echo "test steps: $passed passed, $failed failed"
[ "$failed" -eq 0 ]
