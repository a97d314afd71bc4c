#!/usr/bin/env bash
# npm run stop: ends the PostgreSQL cluster and the local fakes that npm start / npm test started.
set -uo pipefail
ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$ROOT"
bash scripts/fakes.sh stop
if [ -f "$(bash scripts/pg.sh datadir)/PG_VERSION" ]; then bash scripts/pg.sh stop; fi
