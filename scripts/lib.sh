# Shared by scripts/start.sh and scripts/test.sh (sourced, not run).

log() { printf '\033[1m[twistlog]\033[0m %s\n' "$*" >&2; }

# npm ci when node_modules is missing, older than package-lock.json, or lacks the build tools.
# --include=dev: `npm start` builds the app, so it needs the devDependencies even when
# NODE_ENV=production is set (in the caller's shell or by start.sh), which npm would read as
# "leave them out".
ensure_node_modules() {
  local stamp=node_modules/.twistlog-lock.sha
  local want; want=$(sha256sum package-lock.json | cut -c1-64)
  if [ ! -f "$stamp" ] || [ "$(cat "$stamp")" != "$want" ] || [ ! -x node_modules/.bin/react-router ]; then
    log "installing npm dependencies (npm ci) ..."
    npm ci --include=dev --no-audit --no-fund --loglevel=error || return 1
    printf '%s' "$want" >"$stamp"
  fi
}

port_busy() { (exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null; }

# Waits until URL answers 200, or until the process PID has exited; $3 = seconds.
wait_for_http() {
  local url=$1 pid=$2 seconds=${3:-60}
  for _ in $(seq 1 $((seconds * 4))); do
    curl -sf -m 2 -o /dev/null "$url" && return 0
    kill -0 "$pid" 2>/dev/null || return 1
    sleep 0.25
  done
  return 1
}
