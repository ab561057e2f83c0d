# The HAProxy part of scripts/cluster.sh (sourced, not run): writes haproxy.cfg and the external
# check that lets only Synced Galera nodes take the app's database connections.

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
