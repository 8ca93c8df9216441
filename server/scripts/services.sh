#!/usr/bin/env bash
# Starts and stops Infall's private PostgreSQL cluster and Redis, both on 127.0.0.1 only.
# Sourced by start.sh and tests/run.sh; every function takes its folder and port.
set -euo pipefail

PG_USER_DB="${INFALL_PG_USER:-infall}"

pg_bin() {
  local d
  d=$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1)
  [ -n "$d" ] && echo "$d"
}

# Installs PostgreSQL and Redis from Debian when they are missing (needs root).
ensure_system_packages() {
  local want=()
  [ -n "$(pg_bin)" ] || want+=(postgresql)
  command -v redis-server >/dev/null 2>&1 || want+=(redis-server)
  [ ${#want[@]} -eq 0 ] && return 0
  echo "[infall] installing from Debian: ${want[*]}"
  if [ "$(id -u)" -ne 0 ]; then echo "[infall] need root to install ${want[*]} (or install them yourself)" >&2; return 1; fi
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  apt-get install -y -qq "${want[@]}" >/dev/null
  # Debian's packages start their own system-wide servers; Infall runs private ones.
  for s in postgresql redis-server; do service "$s" stop >/dev/null 2>&1 || true; done
}

# Debian's Chromium, for the browser tests and the bench's frame-rate section.
ensure_browser() {
  command -v chromium >/dev/null 2>&1 && return 0
  echo "[infall] installing Chromium from Debian for the browser runs"
  DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium >/dev/null
}

# The server runs as the unprivileged postgres user, which must be able to reach the folder.
allow_traverse() {
  local dir="$1"
  while [ "$dir" != "/" ]; do
    if ! runuser -u postgres -- test -x "$dir" 2>/dev/null; then chmod o+x "$dir"; fi
    dir=$(dirname "$dir")
  done
}

pg_start() {
  local dir="$1" port="$2" bin
  bin=$(pg_bin)
  mkdir -p "$dir"
  dir=$(cd "$dir" && pwd)
  local run_as=()
  if [ "$(id -u)" -eq 0 ]; then
    run_as=(runuser -u postgres --)
    chown postgres:postgres "$dir"
    allow_traverse "$dir"
  fi
  if [ ! -f "$dir/data/PG_VERSION" ]; then
    mkdir -p "$dir/data" "$dir/sock"
    [ "$(id -u)" -eq 0 ] && chown -R postgres:postgres "$dir"
    chmod 700 "$dir/data"
    "${run_as[@]}" "$bin/initdb" -D "$dir/data" -U "$PG_USER_DB" --auth=trust -E UTF8 --locale=C.UTF-8 >"$dir/initdb.log" 2>&1 \
      || { echo "[infall] initdb failed, see $dir/initdb.log" >&2; return 1; }
  fi
  mkdir -p "$dir/sock"
  [ "$(id -u)" -eq 0 ] && chown postgres:postgres "$dir/sock"
  if "${run_as[@]}" "$bin/pg_ctl" -D "$dir/data" status >/dev/null 2>&1; then return 0; fi
  "${run_as[@]}" "$bin/pg_ctl" -D "$dir/data" -l "$dir/postgres.log" -w -t 60 \
    -o "-p $port -h 127.0.0.1 -k $dir/sock -c fsync=${INFALL_PG_FSYNC:-on}" start >/dev/null \
    || { echo "[infall] PostgreSQL did not start, see $dir/postgres.log" >&2; return 1; }
  local db="${INFALL_PG_DB:-infall}"
  if ! "$bin/psql" -h 127.0.0.1 -p "$port" -U "$PG_USER_DB" -d postgres -tAc "select 1 from pg_database where datname='$db'" | grep -q 1; then
    "$bin/createdb" -h 127.0.0.1 -p "$port" -U "$PG_USER_DB" "$db"
  fi
}

pg_stop() {
  local dir="$1" bin
  bin=$(pg_bin)
  [ -f "$dir/data/PG_VERSION" ] || return 0
  local run_as=()
  [ "$(id -u)" -eq 0 ] && run_as=(runuser -u postgres --)
  "${run_as[@]}" "$bin/pg_ctl" -D "$dir/data" -m fast -w stop >/dev/null 2>&1 || true
}

redis_start() {
  local dir="$1" port="$2"
  mkdir -p "$dir"
  dir=$(cd "$dir" && pwd)
  if redis-cli -h 127.0.0.1 -p "$port" ping >/dev/null 2>&1; then return 0; fi
  # Append-only file on: queued jobs survive a restart.
  redis-server --port "$port" --bind 127.0.0.1 --protected-mode yes --daemonize yes \
    --dir "$dir" --appendonly yes --pidfile "$dir/redis.pid" --logfile "$dir/redis.log" --save ''
  for _ in $(seq 50); do redis-cli -h 127.0.0.1 -p "$port" ping >/dev/null 2>&1 && return 0; sleep 0.1; done
  echo "[infall] Redis did not start, see $dir/redis.log" >&2
  return 1
}

redis_stop() {
  local port="$1"
  redis-cli -h 127.0.0.1 -p "$port" shutdown >/dev/null 2>&1 || true
}

# Installs npm dependencies when node_modules is missing or older than the lock file.
# Installs when the lockfile's content differs from the one last installed (a stamp in node_modules):
# file dates alone would reinstall after any checkout that merely touched the lockfile.
ensure_node_modules() {
  local want stamp=node_modules/.infall-lock-sha256
  want=$(sha256sum package-lock.json | cut -d' ' -f1)
  if [ ! -f node_modules/.package-lock.json ] || [ "$(cat "$stamp" 2>/dev/null)" != "$want" ]; then
    echo "[infall] installing npm dependencies (npm ci)"
    npm ci --no-audit --no-fund --loglevel=error
    echo "$want" >"$stamp"
  fi
}

# Compiles the WebAssembly direct-sum kernel from shared/engine/solvers/wasm/ into the engine's generated module
# (rewritten only when the build's bytes change, so an unchanged kernel keeps the web export fresh).
build_wasm_kernel() {
  node server/scripts/build-wasm.mjs
}

# Exports the web app when the build is missing or any of its sources is newer.
build_web_if_stale() {
  local out="${INFALL_WEB_DIR:-dist}"
  local srcs=(app components hooks constants shared assets app.json package-lock.json)
  local present=()
  for s in "${srcs[@]}"; do [ -e "$s" ] && present+=("$s"); done
  if [ -f "$out/index.html" ] && [ -z "$(find "${present[@]}" -newer "$out/index.html" -print -quit)" ]; then return 0; fi
  echo "[infall] building the web app into $out/ (takes under a minute the first time)"
  EXPO_OFFLINE=1 EXPO_NO_TELEMETRY=1 CI=1 npx expo export --platform web --output-dir "$out" >"${INFALL_DATA_DIR:-.data}/web-build.log" 2>&1 \
    || { echo "[infall] web build failed, see ${INFALL_DATA_DIR:-.data}/web-build.log" >&2; return 1; }
}

# Waits until a URL answers 200, up to N seconds.
wait_for_url() {
  local url="$1" secs="${2:-60}"
  for _ in $(seq $((secs * 5))); do
    curl -fsS -o /dev/null "$url" 2>/dev/null && return 0
    sleep 0.2
  done
  echo "[infall] $url did not answer within ${secs}s" >&2
  return 1
}

# Runs one process of the stack and starts it again whenever it ends, so a crashed worker
# (or server) comes back while the rest keeps serving. A process that keeps dying at once is
# restarted more slowly (up to a 30 s pause). TERM or INT stops the process and the loop.
supervise() {
  local name="$1" entry="$2" child="" rc pause=1 started
  trap 'if [ -n "$child" ]; then kill -TERM "$child" 2>/dev/null || true; wait "$child" 2>/dev/null || true; fi; exit 0' TERM INT
  while true; do
    started=$SECONDS
    node --import tsx "$entry" &
    child=$!
    rc=0
    wait "$child" || rc=$?
    if [ $((SECONDS - started)) -ge 60 ]; then pause=1; else pause=$((pause * 2 > 30 ? 30 : pause * 2)); fi
    echo "[infall] $name ended (exit $rc); starting it again in ${pause} s" >&2
    sleep "$pause" &
    child=$!
    wait "$child" || true
  done
}

# Starts the fakes, the server and a worker in the background, each under `supervise`,
# appending the supervisors' process ids to the caller's `pids` array. With a folder,
# their output goes to logs there.
start_stack_processes() {
  local logdir="${1:-}"
  local name
  for name in fakes server worker; do
    local entry="server/fakes/main.ts"
    [ "$name" = server ] && entry="server/index.ts"
    [ "$name" = worker ] && entry="worker/index.ts"
    if [ -n "$logdir" ]; then
      supervise "$name" "$entry" >>"$logdir/$name.log" 2>&1 &
    else
      supervise "$name" "$entry" &
    fi
    pids+=($!)
  done
}

# A throwaway stack for npm test and npm run bench: a temporary folder, ports given in
# the order PostgreSQL, Redis, server, OAuth fake, SMTP sink, outbox, and a fresh session
# secret (none is ever committed). Sets `tmp` and an empty `pids` array.
throwaway_env() {
  tmp=$(mktemp -d "/tmp/infall-$1.XXXXXX")
  export INFALL_DATA_DIR="$tmp" INFALL_PG_PORT="$2" INFALL_REDIS_PORT="$3" INFALL_PORT="$4"
  export INFALL_OAUTH_PORT="$5" INFALL_SMTP_PORT="$6" INFALL_OUTBOX_PORT="$7"
  export INFALL_PG_FSYNC=off
  INFALL_SESSION_SECRET="$(head -c 32 /dev/urandom | base64 | tr -d '=+/')"
  export INFALL_SESSION_SECRET
  pids=()
}

# Asks the processes in `pids` to stop, and kills any still there after 20 s
# (the worker hands its runs back to the queue first, which takes a moment).
stop_processes() {
  local p i
  for p in "${pids[@]}"; do kill -TERM "$p" 2>/dev/null || true; done
  for ((i = 0; i < 40; i++)); do
    local alive=0
    for p in "${pids[@]}"; do kill -0 "$p" 2>/dev/null && alive=1; done
    [ "$alive" = 0 ] && break
    sleep 0.5
  done
  for p in "${pids[@]}"; do
    if kill -0 "$p" 2>/dev/null; then
      echo "[infall] process $p did not stop within 20 s; killing it" >&2
      kill -KILL "$p" 2>/dev/null || true
    fi
  done
  for p in "${pids[@]}"; do wait "$p" 2>/dev/null || true; done
}

# Stops what throwaway_env's caller started and removes the folder.
throwaway_cleanup() {
  trap - INT TERM EXIT
  stop_processes
  redis_stop "$INFALL_REDIS_PORT"
  pg_stop "$tmp/pg"
  rm -rf "$tmp"
}

throwaway_services_up() {
  pg_start "$tmp/pg" "$INFALL_PG_PORT"
  redis_start "$tmp/redis" "$INFALL_REDIS_PORT"
  node --import tsx server/scripts/prepare.ts --no-seed
}

print_stack_logs() {
  local f
  for f in fakes server worker; do echo "--- $f log (tail)"; tail -n 40 "$tmp/$f.log" || true; done
}
