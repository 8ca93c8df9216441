#!/usr/bin/env bash
# `npm test`: the whole suite against throwaway PostgreSQL and Redis on ports of its own,
# then the browser end-to-end runs against a whole stack started here. Non-zero on any failure.
set -euo pipefail
cd "$(dirname "$0")/.."
source server/scripts/services.sh

ensure_system_packages
if ! command -v chromium >/dev/null 2>&1; then
  echo "[infall] installing Chromium from Debian for the browser tests"
  DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium >/dev/null
fi
ensure_node_modules

tmp=$(mktemp -d /tmp/infall-test.XXXXXX)
export INFALL_DATA_DIR="$tmp"
export INFALL_PG_PORT="${INFALL_TEST_PG_PORT:-55432}"
export INFALL_REDIS_PORT="${INFALL_TEST_REDIS_PORT:-56379}"
export INFALL_PORT="${INFALL_TEST_PORT:-58080}"
export INFALL_OAUTH_PORT="${INFALL_TEST_OAUTH_PORT:-58091}"
export INFALL_SMTP_PORT="${INFALL_TEST_SMTP_PORT:-58025}"
export INFALL_OUTBOX_PORT="${INFALL_TEST_OUTBOX_PORT:-58092}"
export INFALL_PG_FSYNC=off
# A fresh session secret per test run; none is ever committed.
export INFALL_SESSION_SECRET="$(head -c 32 /dev/urandom | base64 | tr -d '=+/')"
export INFALL_WEB_DIR="${INFALL_TEST_WEB_DIR:-dist}"
export INFALL_URL="http://127.0.0.1:$INFALL_PORT"

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

pg_start "$tmp/pg" "$INFALL_PG_PORT"
redis_start "$tmp/redis" "$INFALL_REDIS_PORT"
node --import tsx server/scripts/prepare.ts --no-seed

status=0
npx jest --selectProjects node app --ci "$@" || status=$?

# The end-to-end runs need the web build and a whole stack, seeded like a new user's.
if [ "$status" -eq 0 ] && [ -z "${INFALL_SKIP_E2E:-}" ]; then
  build_web_if_stale
  node --import tsx server/scripts/prepare.ts
  start_stack_processes "$tmp"
  if wait_for_url "$INFALL_URL/api/health" 90; then
    npx jest --selectProjects e2e --ci --runInBand || status=$?
  else
    status=1
  fi
  if [ "$status" -ne 0 ]; then
    for f in fakes server worker; do echo "--- $f log (tail)"; tail -n 40 "$tmp/$f.log" || true; done
  fi
fi
exit "$status"
