# Sourced by scripts/test.sh and scripts/demo.sh: ports, names and folders of one stack.
# STACK=demo uses the demo ports; STACK=test uses test ports offset by STACK_SLOT (0..9) so
# several test stacks (or a demo and a test run) can run side by side on one machine.
STACK="${STACK:-demo}"
SLOT="${STACK_SLOT:-0}"
export NEXT_TELEMETRY_DISABLED=1
export DATA_DIR="${DATA_DIR:-.data}"
export DB_HOST=127.0.0.1
export DB_PORT="${DB_PORT:-3407}"
export DB_USER="${DB_USER:-stillfield}"
export DB_PASSWORD="${DB_PASSWORD:-stillfield-local}"
export MQTT_HOST=127.0.0.1
export SMTP_HOST=127.0.0.1
if [ "$STACK" = "test" ]; then
  export DB_NAME="stillfield_test${SLOT}"
  export APP_PORT=$((3100 + SLOT))
  export MQTT_PORT=$((1894 + SLOT))
  export SMTP_PORT=$((2535 + SLOT))
  export WORKER_HEALTH_PORT=$((9474 + SLOT))
  export BROKER_HEALTH_PORT=$((9484 + SLOT))
  export NEXT_DIST_DIR=".next-test${SLOT}"
else
  export DB_NAME="${DB_NAME:-stillfield}"
  export APP_PORT="${APP_PORT:-3000}"
  export MQTT_PORT="${MQTT_PORT:-1884}"
  export SMTP_PORT="${SMTP_PORT:-2525}"
  export WORKER_HEALTH_PORT="${WORKER_HEALTH_PORT:-9464}"
  export BROKER_HEALTH_PORT="${BROKER_HEALTH_PORT:-9465}"
  export NEXT_DIST_DIR="${NEXT_DIST_DIR:-.next}"
fi
export APP_URL="http://127.0.0.1:${APP_PORT}"
export NEXTAUTH_URL="$APP_URL"
mkdir -p "$DATA_DIR"
if [ -z "${NEXTAUTH_SECRET:-}" ]; then
  if [ ! -s "$DATA_DIR/auth-secret" ]; then
    node -e 'process.stdout.write(require("crypto").randomBytes(32).toString("base64url"))' >"$DATA_DIR/auth-secret"
  fi
  NEXTAUTH_SECRET="$(cat "$DATA_DIR/auth-secret")"
  export NEXTAUTH_SECRET
fi
# keep browsers and tools from writing under the home folder
export XDG_CONFIG_HOME="$PWD/$DATA_DIR/xdg/config"
export XDG_CACHE_HOME="$PWD/$DATA_DIR/xdg/cache"
export PLAYWRIGHT_BROWSERS_PATH=0
export PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD=1
