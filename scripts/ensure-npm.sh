#!/usr/bin/env bash
# Installs npm packages from the committed lock when node_modules is missing or stale.
set -euo pipefail
cd "$(dirname "$0")/.."
stamp="node_modules/.stillfield-lock-stamp"
lock_sum="$(sha256sum package-lock.json | cut -d' ' -f1)"
if [ -d node_modules ] && [ -f "$stamp" ] && [ "$(cat "$stamp")" = "$lock_sum" ]; then
  exit 0
fi
echo "Installing npm packages (npm ci)…"
PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD=1 npm ci --no-audit --no-fund --loglevel=error
echo "$lock_sum" >"$stamp"
