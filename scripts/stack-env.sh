# Sourced by scripts/test.sh, scripts/demo.sh and scripts/app.sh: ports, names, folders and
# secrets of one stack. STACK=demo uses the demo ports; STACK=test uses test ports offset by
# STACK_SLOT (0..9) so several test stacks (or a demo and a test run) can run side by side.
# A value already in the environment wins, so a plant can set its own (README "Security").
# Secrets are random per install, made once under $DATA_DIR with mode 600 (scripts/secrets.sh);
# the TLS certificate authority and server certificate likewise (scripts/tls.sh).
STACK="${STACK:-demo}"
SLOT="${STACK_SLOT:-0}"
export NEXT_TELEMETRY_DISABLED=1
export DATA_DIR="${DATA_DIR:-.data}"
# lib/settings.ts: the demo and the tests may run without secrets of their own (they never do
# here); any other mode refuses to start without them
export STILLFIELD_MODE="${STILLFIELD_MODE:-$STACK}"
export DB_HOST="${DB_HOST:-127.0.0.1}"
export DB_PORT="${DB_PORT:-3407}"
export DB_USER="${DB_USER:-stillfield_app}"
export MQTT_HOST="${MQTT_HOST:-127.0.0.1}"
export SMTP_HOST="${SMTP_HOST:-127.0.0.1}"
if [ "$STACK" = "test" ]; then
  export DB_NAME="stillfield_test${SLOT}"
  export APP_PORT=$((3100 + SLOT))
  export MQTT_PORT=$((1894 + SLOT))
  export MQTT_TLS_PORT=$((8894 + SLOT))
  export SMTP_PORT=$((2535 + SLOT))
  export WORKER_HEALTH_PORT=$((9474 + SLOT))
  export BROKER_HEALTH_PORT=$((9484 + SLOT))
  export SMS_FAKE_PORT=$((9494 + SLOT))
  export PUSH_FAKE_PORT=$((9504 + SLOT))
  export WEATHER_FAKE_PORT=$((9514 + SLOT))
  export NEXT_DIST_DIR=".next-test${SLOT}"
else
  export DB_NAME="${DB_NAME:-stillfield}"
  export APP_PORT="${APP_PORT:-3000}"
  export MQTT_PORT="${MQTT_PORT:-1884}"
  export MQTT_TLS_PORT="${MQTT_TLS_PORT:-8884}"
  export SMTP_PORT="${SMTP_PORT:-2525}"
  export WORKER_HEALTH_PORT="${WORKER_HEALTH_PORT:-9464}"
  export BROKER_HEALTH_PORT="${BROKER_HEALTH_PORT:-9465}"
  export SMS_FAKE_PORT="${SMS_FAKE_PORT:-9466}"
  export PUSH_FAKE_PORT="${PUSH_FAKE_PORT:-9467}"
  export WEATHER_FAKE_PORT="${WEATHER_FAKE_PORT:-9468}"
  export NEXT_DIST_DIR="${NEXT_DIST_DIR:-.next}"
  # two Next.js instances on the one port (scripts/app-server.mjs): the Floor of many screens
  export APP_INSTANCES="${APP_INSTANCES:-2}"
fi
export APP_URL="${APP_URL:-http://127.0.0.1:${APP_PORT}}"
export NEXTAUTH_URL="${NEXTAUTH_URL:-$APP_URL}"
# the SMS provider's SDK and the forecast SDK are pointed at the local fakes unless a plant sets its own
export SMS_API_BASE="${SMS_API_BASE:-http://127.0.0.1:${SMS_FAKE_PORT}}"
export WEATHER_API_URL="${WEATHER_API_URL:-http://127.0.0.1:${WEATHER_FAKE_PORT}/v1/forecast}"
mkdir -p "$DATA_DIR"
# others may pass through (the MariaDB server's own user must), but not list or read
chmod 711 "$DATA_DIR" 2>/dev/null || true
# shellcheck source=scripts/secrets.sh
source scripts/secrets.sh
if [ -z "${NEXTAUTH_SECRET:-}" ]; then NEXTAUTH_SECRET="$(ensure_secret auth-secret)"; fi
if [ -z "${DB_PASSWORD:-}" ]; then DB_PASSWORD="$(ensure_secret secrets/db-password)"; fi
if [ -z "${MQTT_WORKER_PASSWORD:-}" ]; then MQTT_WORKER_PASSWORD="$(ensure_secret secrets/mqtt-worker-password)"; fi
if [ -z "${MQTT_APP_PASSWORD:-}" ]; then MQTT_APP_PASSWORD="$(ensure_secret secrets/mqtt-app-password)"; fi
if [ -z "${MQTT_ADMIN_PASSWORD:-}" ]; then MQTT_ADMIN_PASSWORD="$(ensure_secret secrets/mqtt-admin-password)"; fi
if [ -z "${BROKER_SEAL_KEY:-}" ]; then BROKER_SEAL_KEY="$(ensure_secret secrets/broker-seal-key)"; fi
export NEXTAUTH_SECRET DB_PASSWORD MQTT_WORKER_PASSWORD MQTT_APP_PASSWORD MQTT_ADMIN_PASSWORD BROKER_SEAL_KEY
if [ "${MQTT_TLS_PORT:-0}" != "0" ] || [ -n "${TLS_SERVER_NAMES:-}" ]; then
  bash scripts/tls.sh >&2 || return 1 2>/dev/null || exit 1
fi
# keep browsers and tools from writing under the home folder
export XDG_CONFIG_HOME="$PWD/$DATA_DIR/xdg/config"
export XDG_CACHE_HOME="$PWD/$DATA_DIR/xdg/cache"
export PLAYWRIGHT_BROWSERS_PATH=0
export PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD=1
