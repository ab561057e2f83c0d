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

# --- Galera nodes --------------------------------------------------------------------------

node_cnf() {
  local n=$1 d; d=$(node_dir "$n")
  local peers=""
  for i in $(seq 1 $NODES); do peers+="${peers:+,}127.0.0.1:$(node_gcomm "$i")"; done
  cat >"$d.cnf" <<EOF
[mysqld]
datadir=$d
socket=$(node_sock "$n")
port=$(node_sql "$n")
bind-address=127.0.0.1
pid-file=$d.pid
log-error=$d.err
skip-name-resolve
innodb-buffer-pool-size=64M
innodb-log-file-size=48M
max-connections=300
user=$(id -un)
# What Galera requires (MariaDB KB, "Configuring MariaDB Galera Cluster"):
binlog_format=ROW
default_storage_engine=InnoDB
innodb_autoinc_lock_mode=2
innodb_flush_log_at_trx_commit=2
wsrep_on=ON
wsrep_provider=$GALERA_LIB
wsrep_cluster_name=twistlog
wsrep_cluster_address=gcomm://$peers
wsrep_node_name=node$n
wsrep_node_address=127.0.0.1:$(node_gcomm "$n")
wsrep_provider_options="gmcast.listen_addr=tcp://127.0.0.1:$(node_gcomm "$n");ist.recv_addr=127.0.0.1:$(node_ist "$n");gcache.size=64M"
# Full state transfer with mariabackup (non-blocking for the donor). rsync's daemon, started
# by root, drops to the user nobody and cannot write the joiner's folder.
wsrep_sst_method=mariabackup
wsrep_sst_auth=root:
wsrep_sst_receive_address=127.0.0.1:$(node_sst "$n")
# Every read waits until the node has applied what the cluster committed before it: a request
# that lands on another node than the write before it still sees that write (decision 009).
wsrep_sync_wait=1
# A single statement outside a transaction that loses certification is run again by the node
# itself, up to this many times (default 1); transactions are run again by writeTransaction.
wsrep_retry_autocommit=4
EOF
}

node_pid() { cat "$(node_dir "$1").pid" 2>/dev/null || true; }
node_running() { local p; p=$(node_pid "$1"); [ -n "$p" ] && kill -0 "$p" 2>/dev/null; }
node_sql_root() { mariadb --no-defaults --socket="$(node_sock "$1")" -uroot -N -B -e "$2"; }
node_state() { node_sql_root "$1" "SHOW STATUS LIKE 'wsrep_local_state_comment'" 2>/dev/null | cut -f2; }
node_size() { node_sql_root "$1" "SHOW STATUS LIKE 'wsrep_cluster_size'" 2>/dev/null | cut -f2; }

# Starts node N; `new` bootstraps a new cluster from it. Waits until it is Synced.
start_node() {
  local n=$1 mode=${2:-join} d; d=$(node_dir "$n")
  if node_running "$n"; then return 0; fi
  port_busy "$(node_sql "$n")" && { log "port $(node_sql "$n") for Galera node $n is in use: set CLUSTER_PORT"; return 1; }
  node_cnf "$n"
  if [ ! -d "$d/mysql" ]; then
    mkdir -p "$d"
    mariadb-install-db --defaults-file="$d.cnf" --auth-root-authentication-method=normal \
      --skip-test-db >"$d.install.log" 2>&1 || { log "could not initialise $d (see $d.install.log)"; return 1; }
  fi
  local extra=() pos
  [ "$mode" = new ] && extra=(--wsrep-new-cluster)
  pos=$(recovered_position "$n")
  [ -n "$pos" ] && extra+=(--wsrep-start-position="$pos")
  setsid /usr/sbin/mariadbd --defaults-file="$d.cnf" "${extra[@]}" </dev/null >/dev/null 2>&1 &
  for _ in $(seq 1 480); do
    [ "$(node_state "$n")" = Synced ] && return 0
    sleep 0.25
  done
  log "Galera node $n did not reach Synced within 120 s (see $d.err)"
  return 1
}

# A node that was killed has no saved position (seqno -1 in grastate.dat): read it from InnoDB
# (what galera_recovery does for systemd), so the node rejoins by incremental transfer instead of
# a full copy, and a bootstrap after a crash of all nodes can pick the most advanced one.
# Prints uuid:seqno, or nothing when the saved position is good.
recovered_position() {
  local d; d=$(node_dir "$1")
  grep -q '^seqno:\s*-1' "$d/grastate.dat" 2>/dev/null || return 0
  rm -f "$d.recover.log"
  /usr/sbin/mariadbd --defaults-file="$d.cnf" --wsrep-recover --log-error="$d.recover.log" \
    </dev/null >/dev/null 2>&1 || true
  sed -n 's/.*Recovered position: *//p' "$d.recover.log" 2>/dev/null | tail -1
}

stop_node() {
  local n=$1 sig=${2:-TERM} p; p=$(node_pid "$n")
  [ -n "$p" ] && kill -0 "$p" 2>/dev/null || return 0
  kill -"$sig" "$p" 2>/dev/null || true
  for _ in $(seq 1 240); do kill -0 "$p" 2>/dev/null || break; sleep 0.25; done
  kill -0 "$p" 2>/dev/null && kill -KILL "$p" 2>/dev/null
  [ "$sig" = KILL ] || rm -f "$(node_dir "$n").pid"
}

# The first node to start bootstraps the cluster: the one Galera marked safe to bootstrap (the
# last to stop), or node 1 on a new cluster. After a crash of all nodes none is marked: then
# the one with the highest committed seqno is (MariaDB KB, "Getting Started with Galera").
start_galera() {
  local first=1 best=-2 n running=0
  for n in $(seq 1 $NODES); do node_running "$n" && running=1; done
  if [ $running = 0 ]; then
    for n in $(seq 1 $NODES); do
      local g; g="$(node_dir "$n")/grastate.dat"
      [ -f "$g" ] || continue
      if grep -q '^safe_to_bootstrap: 1' "$g"; then first=$n; best=""; break; fi
      local s; s=$(sed -n 's/^seqno:\s*//p' "$g")
      if [ "${s:--1}" = -1 ]; then node_cnf "$n"; s=$(recovered_position "$n"); s=${s##*:}; fi
      [ "${s:--1}" -gt "$best" ] && { best=${s:--1}; first=$n; }
    done
    if [ -n "$best" ] && [ -f "$(node_dir "$first")/grastate.dat" ]; then
      sed -i 's/^safe_to_bootstrap: 0/safe_to_bootstrap: 1/' "$(node_dir "$first")/grastate.dat"
    fi
    log "starting Galera node $first (bootstraps the cluster) ..."
    start_node "$first" new
  fi
  for n in $(seq 1 $NODES); do
    node_running "$n" && continue
    log "starting Galera node $n (joins) ..."
    start_node "$n"
  done
  node_sql_root "$first" "CREATE DATABASE IF NOT EXISTS \`$DB_NAME\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
    CREATE USER IF NOT EXISTS '$DB_USER'@'127.0.0.1' IDENTIFIED BY '$DB_PASSWORD';
    GRANT ALL PRIVILEGES ON \`${DB_NAME}%\`.* TO '$DB_USER'@'127.0.0.1';
    CREATE USER IF NOT EXISTS '$CHECK_USER'@'127.0.0.1';"
}

# --- HAProxy -------------------------------------------------------------------------------

haproxy_cfg() {
  local check="$DIR/galera-check.sh"
  cat >"$check" <<EOF
#!/usr/bin/env bash
# HAProxy's external check for a Galera node: up only when it is Synced (wsrep_local_state 4);
# a joining or donor node accepts connections but must not take the app's queries.
# HAProxy passes: proxy address, proxy port, server address, server port.
state=\$(mariadb --no-defaults -h "\$3" -P "\$4" -u $CHECK_USER -N -B --connect-timeout=2 \\
  -e "SHOW STATUS LIKE 'wsrep_local_state'" 2>/dev/null | cut -f2)
[ "\$state" = 4 ]
EOF
  chmod +x "$check"
  {
    cat <<EOF
global
  maxconn 4096
  stats socket $DIR/haproxy.sock mode 600 level admin
  external-check
  insecure-fork-wanted
  log stderr format short local0 notice

defaults
  log global
  timeout connect 3s
  timeout client 1h
  timeout server 1h
  # Requests beyond an instance's maxconn wait here, not in its event loop, where they would
  # hold up its /healthz answers (and a check that times out marks a busy instance down).
  timeout queue 60s
  timeout check 5s
  retries 2

frontend web
  mode http
  bind 127.0.0.1:$web_port
  option forwardfor
  default_backend apps

# No sticky sessions: any instance answers any request (docs/scale-out.md).
backend apps
  mode http
  balance roundrobin
  option redispatch
  retry-on conn-failure
  option httpchk
  http-check send meth GET uri /healthz ver HTTP/1.1 hdr Host localhost
  http-check expect status 200
  default-server check inter 1s fall 3 rise 2 maxconn 32
EOF
    for i in $(seq 1 "$APPS"); do echo "  server app$i 127.0.0.1:$(app_port "$i")"; done
    cat <<EOF

listen galera
  mode tcp
  bind 127.0.0.1:$db_port
  balance leastconn
  option external-check
  external-check path "/usr/bin:/bin"
  external-check command $check
  default-server check inter 1s fall 2 rise 2 on-marked-down shutdown-sessions
EOF
    for n in $(seq 1 $NODES); do echo "  server node$n 127.0.0.1:$(node_sql "$n")"; done
    cat <<EOF

listen stats
  mode http
  bind 127.0.0.1:$stats_port
  stats enable
  stats uri /
EOF
  } >"$DIR/haproxy.cfg"
}

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
