#!/usr/bin/env bash
# A project-local MariaDB: its own data directory, its own port, loopback only.
#   scripts/mariadb.sh start | stop | status
# Settings (environment): TWISTLOG_DB_DIR (default .data/mariadb), DATABASE_PORT (3407),
# DATABASE_NAME (twistlog), DATABASE_USER (twistlog), DATABASE_PASSWORD (twistlog-local).
# It never touches the system's own MariaDB (3306) and never binds a non-loopback address.
set -euo pipefail
cd "$(dirname "$0")/.."

DIR=${TWISTLOG_DB_DIR:-.data/mariadb}
mkdir -p "$DIR"
DIR=$(cd "$DIR" && pwd)
PORT=${DATABASE_PORT:-3407}
NAME=${DATABASE_NAME:-twistlog}
DB_USER=${DATABASE_USER:-twistlog}
DB_PASSWORD=${DATABASE_PASSWORD:-twistlog-local}
PIDFILE="$DIR/mariadbd.pid"
LOG="$DIR/error.log"
SOCK="$DIR/mariadb.sock"
# A Unix socket path must fit in 107 bytes; fall back to /tmp for deep checkouts.
if [ ${#SOCK} -gt 100 ]; then SOCK="/tmp/twistlog-$(printf '%s' "$DIR" | md5sum | cut -c1-12).sock"; fi

say() { printf 'mariadb: %s\n' "$*" >&2; }
die() { say "$*"; exit 1; }

find_mariadbd() {
  MARIADBD=$(command -v mariadbd || true)
  [ -n "$MARIADBD" ] || { [ -x /usr/sbin/mariadbd ] && MARIADBD=/usr/sbin/mariadbd; } || true
  if [ -z "$MARIADBD" ]; then
    if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null; then
      say "installing Debian's mariadb-server (first run only) ..."
      DEBIAN_FRONTEND=noninteractive apt-get update -qq >/dev/null
      DEBIAN_FRONTEND=noninteractive apt-get install -y -qq mariadb-server >/dev/null
      MARIADBD=$(command -v mariadbd || echo /usr/sbin/mariadbd)
    else
      die "mariadbd was not found: install MariaDB (Debian/Ubuntu: sudo apt-get install mariadb-server) or put mariadbd on PATH."
    fi
  fi
  [ -x "$MARIADBD" ] || die "mariadbd at $MARIADBD is not executable: reinstall mariadb-server."
}

running() { [ -f "$PIDFILE" ] && kill -0 "$(cat "$PIDFILE")" 2>/dev/null; }
ping_db() { mariadb-admin --no-defaults --socket="$SOCK" -uroot ping >/dev/null 2>&1; }
port_busy() { (exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null; }
root_sql() { mariadb --no-defaults --socket="$SOCK" -uroot -e "$1"; }

start() {
  find_mariadbd
  if running && ping_db; then
    say "already running on 127.0.0.1:$PORT (data in $DIR)"
  else
    rm -f "$PIDFILE"
    port_busy "$PORT" && die "port $PORT is already in use by another program: stop it or set DATABASE_PORT to a free port."
    if [ ! -d "$DIR/mysql" ]; then
      say "initialising a new data directory in $DIR"
      mariadb-install-db --no-defaults --datadir="$DIR" --auth-root-authentication-method=normal \
        --skip-test-db >"$DIR/install.log" 2>&1 || die "could not initialise $DIR (see $DIR/install.log)."
    fi
    local as_root=()
    [ "$(id -u)" = 0 ] && as_root=(--user=root)
    # setsid: Ctrl-C in the terminal reaches our scripts, which then shut MariaDB down in order.
    setsid "$MARIADBD" --no-defaults --datadir="$DIR" --socket="$SOCK" --port="$PORT" \
      --bind-address=127.0.0.1 --skip-name-resolve --pid-file="$PIDFILE" --log-error="$LOG" \
      --innodb-buffer-pool-size=128M --innodb-flush-log-at-trx-commit=2 --max-connections=300 \
      "${as_root[@]}" </dev/null >/dev/null 2>&1 &
    for _ in $(seq 1 120); do
      ping_db && break
      if ! kill -0 $! 2>/dev/null; then
        die "mariadbd stopped while starting: $(grep -i error "$LOG" | tail -n 1)"
      fi
      sleep 0.5
    done
    ping_db || die "mariadbd did not answer within 60 s (see $LOG)."
    say "running on 127.0.0.1:$PORT (data in $DIR)"
  fi
  root_sql "CREATE DATABASE IF NOT EXISTS \`$NAME\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
    CREATE USER IF NOT EXISTS '$DB_USER'@'127.0.0.1' IDENTIFIED BY '$DB_PASSWORD';
    CREATE USER IF NOT EXISTS '$DB_USER'@'localhost' IDENTIFIED BY '$DB_PASSWORD';
    GRANT ALL PRIVILEGES ON \`${NAME}%\`.* TO '$DB_USER'@'127.0.0.1';
    GRANT ALL PRIVILEGES ON \`${NAME}%\`.* TO '$DB_USER'@'localhost';" ||
    die "could not create database '$NAME' and user '$DB_USER'."
}

stop() {
  if ! running; then say "not running (data in $DIR)"; return 0; fi
  local pid; pid=$(cat "$PIDFILE")
  kill -TERM "$pid" 2>/dev/null || true
  for _ in $(seq 1 120); do kill -0 "$pid" 2>/dev/null || break; sleep 0.25; done
  if kill -0 "$pid" 2>/dev/null; then say "mariadbd ($pid) did not stop in 30 s; killing it"; kill -KILL "$pid"; fi
  rm -f "$PIDFILE"
  say "stopped"
}

case "${1:-}" in
  start) start ;;
  stop) stop ;;
  status) if running && ping_db; then say "running on 127.0.0.1:$PORT (data in $DIR)"; else say "not running"; exit 1; fi ;;
  *) echo "usage: scripts/mariadb.sh start|stop|status" >&2; exit 2 ;;
esac
