#!/usr/bin/env bash
# Proves the set-up works from a private folder: clones this repository into a fresh mode-0700 directory under
# $HOME (as root: /root, which the database's own user cannot enter), runs the shared set-up there (PostgreSQL,
# fakes, migrate, seed) on its own ports, then a short check against that database, and removes everything.
# Writes { passed, failed, problems } for the closing line of npm test.
#   bash scripts/check-clone.sh [reports/checks/clone.json]
# Env: CLONE_PGPORT (54339), CLONE_SMTP_PORT (2625), CLONE_MAIL_SINK_PORT (2680), CLONE_S3_PORT (4669)
set -uo pipefail
ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
OUT="${1:-$ROOT/reports/checks/clone.json}"
case "$OUT" in /*) ;; *) OUT="$ROOT/$OUT" ;; esac
mkdir -p "$(dirname "$OUT")"
PARENT="$(mktemp -d "${HOME:-/root}/anodyne-clone-check.XXXXXX")"
chmod 700 "$PARENT"
CLONE="$PARENT/anodyne"
LOG="$ROOT/reports/clone-check.log"
export PGPORT="${CLONE_PGPORT:-54339}" SMTP_PORT="${CLONE_SMTP_PORT:-2625}" MAIL_SINK_PORT="${CLONE_MAIL_SINK_PORT:-2680}" S3_PORT="${CLONE_S3_PORT:-4669}"
unset DATABASE_URL S3_ENDPOINT MAIL_SINK_URL PGDATA DB_NAME TEST_DB_NAME

result() { # result <ok 0|1> <message>
  if [ "$1" = 0 ]; then printf '{"passed":1,"failed":0,"problems":[]}\n' >"$OUT"; echo "[clone] $2";
  else node -e 'process.stdout.write(JSON.stringify({passed:0,failed:1,problems:[process.argv[1]]}))' "$2" >"$OUT"; echo "[clone] $2" >&2; fi
}
cleanup() {
  if [ -d "$CLONE" ]; then
    (cd "$CLONE" && bash scripts/fakes.sh stop >/dev/null 2>&1; bash scripts/pg.sh stop >/dev/null 2>&1; bash scripts/pg.sh reset >/dev/null 2>&1)
  fi
  rm -rf "$PARENT"
}
trap cleanup EXIT

(
  echo "[clone] cloning into $CLONE (parent mode $(stat -c %a "$PARENT"))"
  git clone -q "$ROOT" "$CLONE" || exit 10
  # the clone shares the installed packages (hard links; nothing is downloaded); the lockfile marker is a real
  # copy dated now, so the set-up sees the packages as current for the cloned lockfile
  cp -al "$ROOT/node_modules" "$CLONE/node_modules" || exit 11
  rm -f "$CLONE/node_modules/.package-lock.json" && cp "$ROOT/node_modules/.package-lock.json" "$CLONE/node_modules/.package-lock.json" && touch "$CLONE/node_modules/.package-lock.json"
  cd "$CLONE" || exit 12
  datadir="$(bash scripts/pg.sh datadir)"
  echo "[clone] database folder: $datadir"
  case "$datadir" in "$CLONE"/*) [ "$(id -u)" = 0 ] && { echo "[clone] as root the data folder must not be inside the private clone: $datadir"; exit 13; } ;; esac
  # the same set-up npm start and npm test run, then a short check against the clone's own database
  bash -c 'source scripts/setup.sh test && node node_modules/vitest/vitest.mjs run tests/integration/migrations.test.ts tests/unit/units.test.ts' || exit 14
) >"$LOG" 2>&1
rc=$?
case $rc in
  0) result 0 "set-up and a database check passed in a 0700 clone ($LOG)" ;;
  *) result 1 "the set-up failed in a 0700 clone (step $rc): see $LOG; last line: $(tail -n 1 "$LOG" | cut -c1-200)" ;;
esac
exit $rc
