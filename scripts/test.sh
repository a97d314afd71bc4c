#!/usr/bin/env bash
# npm test: the same set-up as npm start against a fresh test database, then every test
# (vitest unit + integration + ngspice checks, then Playwright end-to-end in Debian's Chromium).
# Ends with one line "N passed, N failed" over both runners.
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/setup.sh" test
export OUTBOX_INTERVAL_MS=1000
export E2E_PORT="${E2E_PORT:-3100}"
export APP_URL="http://localhost:$E2E_PORT"
export NEXTAUTH_URL="$APP_URL"
mkdir -p reports
rm -f reports/vitest.json reports/playwright.json reports/build-failed
set +e

node node_modules/vitest/vitest.mjs run --reporter=default --reporter=json --outputFile.json=reports/vitest.json
vitest_rc=$?

if bash scripts/build-if-needed.sh; then
  # the seeded demo is re-created so the browser tests start from the same state
  DB_NAME=anodyne_test bash scripts/pg.sh recreate-db >/dev/null 2>&1 || true
  node node_modules/tsx/dist/cli.mjs scripts/db.ts migrate >/dev/null && node node_modules/tsx/dist/cli.mjs scripts/db.ts seed >/dev/null
  PLAYWRIGHT_JSON_OUTPUT_NAME=reports/playwright.json node node_modules/@playwright/test/cli.js test --reporter=list,json
  pw_rc=$?
else
  echo "[test] next build failed: end-to-end tests not run" >&2
  touch reports/build-failed
  pw_rc=1
fi
set -e
node scripts/summarize-tests.mjs
summary_rc=$?
if [ $vitest_rc -ne 0 ] || [ $pw_rc -ne 0 ] || [ $summary_rc -ne 0 ]; then exit 1; fi
