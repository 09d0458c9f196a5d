#!/usr/bin/env bash
# Runs one command with this install's settings and secrets (scripts/stack-env.sh), e.g.
#   bash scripts/with-env.sh npx tsx scripts/migrate.ts
# used by the npm scripts that start one process on its own (db:migrate, broker, worker, …).
set -euo pipefail
cd "$(dirname "$0")/.."
STACK="${STACK:-demo}"
export STILLFIELD_MODE="${STILLFIELD_MODE:-production}"
# shellcheck source=scripts/stack-env.sh
source scripts/stack-env.sh
exec "$@"
