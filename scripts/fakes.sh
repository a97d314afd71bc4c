#!/usr/bin/env bash
# Start/stop the local SMTP sink and S3 fake in the background (pid in .data/fakes.pid).
set -euo pipefail
ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
PIDFILE="$ROOT/.data/fakes.pid"
CONTROL_PORT="${MAIL_SINK_PORT:-2580}"
mkdir -p "$ROOT/.data"

healthy() { node -e "fetch('http://127.0.0.1:$CONTROL_PORT/health').then(r=>process.exit(r.ok?0:1)).catch(()=>process.exit(1))"; }
running() { [ -f "$PIDFILE" ] && kill -0 "$(cat "$PIDFILE")" 2>/dev/null; }

case "${1:-start}" in
  start)
    if running && healthy; then
      echo "[fakes] already running"; exit 0
    fi
    cd "$ROOT"
    nohup node node_modules/tsx/dist/cli.mjs scripts/fakes.ts >"$ROOT/.data/fakes.log" 2>&1 &
    echo $! >"$PIDFILE"
    for _ in $(seq 1 100); do
      healthy && { head -n1 "$ROOT/.data/fakes.log"; exit 0; }
      running || break
      sleep 0.1
    done
    echo "[fakes] did not start:" >&2; cat "$ROOT/.data/fakes.log" >&2; exit 1
    ;;
  stop)
    if running; then kill "$(cat "$PIDFILE")"; rm -f "$PIDFILE"; echo "[fakes] stopped"; else echo "[fakes] not running"; fi
    ;;
  *) echo "usage: $0 start|stop" >&2; exit 2 ;;
esac
