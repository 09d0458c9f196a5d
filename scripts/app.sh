#!/usr/bin/env bash
# npm run dev / npm start: the app alone, with this install's settings and secrets
# (scripts/stack-env.sh; the secrets come from DATA_DIR, never from fixed defaults). Outside the
# demo and the tests the app refuses to start without them (lib/settings.ts, instrumentation.ts).
#   npm run dev        next dev on 127.0.0.1:APP_PORT (3000)
#   npm start          the built app (npm run build first) on 127.0.0.1:APP_PORT
set -euo pipefail
cd "$(dirname "$0")/.."
STACK=demo
export STILLFIELD_MODE="${STILLFIELD_MODE:-production}"
# shellcheck source=scripts/stack-env.sh
source scripts/stack-env.sh
case "${1:-start}" in
  dev) exec node node_modules/next/dist/bin/next dev -H 127.0.0.1 -p "$APP_PORT" ;;
  start)
    if [ -f scripts/app-server.mjs ]; then exec node scripts/app-server.mjs -H 127.0.0.1 -p "$APP_PORT"; fi
    exec node node_modules/next/dist/bin/next start -H 127.0.0.1 -p "$APP_PORT"
    ;;
  *) echo "usage: scripts/app.sh dev|start" >&2; exit 2 ;;
esac
