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
if [ -n "$no_stack" ]; then build_wasm_kernel >&2; exec npx tsx tests/bench/run.ts "${args[@]}"; fi

{
  ensure_system_packages
  ensure_browser
  ensure_node_modules
  build_wasm_kernel
} >&2

throwaway_env bench "${INFALL_BENCH_PG_PORT:-57432}" "${INFALL_BENCH_REDIS_PORT:-57379}" "${INFALL_BENCH_PORT:-57080}" \
  "${INFALL_BENCH_OAUTH_PORT:-57091}" "${INFALL_BENCH_SMTP_PORT:-57025}" "${INFALL_BENCH_OUTBOX_PORT:-57092}"
# A web export of its own (gitignored), so the bench never rewrites dist/ under a test run using it;
# not under a dot folder, which the server will not serve files from.
export INFALL_WEB_DIR="${INFALL_BENCH_WEB_DIR:-web-build/bench}"
export INFALL_BENCH_URL="http://127.0.0.1:$INFALL_PORT"
trap throwaway_cleanup INT TERM EXIT

{
  throwaway_services_up
  build_web_if_stale
} >&2
start_stack_processes "$tmp"
if ! wait_for_url "$INFALL_BENCH_URL/api/health" 90; then
  print_stack_logs >&2
  exit 1
fi
status=0
npx tsx tests/bench/run.ts "${args[@]}" || status=$?
[ "$status" -ne 0 ] && print_stack_logs >&2
exit "$status"
