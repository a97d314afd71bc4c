#!/usr/bin/env bash
# Builds the app when there is no build yet or a source file is newer than the last one.
set -euo pipefail
ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$ROOT"
if [ -f .next/BUILD_ID ] && [ -z "$(find app components lib models public proxy.ts instrumentation.ts next.config.mjs tailwind.config.ts postcss.config.mjs package-lock.json tsconfig.json -newer .next/BUILD_ID -print -quit 2>/dev/null)" ]; then
  echo "[build] up to date"
  exit 0
fi
echo "[build] next build"
NEXT_TELEMETRY_DISABLED=1 node node_modules/next/dist/bin/next build
