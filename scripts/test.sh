#!/usr/bin/env bash
# npm test: the same set-up as npm start against a fresh test database, then every test:
#   1. vitest (unit + integration + ngspice checks), with a reporter that records errors raised outside tests
#   2. next build, then the production server (next start) with its log kept in reports/server.log
#   3. Playwright end-to-end specs in Debian's Chromium, including the production smoke spec (every GET × role)
#   4. a short hostile-input fuzz (scripts/fuzz.ts, 2,000 requests; under a minute on an idle machine, capped
#      at FUZZ_SECONDS=180 on a busy one, where too few requests counts as a failure) on the same server
#   5. the server log scanned for unhandled errors; a clone into a private 0700 folder set up from scratch
# Ends with one line "N passed, N failed" over all of them (scripts/summarize-tests.mjs); exit 1 unless 0 failed.
# Env: E2E_PORT (3100), TEST_DB_NAME (anodyne_test), FUZZ_REQUESTS (2000), FUZZ_SEED, VITEST_FILES, SKIP_CLONE_CHECK=1.
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/setup.sh" test
export OUTBOX_INTERVAL_MS=1000
export E2E_PORT="${E2E_PORT:-3100}"
export APP_URL="http://localhost:$E2E_PORT"
export NEXTAUTH_URL="$APP_URL"
TEST_DB_NAME="${TEST_DB_NAME:-anodyne_test}"
mkdir -p reports/checks
rm -f reports/vitest.json reports/vitest-status.json reports/playwright.json reports/build-failed reports/server.log reports/checks/*.json
set +e

# VITEST_FILES narrows the vitest run (for trying the harness; the floor in tests/floor.json then fails the line)
# shellcheck disable=SC2086
node node_modules/vitest/vitest.mjs run ${VITEST_FILES:-} --reporter=default --reporter=json --reporter=./scripts/vitest-run-status.mjs --outputFile.json=reports/vitest.json
vitest_rc=$?

pw_rc=1
checks=(clone)
server_pid=
stop_server() {
  if [ -n "$server_pid" ] && kill -0 "$server_pid" 2>/dev/null; then
    kill "$server_pid" 2>/dev/null
    for _ in $(seq 1 50); do kill -0 "$server_pid" 2>/dev/null || break; sleep 0.1; done
    kill -9 "$server_pid" 2>/dev/null
  fi
  server_pid=
}
trap stop_server EXIT

if bash scripts/build-if-needed.sh; then
  checks+=(fuzz server-log)
  # the seeded demo is re-created so the browser tests start from the same state
  DB_NAME="$TEST_DB_NAME" bash scripts/pg.sh recreate-db >/dev/null 2>&1 || true
  node node_modules/tsx/dist/cli.mjs scripts/db.ts migrate >/dev/null && node node_modules/tsx/dist/cli.mjs scripts/db.ts seed >/dev/null
  # the production server, as users run it; its output is kept to look for unhandled errors afterwards
  node node_modules/next/dist/bin/next start -p "$E2E_PORT" >reports/server.log 2>&1 &
  server_pid=$!
  for _ in $(seq 1 120); do
    curl -fsS -o /dev/null "http://127.0.0.1:$E2E_PORT/sign-in" 2>/dev/null && break
    kill -0 "$server_pid" 2>/dev/null || break
    sleep 0.5
  done
  E2E_REUSE_SERVER=1 PLAYWRIGHT_JSON_OUTPUT_NAME=reports/playwright.json node node_modules/@playwright/test/cli.js test --reporter=list,json
  pw_rc=$?
  # short fuzz after the browser specs (it leaves hostile data behind), on the same server
  node node_modules/tsx/dist/cli.mjs scripts/fuzz.ts --base "http://127.0.0.1:$E2E_PORT" --requests "${FUZZ_REQUESTS:-2000}" --max-seconds "${FUZZ_SECONDS:-180}" --seed "${FUZZ_SEED:-$RANDOM}" --max-body $((4 * 1024 * 1024)) --report reports/checks/fuzz.json >reports/fuzz.log 2>&1
  fuzz_rc=$?
  tail -n 40 reports/fuzz.log
  [ $fuzz_rc -eq 0 ] || echo "[test] fuzz found problems: full list in reports/fuzz.log" >&2
  stop_server
  node scripts/check-server-log.mjs reports/server.log reports/checks/server-log.json
else
  echo "[test] next build failed: end-to-end tests not run" >&2
  touch reports/build-failed
fi

if [ "${SKIP_CLONE_CHECK:-}" != 1 ]; then
  bash scripts/check-clone.sh reports/checks/clone.json
else
  checks=("${checks[@]/clone}")
fi

set -e
expect=$(IFS=,; echo "${checks[*]}" | sed 's/,,*/,/g; s/^,//; s/,$//')
node scripts/summarize-tests.mjs --vitest-rc "$vitest_rc" --playwright-rc "$pw_rc" --expect-checks "$expect"
