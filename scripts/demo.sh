#!/usr/bin/env bash
# npm run demo: installs what is missing, starts MariaDB, the broker, the ingest worker, the mail
# sink and mailer, the plant simulator and the app; seeds the demo plant on the first run;
# prints the address and the demo sign-ins. Ctrl-C stops everything it started, MariaDB too.
set -uo pipefail
cd "$(dirname "$0")/.."
STACK=demo
# shellcheck source=scripts/stack-env.sh
source scripts/stack-env.sh

bash scripts/ensure-npm.sh || exit 1
bash scripts/ensure-system.sh || exit 1

db_started_here=0
if ! bash scripts/mariadb.sh status >/dev/null 2>&1; then db_started_here=1; fi
bash scripts/mariadb.sh start || exit $?

stack_pid=""
cleanup() {
  trap - EXIT INT TERM
  if [ -n "$stack_pid" ] && kill -0 "$stack_pid" 2>/dev/null; then
    kill -TERM "$stack_pid" 2>/dev/null
    wait "$stack_pid" 2>/dev/null
  fi
  if [ "$db_started_here" = "1" ]; then bash scripts/mariadb.sh stop; fi
  echo "Stillfield demo stopped."
}
trap cleanup EXIT
trap 'exit 0' INT TERM

npx tsx scripts/migrate.ts || exit 1
first_run=0
npx tsx db/seed.ts | tee "$DATA_DIR/seed.log" || exit 1
grep -q "^Seeded" "$DATA_DIR/seed.log" && first_run=1

# history for the 7- and 30-day charts, written once on the first run
if [ "$first_run" = "1" ] && [ -f simulators/backfill.ts ]; then
  echo "Writing ${DEMO_BACKFILL_DAYS:-30} days of demo history (first run only)…"
  npx tsx simulators/backfill.ts --days "${DEMO_BACKFILL_DAYS:-30}" || echo "History backfill failed; the live data still works."
fi

# build the app when there is no build or a source file changed since the last one
if [ ! -f "$NEXT_DIST_DIR/BUILD_ID" ] || [ -n "$(find app components lib db next.config.mjs tailwind.config.ts package-lock.json -newer "$NEXT_DIST_DIR/BUILD_ID" -type f -print -quit 2>/dev/null)" ]; then
  echo "Building the app (next build)…"
  npx next build >"$DATA_DIR/next-build.log" 2>&1 || { echo "next build failed; see $DATA_DIR/next-build.log"; tail -30 "$DATA_DIR/next-build.log"; exit 1; }
fi

ready="$DATA_DIR/run/demo-ready"
rm -f "$ready"
STACK_READY_FILE="$ready" node --import tsx scripts/run-stack.ts demo &
stack_pid=$!
for _ in $(seq 1 240); do
  [ -f "$ready" ] && break
  kill -0 "$stack_pid" 2>/dev/null || break
  sleep 0.5
done
if [ ! -f "$ready" ]; then
  echo "The demo did not start (see the messages above)."
  exit 1
fi

cat <<MSG

  Stillfield is running: ${APP_URL}

  Demo sign-ins (invented people of the demo plant, Harrow Fen Packaging):
    viewer      viewer@harrowfen.example     view-demo-2026
    shift lead  lead@harrowfen.example       lead-demo-2026
    engineer    engineer@harrowfen.example   engineer-demo-2026
    admin       admin@harrowfen.example      admin-demo-2026
    on call     oncall@harrowfen.example     oncall-demo-2026

  E-mails (alerts, escalations, digests) land in the local mail sink: ${DATA_DIR}/mail/ (one .eml per message)
  Press Ctrl-C to stop everything.

MSG
wait "$stack_pid"
