#!/usr/bin/env bash
# Installs the Debian packages Stillfield needs when they are missing:
#   mariadb-server/mariadb-client and openssl (always), chromium (when called with --browser),
#   mosquitto and mosquitto-clients (with --mosquitto: the Mosquitto broker profile and its tests).
# Safe to run again: it installs nothing that is already there.
set -euo pipefail

need=()
if ! command -v mariadbd >/dev/null 2>&1 && [ ! -x /usr/sbin/mariadbd ]; then
  need+=(mariadb-server mariadb-client)
fi
if ! command -v openssl >/dev/null 2>&1; then
  need+=(openssl)
fi
for flag in "$@"; do
  if [ "$flag" = "--browser" ] && [ ! -x /usr/bin/chromium ]; then
    need+=(chromium)
  fi
  if [ "$flag" = "--mosquitto" ]; then
    if [ ! -x /usr/sbin/mosquitto ]; then need+=(mosquitto); fi
    if ! command -v mosquitto_ctrl >/dev/null 2>&1; then need+=(mosquitto-clients); fi
  fi
done
if [ ${#need[@]} -eq 0 ]; then
  exit 0
fi

SUDO=""
if [ "$(id -u)" -ne 0 ]; then
  if command -v sudo >/dev/null 2>&1; then SUDO="sudo"; else
    echo "Stillfield needs these Debian packages: ${need[*]}. Run as root or install them first." >&2
    exit 1
  fi
fi

echo "Installing Debian packages: ${need[*]} (apt-get, once per machine)…"
export DEBIAN_FRONTEND=noninteractive
$SUDO apt-get update -qq
# policy-rc.d stops the packages from starting system-wide MariaDB or Mosquitto services we do not use
if [ ! -e /usr/sbin/policy-rc.d ]; then
  printf '#!/bin/sh\nexit 101\n' | $SUDO tee /usr/sbin/policy-rc.d >/dev/null
  $SUDO chmod +x /usr/sbin/policy-rc.d
  trap '$SUDO rm -f /usr/sbin/policy-rc.d' EXIT
fi
$SUDO apt-get install -y -qq --no-install-recommends "${need[@]}" >/dev/null
echo "Installed: ${need[*]}"
