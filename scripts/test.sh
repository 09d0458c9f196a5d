#!/usr/bin/env bash
# npm test: installs what is missing, starts MariaDB (its own test database) and the services,
# runs lint and the layer rules, unit, integration and browser tests, stops what it started, prints
# "N passed, N failed" (lint and the layer check count as one check each).
#   npm test                         everything
#   npm test -- lint [files…]        ESLint (on the files given, or everything) + the layer rules
#   npm test -- unit|integration|e2e [files…]   one part (for focused work)
#   STACK_SLOT=3 npm test -- e2e     a second stack on other ports, side by side
set -uo pipefail
cd "$(dirname "$0")/.."
STACK=test
# shellcheck source=scripts/stack-env.sh
source scripts/stack-env.sh

PART="${1:-all}"
shift || true
FILES=("$@")
OUT="$DATA_DIR/test-output/slot${SLOT}"
rm -rf "$OUT"
mkdir -p "$OUT"

bash scripts/ensure-npm.sh || exit 1

status=0
# A check that is not a test runner (lint, layer rules): its pass/fail lands in check-NAME.json,
# which summarize-tests.mjs counts as one test.
run_check() {
  local name="$1"
  shift
  local ok=true
  "$@" || { ok=false; status=1; }
  printf '{"name":"%s","ok":%s}\n' "$name" "$ok" >"$OUT/check-$name.json"
}

if [ "$PART" = "all" ] || [ "$PART" = "lint" ]; then
  echo "── lint (ESLint) and layer rules (dependency-cruiser)"
  lint_targets=(.)
  if [ "$PART" = "lint" ] && [ ${#FILES[@]} -gt 0 ]; then lint_targets=("${FILES[@]}"); fi
  run_check lint npx eslint --max-warnings=0 --cache --cache-location "$DATA_DIR/eslint-cache/" "${lint_targets[@]}"
  run_check layers npx depcruise --config .dependency-cruiser.cjs --output-type err app components db lib ingest simulators scripts tests
  if [ "$PART" = "lint" ]; then
    node scripts/summarize-tests.mjs "$OUT"
    exit $status
  fi
fi

need_browser=""
if [ "$PART" = "all" ] || [ "$PART" = "e2e" ]; then need_browser="--browser"; fi
# the Mosquitto-profile integration tests start a private mosquitto of their own
need_mosquitto=""
if [ "$PART" = "all" ] || [ "$PART" = "integration" ]; then need_mosquitto="--mosquitto"; fi
bash scripts/ensure-system.sh $need_browser $need_mosquitto || exit 1

db_started_here=0
if ! bash scripts/mariadb.sh status >/dev/null 2>&1; then db_started_here=1; fi
bash scripts/mariadb.sh start || exit 1

stack_pid=""
cleanup() {
  if [ -n "$stack_pid" ] && kill -0 "$stack_pid" 2>/dev/null; then
    kill -TERM "$stack_pid" 2>/dev/null
    wait "$stack_pid" 2>/dev/null
  fi
  if [ "$db_started_here" = "1" ] && [ "${KEEP_DB:-0}" != "1" ]; then bash scripts/mariadb.sh stop >/dev/null; fi
}
trap cleanup EXIT
trap 'exit 130' INT TERM

run_vitest() {
  local project="$1"
  shift
  npx vitest run --project "$project" --reporter=default --reporter=json --outputFile="$OUT/vitest-$project.json" "$@" || status=1
}

fresh_database() {
  bash scripts/mariadb.sh sql -e "DROP DATABASE IF EXISTS \`$DB_NAME\`; CREATE DATABASE \`$DB_NAME\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;" || return 1
  npx tsx scripts/migrate.ts >/dev/null || return 1
  npx tsx db/seed.ts >/dev/null || return 1
}

if [ "$PART" = "all" ] || [ "$PART" = "unit" ]; then
  echo "── unit tests"
  run_vitest unit "${FILES[@]}"
fi

if [ "$PART" = "all" ] || [ "$PART" = "integration" ]; then
  echo "── integration tests (real MariaDB on 127.0.0.1:$DB_PORT, real broker)"
  fresh_database || status=1
  run_vitest integration "${FILES[@]}"
fi

if [ "$PART" = "all" ] || [ "$PART" = "e2e" ]; then
  echo "── browser tests (Debian Chromium)"
  fresh_database || status=1
  if [ "${SKIP_BUILD:-0}" != "1" ] || [ ! -d "$NEXT_DIST_DIR" ]; then
    npx next build >"$OUT/next-build.log" 2>&1 || { echo "next build failed:"; tail -40 "$OUT/next-build.log"; status=1; }
    grep -E "First Load JS|^[├└┌].*kB" "$OUT/next-build.log" | tail -30 || true
  fi
  rm -f "$OUT/stack-ready"
  STACK_READY_FILE="$OUT/stack-ready" node --import tsx scripts/run-stack.ts test >"$OUT/stack.log" 2>&1 &
  stack_pid=$!
  for _ in $(seq 1 240); do
    [ -f "$OUT/stack-ready" ] && break
    kill -0 "$stack_pid" 2>/dev/null || break
    sleep 0.5
  done
  if [ ! -f "$OUT/stack-ready" ]; then
    echo "The services did not start; the last lines of $OUT/stack.log:"
    tail -30 "$OUT/stack.log"
    status=1
  else
    PLAYWRIGHT_JSON_OUTPUT_NAME="$OUT/playwright.json" PW_OUTPUT_DIR="$OUT/e2e" \
      npx playwright test --reporter=list,json "${FILES[@]}" || status=1
  fi
fi

node scripts/summarize-tests.mjs "$OUT"
exit $status
