#!/usr/bin/env bash
# `npm run bench`: starts a throwaway stack (PostgreSQL, Redis, fakes, server, one
# worker) on ports of its own in a temporary folder, runs tests/bench/run.ts against
# it, and stops all it started. `--no-stack` measures only the sections that need none.
# Progress goes to stderr, so `npm run bench -- --json` prints one JSON object on stdout.
set -euo pipefail
cd "$(dirname "$0")/../.."
source server/scripts/services.sh

args=()
no_stack=""
for a in "$@"; do
  if [ "$a" = "--no-stack" ]; then no_stack=1; else args+=("$a"); fi
done
if [ -n "$no_stack" ]; then exec npx tsx tests/bench/run.ts "${args[@]}"; fi

{
  ensure_system_packages
  ensure_node_modules
} >&2

tmp=$(mktemp -d /tmp/infall-bench.XXXXXX)
export INFALL_DATA_DIR="$tmp"
export INFALL_PG_PORT="${INFALL_BENCH_PG_PORT:-57432}"
export INFALL_REDIS_PORT="${INFALL_BENCH_REDIS_PORT:-57379}"
export INFALL_PORT="${INFALL_BENCH_PORT:-57080}"
export INFALL_OAUTH_PORT="${INFALL_BENCH_OAUTH_PORT:-57091}"
export INFALL_SMTP_PORT="${INFALL_BENCH_SMTP_PORT:-57025}"
export INFALL_OUTBOX_PORT="${INFALL_BENCH_OUTBOX_PORT:-57092}"
export INFALL_PG_FSYNC=off
export INFALL_SESSION_SECRET="$(head -c 32 /dev/urandom | base64 | tr -d '=+/')"
# A web export of its own (gitignored), so the bench never rewrites dist/ under a test run using it;
# not under a dot folder, which the server will not serve files from.
export INFALL_WEB_DIR="${INFALL_BENCH_WEB_DIR:-web-build/bench}"
export INFALL_BENCH_URL="http://127.0.0.1:$INFALL_PORT"

pids=()
cleanup() {
  trap - INT TERM EXIT
  for p in "${pids[@]}"; do kill -TERM "$p" 2>/dev/null || true; done
  for p in "${pids[@]}"; do wait "$p" 2>/dev/null || true; done
  redis_stop "$INFALL_REDIS_PORT"
  pg_stop "$tmp/pg"
  rm -rf "$tmp"
}
trap cleanup INT TERM EXIT

{
  pg_start "$tmp/pg" "$INFALL_PG_PORT"
  redis_start "$tmp/redis" "$INFALL_REDIS_PORT"
  node --import tsx server/scripts/prepare.ts --no-seed
  build_web_if_stale
} >&2
start_stack_processes "$tmp"
if ! wait_for_url "$INFALL_BENCH_URL/api/health" 90; then
  for f in fakes server worker; do echo "--- $f log (tail)" >&2; tail -n 40 "$tmp/$f.log" >&2 || true; done
  exit 1
fi
status=0
npx tsx tests/bench/run.ts "${args[@]}" || status=$?
if [ "$status" -ne 0 ]; then
  for f in fakes server worker; do echo "--- $f log (tail)" >&2; tail -n 40 "$tmp/$f.log" >&2 || true; done
fi
exit "$status"
