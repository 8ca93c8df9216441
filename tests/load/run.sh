#!/usr/bin/env bash
# `npm run load`: a throwaway stack (PostgreSQL, Redis, fakes, server, one worker) on ports of its
# own, the load run of tests/load/main.ts against it over loopback, then everything stopped.
# About three minutes. `npm run load -- --json` prints the figures as JSON on stdout.
set -euo pipefail
cd "$(dirname "$0")/../.."
source server/scripts/services.sh

{
  ensure_system_packages
  ensure_node_modules
} >&2

throwaway_env load "${INFALL_LOAD_PG_PORT:-57532}" "${INFALL_LOAD_REDIS_PORT:-57579}" "${INFALL_LOAD_PORT:-57580}" \
  "${INFALL_LOAD_OAUTH_PORT:-57591}" "${INFALL_LOAD_SMTP_PORT:-57525}" "${INFALL_LOAD_OUTBOX_PORT:-57592}"
export INFALL_WEB_DIR="$tmp/no-web" # the API alone is measured
export INFALL_LOAD_URL="http://127.0.0.1:$INFALL_PORT"
# The whole load comes from one address; the refused-token limit is not what is measured here.
export INFALL_BAD_TOKEN_LIMIT="${INFALL_BAD_TOKEN_LIMIT:-1000000}"
trap throwaway_cleanup INT TERM EXIT

throwaway_services_up >&2
start_stack_processes "$tmp"
if ! wait_for_url "$INFALL_LOAD_URL/api/health" 90; then
  print_stack_logs >&2
  exit 1
fi
status=0
timeout 600 npx tsx tests/load/main.ts "$@" || status=$?
[ "$status" -ne 0 ] && print_stack_logs >&2
exit "$status"
