#!/usr/bin/env bash
# This install's certificate authority and server certificate, made once with openssl:
#   $DATA_DIR/tls/ca.crt, ca.key          the CA (give ca.crt to every device; keep ca.key here)
#   $DATA_DIR/tls/server.crt, server.key  the broker's TLS listener and the mail sink's STARTTLS
# The server certificate names 127.0.0.1, localhost, this machine's host name and whatever
# TLS_SERVER_NAMES adds (e.g. TLS_SERVER_NAMES="DNS:mqtt.plant.example,IP:10.20.0.5"). It is
# made again when it is within 30 days of its end or the names asked for changed. Keys are mode
# 600. Safe to run again: it changes nothing that is still good.
#   bash scripts/tls.sh            (uses DATA_DIR, default .data)
set -euo pipefail
cd "$(dirname "$0")/.."
DATA_DIR="${DATA_DIR:-.data}"
DIR="$DATA_DIR/tls"
mkdir -p "$DIR"
chmod 755 "$DIR"
if ! command -v openssl >/dev/null 2>&1; then
  bash scripts/ensure-system.sh >&2
fi

names="IP:127.0.0.1,DNS:localhost,DNS:$(hostname)"
if [ -n "${TLS_SERVER_NAMES:-}" ]; then names="$names,$TLS_SERVER_NAMES"; fi

(
  flock 9
  if [ ! -s "$DIR/ca.key" ] || [ ! -s "$DIR/ca.crt" ]; then
    (umask 077 && openssl ecparam -name prime256v1 -genkey -noout -out "$DIR/ca.key")
    openssl req -x509 -new -key "$DIR/ca.key" -sha256 -days 3650 -subj "/O=Stillfield/CN=Stillfield install CA $(hostname)" \
      -addext "basicConstraints=critical,CA:TRUE,pathlen:0" -addext "keyUsage=critical,keyCertSign,cRLSign" \
      -out "$DIR/ca.crt" 2>/dev/null
    rm -f "$DIR/server.crt"
    echo "Made a certificate authority for this install: $DIR/ca.crt"
  fi
  current=""
  if [ -s "$DIR/server.crt" ]; then current="$(cat "$DIR/server.names" 2>/dev/null || true)"; fi
  if [ ! -s "$DIR/server.key" ] || [ ! -s "$DIR/server.crt" ] || [ "$current" != "$names" ] ||
    ! openssl x509 -checkend 2592000 -noout -in "$DIR/server.crt" >/dev/null 2>&1; then
    (umask 077 && openssl ecparam -name prime256v1 -genkey -noout -out "$DIR/server.key")
    openssl req -new -key "$DIR/server.key" -subj "/O=Stillfield/CN=$(hostname)" -out "$DIR/server.csr" 2>/dev/null
    printf 'subjectAltName=%s\nbasicConstraints=CA:FALSE\nkeyUsage=critical,digitalSignature\nextendedKeyUsage=serverAuth\n' "$names" >"$DIR/server.ext"
    openssl x509 -req -in "$DIR/server.csr" -CA "$DIR/ca.crt" -CAkey "$DIR/ca.key" -CAcreateserial -sha256 -days 825 \
      -extfile "$DIR/server.ext" -out "$DIR/server.crt" 2>/dev/null
    rm -f "$DIR/server.csr" "$DIR/server.ext"
    echo "$names" >"$DIR/server.names"
    echo "Made the server certificate ($names): $DIR/server.crt"
  fi
  chmod 600 "$DIR/ca.key" "$DIR/server.key"
  chmod 644 "$DIR/ca.crt" "$DIR/server.crt"
) 9>"$DIR/.lock"
