#!/usr/bin/env bash
# npm run cluster: Twistlog scaled out on one machine, from the same parts a multi-machine
# deployment uses (docs/deploy.md): a 3-node MariaDB Galera cluster, s3rver as the S3-compatible
# bucket, CLUSTER_APPS app instances (default 2, each with its own analysis workers) and
# HAProxy in front of both the app instances (HTTP, health checks on /healthz, no sticky
# sessions) and the Galera nodes (TCP, only nodes that are synced). Data under .data/cluster/.
#
#   npm run cluster            start everything, seed the demo, print where it listens; Ctrl-C
#                              stops all of it (the next start reuses the data)
#   npm run cluster -- status  each part's health (exit 1 when any part is down)
#   npm run cluster -- stop    stop a cluster started in the background (the tests do)
#   npm run cluster -- kill-app N | kill-node N | start-node N   fault drills (tests/cluster/)
#   npm run cluster -- only-app N | all-apps   HAProxy sends to app N alone / to all again
#
# Ports follow CLUSTER_PORT (default 3800): HAProxy's web port CLUSTER_PORT, app instances +1…,
# HAProxy's database port +10, Galera nodes' SQL ports +11…+13, group communication +21…+23,
# incremental state transfer +31…+33, full state transfer +41…+43, the bucket +50, the
# fake mail server +51, HAProxy's statistics page +52.
set -euo pipefail
cd "$(dirname "$0")/.."
source scripts/lib.sh

BASE=${CLUSTER_PORT:-3800}
APPS=${CLUSTER_APPS:-2}
DIR=${CLUSTER_DIR:-.data/cluster}
mkdir -p "$DIR"
DIR=$(cd "$DIR" && pwd)
NODES=3
DB_NAME=${DATABASE_NAME:-twistlog}
DB_USER=${DATABASE_USER:-twistlog}
DB_PASSWORD=${DATABASE_PASSWORD:-twistlog-local}
CHECK_USER=haproxy_check
GALERA_LIB=${GALERA_LIB:-/usr/lib/galera/libgalera_smm.so}

web_port=$BASE
app_port() { echo $((BASE + $1)); }
db_port=$((BASE + 10))
node_sql() { echo $((BASE + 10 + $1)); }
node_gcomm() { echo $((BASE + 20 + $1)); }
node_ist() { echo $((BASE + 30 + $1)); }
node_sst() { echo $((BASE + 40 + $1)); }
s3_port=$((BASE + 50))
smtp_port=$((BASE + 51))
stats_port=$((BASE + 52))
node_dir() { echo "$DIR/node$1"; }
node_sock() { echo "$DIR/node$1.sock"; }

# Galera nodes (node_cnf, start_galera, start_node, stop_node …) and HAProxy (haproxy_cfg).
source scripts/cluster-galera.sh
source scripts/cluster-haproxy.sh

# --- the bucket and the app instances --------------------------------------------------------

export STORAGE=s3 S3_ENDPOINT="http://127.0.0.1:$s3_port" S3_BUCKET=twistlog S3_REGION=us-east-1
export AWS_ACCESS_KEY_ID=${AWS_ACCESS_KEY_ID:-S3RVER} AWS_SECRET_ACCESS_KEY=${AWS_SECRET_ACCESS_KEY:-S3RVER}
export DATABASE_HOST=127.0.0.1 DATABASE_PORT=$db_port DATABASE_NAME=$DB_NAME
export DATABASE_USER=$DB_USER DATABASE_PASSWORD=$DB_PASSWORD
export FAKE_SMTP_PORT=$smtp_port MAIL_DIR="$DIR/mail" TRUST_PROXY=loopback
export NODE_ENV=production
# The project pins Node.js 20; the AWS SDK would print its Node 22 notice in every instance.
export AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED=true

app_pid() { cat "$DIR/app$1.pid" 2>/dev/null || true; }
start_app() {
  local i=$1 role=other
  [ "$i" = 1 ] && role=first
  # CLUSTER_ROLE=other: the fake mail server and the demo's sign-offs run in instance 1 only.
  PORT=$(app_port "$i") CLUSTER_ROLE=$role setsid node --import tsx server/index.ts \
    >>"$DIR/app$i.log" 2>&1 </dev/null &
  echo $! >"$DIR/app$i.pid"
}

# --- commands ------------------------------------------------------------------------------

http_ok() { curl -sf -m 3 -o /dev/null "$1"; }

status() {
  local bad=0 n
  for n in $(seq 1 $NODES); do
    if node_running "$n"; then
      printf 'galera node%s  127.0.0.1:%s  %s, cluster size %s\n' "$n" "$(node_sql "$n")" \
        "$(node_state "$n")" "$(node_size "$n")"
      [ "$(node_state "$n")" = Synced ] || bad=1
    else printf 'galera node%s  127.0.0.1:%s  down\n' "$n" "$(node_sql "$n")"; bad=1; fi
  done
  if http_ok "http://127.0.0.1:$s3_port/"; then printf 'bucket        %s  up\n' "$S3_ENDPOINT/twistlog"
  else printf 'bucket        %s  down\n' "$S3_ENDPOINT"; bad=1; fi
  for n in $(seq 1 "$APPS"); do
    local h; h=$(curl -s -m 3 "http://127.0.0.1:$(app_port "$n")/healthz" || true)
    printf 'app%s          127.0.0.1:%s  %s\n' "$n" "$(app_port "$n")" "${h:-down}"
    [ "$h" = '{"ok":true,"db":"up"}' ] || bad=1
  done
  local h; h=$(curl -s -m 3 "http://127.0.0.1:$web_port/healthz" || true)
  printf 'haproxy       http://127.0.0.1:%s  %s (database via 127.0.0.1:%s, statistics http://127.0.0.1:%s/)\n' \
    "$web_port" "${h:-down}" "$db_port" "$stats_port"
  [ "$h" = '{"ok":true,"db":"up"}' ] || bad=1
  return $bad
}

stop_all() {
  trap - EXIT INT TERM
  local i p
  for i in $(seq 1 "$APPS"); do
    p=$(app_pid "$i"); [ -n "$p" ] && kill -TERM "$p" 2>/dev/null || true
  done
  for i in $(seq 1 "$APPS"); do
    p=$(app_pid "$i"); [ -n "$p" ] || continue
    for _ in $(seq 1 40); do kill -0 "$p" 2>/dev/null || break; sleep 0.25; done
    kill -KILL "$p" 2>/dev/null || true; rm -f "$DIR/app$i.pid"
  done
  p=$(cat "$DIR/haproxy.pid" 2>/dev/null || true); [ -n "$p" ] && kill -TERM "$p" 2>/dev/null || true
  p=$(cat "$DIR/s3.pid" 2>/dev/null || true); [ -n "$p" ] && kill -TERM "$p" 2>/dev/null || true
  # The last node to stop is the one safe to bootstrap from next time.
  for n in $(seq $NODES -1 1); do stop_node "$n"; done
  rm -f "$DIR/haproxy.pid" "$DIR/s3.pid" "$DIR/supervisor.pid"
  log "cluster stopped"
}

# HAProxy, and mariabackup for Galera's full state transfer, from Debian's packages.
ensure_packages() {
  local missing=()
  command -v haproxy >/dev/null || missing+=(haproxy)
  command -v mariabackup >/dev/null || missing+=(mariadb-backup)
  command -v socat >/dev/null || missing+=(socat)
  [ ${#missing[@]} = 0 ] && return 0
  if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null; then
    log "installing Debian's ${missing[*]} (first run only) ..."
    DEBIAN_FRONTEND=noninteractive apt-get update -qq >/dev/null
    DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "${missing[@]}" >/dev/null
  else
    log "missing: ${missing[*]}; install them (Debian/Ubuntu: sudo apt-get install ${missing[*]})"; return 1
  fi
}

start() {
  for p in "$web_port" "$db_port" "$s3_port" "$smtp_port" "$stats_port"; do
    port_busy "$p" && { log "port $p is already in use: stop the other program or set CLUSTER_PORT"; exit 1; }
  done
  for i in $(seq 1 "$APPS"); do port_busy "$(app_port "$i")" && { log "port $(app_port "$i") is in use: set CLUSTER_PORT"; exit 1; }; done
  ensure_packages
  ensure_node_modules
  trap stop_all EXIT
  trap 'exit 130' INT TERM
  echo $$ >"$DIR/supervisor.pid"
  start_galera
  log "starting the bucket (s3rver) on 127.0.0.1:$s3_port ..."
  setsid node_modules/.bin/tsx scripts/s3-stand-in.ts --port "$s3_port" --dir "$DIR/s3" \
    --bucket "$S3_BUCKET" >>"$DIR/s3.log" 2>&1 </dev/null &
  echo $! >"$DIR/s3.pid"
  for _ in $(seq 1 120); do http_ok "http://127.0.0.1:$s3_port/" && break; sleep 0.25; done
  haproxy_cfg
  haproxy -c -q -f "$DIR/haproxy.cfg" || { log "haproxy refused $DIR/haproxy.cfg"; exit 1; }
  setsid haproxy -f "$DIR/haproxy.cfg" -db >>"$DIR/haproxy.log" 2>&1 </dev/null &
  echo $! >"$DIR/haproxy.pid"
  # The app's database user through HAProxy, once its checks have found the nodes Synced.
  for _ in $(seq 1 120); do
    mariadb --no-defaults -h 127.0.0.1 -P "$db_port" -u "$DB_USER" -p"$DB_PASSWORD" \
      --connect-timeout=2 -e "SELECT 1" >/dev/null 2>&1 && break
    sleep 0.5
  done
  node_modules/.bin/tsx scripts/migrate.ts
  local signins=""
  # CLUSTER_SEED=0 (the cluster tests): no demo team, so no demo analyses load the machine.
  [ "${CLUSTER_SEED:-1}" = 0 ] || signins=$(node_modules/.bin/tsx scripts/seed.ts --if-empty)
  if [ "${CLUSTER_SKIP_BUILD:-0}" != 1 ] || [ ! -f build/server/index.js ]; then
    log "building ..."; npm run -s build >/dev/null
  fi
  for i in $(seq 1 "$APPS"); do start_app "$i"; done
  for i in $(seq 1 "$APPS"); do
    wait_for_http "http://127.0.0.1:$(app_port "$i")/healthz" "$(app_pid "$i")" 90 ||
      { log "app instance $i did not start (see $DIR/app$i.log)"; tail -n 5 "$DIR/app$i.log" >&2; exit 1; }
  done
  wait_for_http "http://127.0.0.1:$web_port/healthz" $$ 30 || { log "HAProxy did not answer (see $DIR/haproxy.log)"; exit 1; }
  status || true
  [ -n "$signins" ] && printf '%s\n' "$signins" >&2
  log "open http://localhost:$web_port  (Ctrl-C stops the whole cluster; data in $DIR)"
  # An instance that dies is started again after 2 s, as npm start does for its one app.
  while true; do
    sleep 1
    for i in $(seq 1 "$APPS"); do
      p=$(app_pid "$i")
      if [ -n "$p" ] && ! kill -0 "$p" 2>/dev/null; then
        log "app instance $i stopped unexpectedly; restarting it in 2 s"
        rm -f "$DIR/app$i.pid"; sleep 2; start_app "$i"
      fi
    done
  done
}

case "${1:-start}" in
  start) start ;;
  status) status ;;
  stop)
    p=$(cat "$DIR/supervisor.pid" 2>/dev/null || true)
    if [ -n "$p" ] && kill -0 "$p" 2>/dev/null; then
      kill -TERM "$p"; for _ in $(seq 1 240); do kill -0 "$p" 2>/dev/null || break; sleep 0.25; done
    else stop_all; fi ;;
  kill-app) kill -KILL "$(app_pid "$2")" ;;
  only-app | all-apps)
    for i in $(seq 1 "$APPS"); do
      verb=enable; [ "$1" = only-app ] && [ "$i" != "$2" ] && verb=disable
      echo "$verb server apps/app$i" | socat stdio "$DIR/haproxy.sock" >/dev/null
    done ;;
  kill-node) stop_node "$2" KILL ;;
  start-node) start_node "$2" ;;
  *) echo "usage: npm run cluster [-- start|status|stop|kill-app N|kill-node N|start-node N|only-app N|all-apps]" >&2; exit 2 ;;
esac
