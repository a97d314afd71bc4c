#!/usr/bin/env bash
# npm start: set up everything, build, and serve Anodyne on http://localhost:3000
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/setup.sh" dev
bash scripts/build-if-needed.sh
export PORT="${PORT:-3000}"
export APP_URL="${APP_URL:-http://localhost:$PORT}"
export NEXTAUTH_URL="${NEXTAUTH_URL:-$APP_URL}"
cat <<MSG

  Anodyne is starting on $APP_URL

  Demo sign-ins (password: ${DEMO_PASSWORD:-anodyne-demo})
    admin@anodyne.test        admin
    designer@anodyne.test     designer
    technician@anodyne.test   technician
    reviewer@anodyne.test     reviewer

  Mail sent by the app lands in the local SMTP sink: Admin → Outbox.
  Caution: tube amplifier supplies are lethal. Anodyne's figures are estimates to be confirmed by measurement.
  Stop the database and fakes with: npm run stop

MSG
# one exploration worker beside the app (more on other machines: README, "Explore: tolerance runs, tube swaps, part searches")
if [ "${EXPLORE_WORKER:-on}" != off ]; then
  EXPLORE_PARENT_PID=$$ node --import tsx scripts/worker.ts &
fi
exec node node_modules/next/dist/bin/next start -p "$PORT" -H 0.0.0.0
