#!/usr/bin/env bash
# Runs a tool against a production server of its own (used by `npm run fuzz` and `npm run bench:api`):
# the shared set-up on a fresh database (TEST_DB_NAME, default anodyne_tools), `next build` when needed,
# `next start` on loopback port TOOLS_PORT (3300) with its log in reports/tools-server.log, then the tool with
# BASE_URL set; the server is stopped afterwards and its log checked for unhandled errors.
#   bash scripts/with-prod-server.sh <command> [args...]
set -euo pipefail
export TEST_DB_NAME="${TEST_DB_NAME:-anodyne_tools}"
source "$(dirname "${BASH_SOURCE[0]}")/setup.sh" test >/dev/null
PORT="${TOOLS_PORT:-3300}"
export BASE_URL="http://127.0.0.1:$PORT" APP_URL="http://127.0.0.1:$PORT" NEXTAUTH_URL="http://127.0.0.1:$PORT"
bash scripts/build-if-needed.sh
mkdir -p reports
node node_modules/next/dist/bin/next start -H 127.0.0.1 -p "$PORT" >reports/tools-server.log 2>&1 &
pid=$!
trap 'kill $pid 2>/dev/null; wait $pid 2>/dev/null' EXIT
for _ in $(seq 1 120); do
  curl -fsS -o /dev/null "$BASE_URL/sign-in" 2>/dev/null && break
  kill -0 "$pid" 2>/dev/null || { cat reports/tools-server.log >&2; exit 1; }
  sleep 0.5
done
set +e
"$@"
rc=$?
kill $pid 2>/dev/null; wait $pid 2>/dev/null
trap - EXIT
node scripts/check-server-log.mjs reports/tools-server.log reports/tools-server-log.json || rc=1
exit $rc
