# Sourced by scripts/stack-env.sh and scripts/mariadb.sh: this install's secrets, each made once
# (random, from /dev/urandom) in a file under $DATA_DIR that only its owner may read (mode 600).
#   auth-secret                    signs the app's session cookies (NEXTAUTH_SECRET)
#   secrets/db-password            the app's MariaDB account (DB_USER)
#   secrets/db-root-password       MariaDB's root, reachable by its socket only (scripts/mariadb.sh)
#   secrets/mqtt-worker-password   the broker account svc-worker (the ingest worker)
#   secrets/mqtt-app-password      the broker account svc-app (the app)
#   secrets/mqtt-admin-password    the dynamic-security admin of the private Mosquitto (BROKER=mosquitto)
#   secrets/broker-seal-key        seals device secrets for Mosquitto (lib/device-secrets.ts)
# Several runs may start at once (parallel test stacks): a lock makes each secret exactly once.

# ensure_secret <file under DATA_DIR>: prints the secret, making it first if need be
ensure_secret() {
  local file="$DATA_DIR/$1"
  mkdir -p "$(dirname "$file")" "$DATA_DIR"
  if [ ! -s "$file" ]; then
    (
      flock 9
      if [ ! -s "$file" ]; then
        umask 077
        head -c 48 /dev/urandom | base64 | tr -d '/+=\n' | head -c 40 >"$file.tmp"
        mv "$file.tmp" "$file"
      fi
    ) 9>"$DATA_DIR/.secrets.lock"
  fi
  chmod 600 "$file"
  cat "$file"
}
