#!/usr/bin/env bash
# `npm test`: the whole suite against throwaway PostgreSQL and Redis on ports of its own,
# then the browser end-to-end runs against a whole stack started here. Non-zero on any failure.
set -euo pipefail
cd "$(dirname "$0")/.."
source server/scripts/services.sh

ensure_system_packages
ensure_browser
ensure_node_modules
build_wasm_kernel

throwaway_env test "${INFALL_TEST_PG_PORT:-55432}" "${INFALL_TEST_REDIS_PORT:-56379}" "${INFALL_TEST_PORT:-58080}" \
  "${INFALL_TEST_OAUTH_PORT:-58091}" "${INFALL_TEST_SMTP_PORT:-58025}" "${INFALL_TEST_OUTBOX_PORT:-58092}"
export INFALL_WEB_DIR="${INFALL_TEST_WEB_DIR:-dist}"
export INFALL_URL="http://127.0.0.1:$INFALL_PORT"
trap throwaway_cleanup INT TERM EXIT
throwaway_services_up

# A phase that outlives its limit (a hung thread, a handle left open) fails here with a
# message instead of holding CI until its own deadline.
phase() {
  local limit=$1; shift
  local rc=0
  timeout --kill-after=30 "$limit" "$@" || rc=$?
  [ "$rc" -eq 124 ] && echo "[infall] test phase did not end within $limit: $*" >&2
  return "$rc"
}

status=0
phase 20m npx jest --selectProjects node app --ci "$@" || status=$?
# Fault injection stops the shared PostgreSQL and Redis, so it runs on its own.
if [ "$status" -eq 0 ]; then phase 15m npx jest --selectProjects faults --ci --runInBand || status=$?; fi

# The end-to-end runs need the web build and a whole stack, seeded like a new user's.
if [ "$status" -eq 0 ] && [ -z "${INFALL_SKIP_E2E:-}" ]; then
  build_web_if_stale
  node --import tsx server/scripts/prepare.ts
  start_stack_processes "$tmp"
  if wait_for_url "$INFALL_URL/api/health" 90; then
    phase 20m npx jest --selectProjects e2e --ci --runInBand || status=$?
  else
    status=1
  fi
  [ "$status" -ne 0 ] && print_stack_logs
fi
exit "$status"
