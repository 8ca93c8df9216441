#!/usr/bin/env bash
# `npm start`: everything a new machine needs, then the whole stack in the foreground.
# Ctrl-C stops all it started; the data folder is kept for the next start.
set -euo pipefail
cd "$(dirname "$0")/../.."
source server/scripts/services.sh

export INFALL_DATA_DIR="${INFALL_DATA_DIR:-.data}"
export INFALL_PORT="${INFALL_PORT:-8080}"
export INFALL_PG_PORT="${INFALL_PG_PORT:-54329}"
export INFALL_REDIS_PORT="${INFALL_REDIS_PORT:-63799}"
mkdir -p "$INFALL_DATA_DIR"
# Development keeps one random session secret in the data folder, so sign-ins survive a restart.
if [ -z "${INFALL_SESSION_SECRET:-}" ]; then
  [ -s "$INFALL_DATA_DIR/session-secret" ] || (umask 077 && head -c 32 /dev/urandom | base64 | tr -d '=+/' >"$INFALL_DATA_DIR/session-secret")
  export INFALL_SESSION_SECRET="$(cat "$INFALL_DATA_DIR/session-secret")"
fi

ensure_system_packages
ensure_node_modules
build_wasm_kernel

pids=()
started_pg=0
started_redis=0
cleanup() {
  trap - INT TERM EXIT
  echo
  echo "[infall] stopping"
  stop_processes
  [ "$started_redis" = 1 ] && redis_stop "$INFALL_REDIS_PORT"
  [ "$started_pg" = 1 ] && pg_stop "$INFALL_DATA_DIR/pg"
  echo "[infall] stopped; data kept in $INFALL_DATA_DIR/"
}
trap 'cleanup; exit 130' INT TERM
trap cleanup EXIT

redis-cli -h 127.0.0.1 -p "$INFALL_REDIS_PORT" ping >/dev/null 2>&1 || started_redis=1
redis_start "$INFALL_DATA_DIR/redis" "$INFALL_REDIS_PORT"
[ -f "$INFALL_DATA_DIR/pg/data/postmaster.pid" ] || started_pg=1
pg_start "$INFALL_DATA_DIR/pg" "$INFALL_PG_PORT"

node --import tsx server/scripts/prepare.ts
build_web_if_stale

start_stack_processes

wait_for_url "http://127.0.0.1:$INFALL_PORT/api/health" 90
node --import tsx server/scripts/banner.ts
# Each process is restarted by its supervisor when it ends (see supervise in services.sh).
wait -n "${pids[@]}" || true
echo "[infall] a supervisor of the stack ended; stopping the rest" >&2
