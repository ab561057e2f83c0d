# The Galera part of scripts/cluster.sh (sourced, not run): each node's configuration, start with
# bootstrap or join, position recovery after a kill, and stop. Uses the ports and folders that
# cluster.sh defines (node_sql, node_gcomm, node_dir …).

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

# Starts node N; `new` bootstraps a new cluster from it; a third argument is its position when
# already recovered. Waits until it is Synced.
start_node() {
  local n=$1 mode=${2:-join} known=${3:-} d; d=$(node_dir "$n")
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
  pos=${known:-$(recovered_position "$n")}
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
  local first=1 best=-2 n running=0 recovered=()
  for n in $(seq 1 $NODES); do node_running "$n" && running=1; done
  if [ $running = 0 ]; then
    for n in $(seq 1 $NODES); do
      local g; g="$(node_dir "$n")/grastate.dat"
      [ -f "$g" ] || continue
      if grep -q '^safe_to_bootstrap: 1' "$g"; then first=$n; best=""; break; fi
      local s; s=$(sed -n 's/^seqno:\s*//p' "$g")
      if [ "${s:--1}" = -1 ]; then
        node_cnf "$n"; recovered[n]=$(recovered_position "$n"); s=${recovered[n]##*:}
      fi
      [ "${s:--1}" -gt "$best" ] && { best=${s:--1}; first=$n; }
    done
    if [ -n "$best" ] && [ -f "$(node_dir "$first")/grastate.dat" ]; then
      sed -i 's/^safe_to_bootstrap: 0/safe_to_bootstrap: 1/' "$(node_dir "$first")/grastate.dat"
    fi
    log "starting Galera node $first (bootstraps the cluster) ..."
    start_node "$first" new "${recovered[first]:-}"
  fi
  for n in $(seq 1 $NODES); do
    node_running "$n" && continue
    log "starting Galera node $n (joins) ..."
    start_node "$n" join "${recovered[n]:-}"
  done
  node_sql_root "$first" "CREATE DATABASE IF NOT EXISTS \`$DB_NAME\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
    CREATE USER IF NOT EXISTS '$DB_USER'@'127.0.0.1' IDENTIFIED BY '$DB_PASSWORD';
    GRANT ALL PRIVILEGES ON \`${DB_NAME}%\`.* TO '$DB_USER'@'127.0.0.1';
    CREATE USER IF NOT EXISTS '$CHECK_USER'@'127.0.0.1';"
}
