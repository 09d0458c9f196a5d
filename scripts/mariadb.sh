#!/usr/bin/env bash
# A private MariaDB for Stillfield: data under $DATA_DIR/mariadb, bound to 127.0.0.1 on its own
# port and socket (never the system's 3306), started and stopped by our scripts.
#   scripts/mariadb.sh start   install if missing, initialise, start, wait, create db + user
#   scripts/mariadb.sh stop    clean shutdown
#   scripts/mariadb.sh status  exit 0 when ours is running
#   scripts/mariadb.sh sql     a SQL shell as root on our socket
# Hardening (README "Security"):
# - run by root, the server drops to the system user `stillfield` (made here when missing);
#   otherwise it runs as the user who started it;
# - root signs in by the socket only (the OS user who made the data folder, or the random password in
#   $DATA_DIR/secrets/db-root-password); no root account exists for TCP;
# - the app's account DB_USER has a random per-install password ($DATA_DIR/secrets/db-password,
#   mode 600) and rights on the `stillfield%` databases only (no FILE right);
# - secure_file_priv points at an empty folder of the server's own, so no SQL can read or write
#   files anywhere else (SELECT … INTO DUMPFILE, LOAD_FILE).
# A data folder made by earlier versions (root without a password on TCP, the app account
# `stillfield` with a fixed password) is upgraded at its next start; while such a server is
# still running, the new account is added beside the old one and the old one is dropped at the
# next start.
set -euo pipefail
cd "$(dirname "$0")/.."
ROOT_DIR="$(pwd)"

DATA_DIR="${DATA_DIR:-.data}"
case "$DATA_DIR" in /*) ;; *) DATA_DIR="$ROOT_DIR/$DATA_DIR" ;; esac
export DATA_DIR
# shellcheck source=scripts/secrets.sh
source scripts/secrets.sh
DB_PORT="${DB_PORT:-3407}"
DB_USER="${DB_USER:-stillfield_app}"
DB_PASSWORD="${DB_PASSWORD:-$(ensure_secret secrets/db-password)}"
DB_NAME="${DB_NAME:-stillfield}"
ROOT_PASSWORD="$(ensure_secret secrets/db-root-password)"
LEGACY_USER="stillfield"
MDB_DIR="$DATA_DIR/mariadb"
RUN_DIR="$DATA_DIR/run"
FILES_DIR="$DATA_DIR/mariadb-files"
SOCK="$RUN_DIR/mariadb.sock"
PID_FILE="$RUN_DIR/mariadb.pid"
CNF="$RUN_DIR/mariadb.cnf"
ROOT_CNF="$DATA_DIR/secrets/db-root.cnf"
LOG="$RUN_DIR/mariadb.log"
OS_USER="stillfield"

find_bin() {
  for b in "$@"; do
    if command -v "$b" >/dev/null 2>&1; then command -v "$b"; return 0; fi
    if [ -x "/usr/sbin/$b" ]; then echo "/usr/sbin/$b"; return 0; fi
    if [ -x "/usr/bin/$b" ]; then echo "/usr/bin/$b"; return 0; fi
  done
  return 1
}

is_running() {
  [ -f "$PID_FILE" ] && kill -0 "$(cat "$PID_FILE")" 2>/dev/null
}

# root's client settings (socket + password), readable by the owner only
write_root_cnf() {
  (umask 077 && printf '[client]\nuser=root\npassword=%s\nsocket=%s\n' "$ROOT_PASSWORD" "$SOCK" >"$ROOT_CNF")
}

# a server answers on our socket (any answer, even "access denied", means it is up)
ping_db() {
  local out
  out="$("$ADMIN" --no-defaults --socket="$SOCK" --connect-timeout=2 -uping-probe ping 2>&1)" && return 0
  case "$out" in *"Access denied"*) return 0 ;; esac
  return 1
}

port_busy() {
  (exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null
}

sql_root() {
  "$CLIENT" --defaults-file="$ROOT_CNF" "$@"
}

# Secures root (socket only) when a data folder of the earlier scheme still has it open.
upgrade_root() {
  if "$CLIENT" --defaults-file="$ROOT_CNF" -e "SELECT 1" >/dev/null 2>&1; then return 0; fi
  if ! "$CLIENT" --no-defaults --socket="$SOCK" -uroot -e "SELECT 1" >/dev/null 2>&1; then
    echo "Cannot sign in to MariaDB as root on $SOCK (neither with $ROOT_CNF nor the earlier passwordless root)." >&2
    return 1
  fi
  echo "Securing MariaDB's root account (socket only, per-install password)…"
  "$CLIENT" --no-defaults --socket="$SOCK" -uroot <<SQL
DROP USER IF EXISTS 'root'@'127.0.0.1', 'root'@'::1', 'root'@'%', 'root'@'$(hostname)';
ALTER USER 'root'@'localhost' IDENTIFIED VIA unix_socket OR mysql_native_password USING PASSWORD('$ROOT_PASSWORD');
FLUSH PRIVILEGES;
SQL
}

# Which OS user the server runs as: `stillfield` when we are root and it can reach the folders.
choose_os_user() {
  if [ "$(id -u)" -ne 0 ]; then id -un; return; fi
  if ! id "$OS_USER" >/dev/null 2>&1; then
    useradd --system --no-create-home --home-dir /nonexistent --shell /usr/sbin/nologin "$OS_USER" >/dev/null 2>&1 || true
  fi
  if id "$OS_USER" >/dev/null 2>&1; then
    chown -R "$OS_USER:" "$MDB_DIR" "$FILES_DIR"
    chown "$OS_USER:" "$RUN_DIR"
    touch "$LOG" && chown "$OS_USER:" "$LOG"
    if runuser -u "$OS_USER" -- test -w "$MDB_DIR" -a -w "$RUN_DIR" 2>/dev/null; then echo "$OS_USER"; return; fi
    echo "Note: the system user $OS_USER cannot reach $DATA_DIR (a parent folder is closed to it); MariaDB runs as root." >&2
  fi
  echo root
}

cmd="${1:-start}"
if [ "$cmd" = "start" ]; then
  bash scripts/ensure-system.sh
fi
MARIADBD="$(find_bin mariadbd mysqld || true)"
ADMIN="$(find_bin mariadb-admin mysqladmin || true)"
CLIENT="$(find_bin mariadb mysql || true)"
INSTALL_DB="$(find_bin mariadb-install-db mysql_install_db || true)"
mkdir -p "$RUN_DIR" "$DATA_DIR/secrets"
chmod 700 "$DATA_DIR/secrets"
write_root_cnf

case "$cmd" in
  start)
    fresh_start=0
    if is_running && ping_db; then
      echo "MariaDB (ours) already running on 127.0.0.1:$DB_PORT"
    else
      fresh_start=1
      rm -f "$PID_FILE" "$SOCK"
      if port_busy "$DB_PORT"; then
        echo "Port $DB_PORT on 127.0.0.1 is already in use by another program." >&2
        echo "Stop it, or choose another port: DB_PORT=3408 npm run demo" >&2
        exit 3
      fi
      mkdir -p "$MDB_DIR" "$FILES_DIR"
      chmod 700 "$FILES_DIR"
      initialise=0
      [ -d "$MDB_DIR/mysql" ] || initialise=1
      run_as="$(choose_os_user)"
      cat >"$CNF" <<CNF
[mysqld]
user=$run_as
datadir=$MDB_DIR
socket=$SOCK
pid-file=$PID_FILE
port=$DB_PORT
bind-address=127.0.0.1
skip-name-resolve
secure_file_priv=$FILES_DIR
local_infile=0
character-set-server=utf8mb4
collation-server=utf8mb4_unicode_ci
innodb_buffer_pool_size=${DB_BUFFER_POOL:-512M}
innodb_log_file_size=${DB_LOG_FILE_SIZE:-256M}
innodb_flush_log_at_trx_commit=2
max_connections=300
log-error=$LOG
server_id=1
CNF
      # the binary log (and with it GTIDs) only where a replica needs it: it costs every write
      # some time and disk. On at the next start once scripts/mariadb-replica.sh made its folder,
      # or with DB_BINLOG=1; an existing data folder takes it on without any other change.
      if [ "${DB_BINLOG:-0}" = "1" ] || [ -d "$DATA_DIR/mariadb-replica" ]; then
        printf 'log_bin=mariadb-bin\nbinlog_format=ROW\nbinlog_expire_logs_seconds=259200\ngtid_strict_mode=1\n' >>"$CNF"
      fi
      if [ "$initialise" = "1" ]; then
        echo "Initialising a private MariaDB in $MDB_DIR…"
        # root gets socket sign-in only: its OS user (unix_socket) or the per-install password
        "$INSTALL_DB" --no-defaults --user="$run_as" --datadir="$MDB_DIR" --skip-test-db \
          --auth-root-authentication-method=socket --auth-root-socket-user="$(id -un)" >"$RUN_DIR/install-db.log" 2>&1 \
          || { echo "mariadb-install-db failed; see $RUN_DIR/install-db.log" >&2; exit 1; }
        [ "$run_as" = "root" ] || chown -R "$run_as:" "$MDB_DIR"
      fi
      nohup "$MARIADBD" --defaults-file="$CNF" >>"$LOG" 2>&1 </dev/null &
      for _ in $(seq 1 120); do
        if ping_db; then break; fi
        sleep 0.25
      done
      if ! ping_db; then
        echo "MariaDB did not start; the last lines of $LOG:" >&2
        tail -n 20 "$LOG" >&2 || true
        exit 1
      fi
      if [ "$initialise" = "1" ]; then
        "$CLIENT" --no-defaults --socket="$SOCK" -uroot -e \
          "ALTER USER 'root'@'localhost' IDENTIFIED VIA unix_socket OR mysql_native_password USING PASSWORD('$ROOT_PASSWORD'); FLUSH PRIVILEGES;"
      fi
      echo "MariaDB started on 127.0.0.1:$DB_PORT as OS user $run_as (data in $MDB_DIR)"
    fi
    upgrade_root
    # database and application user (idempotent)
    sql_root <<SQL
CREATE DATABASE IF NOT EXISTS \`$DB_NAME\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
CREATE USER IF NOT EXISTS '$DB_USER'@'127.0.0.1' IDENTIFIED BY '$DB_PASSWORD';
CREATE USER IF NOT EXISTS '$DB_USER'@'localhost' IDENTIFIED BY '$DB_PASSWORD';
ALTER USER '$DB_USER'@'127.0.0.1' IDENTIFIED BY '$DB_PASSWORD';
ALTER USER '$DB_USER'@'localhost' IDENTIFIED BY '$DB_PASSWORD';
GRANT ALL PRIVILEGES ON \`stillfield%\`.* TO '$DB_USER'@'127.0.0.1';
GRANT ALL PRIVILEGES ON \`stillfield%\`.* TO '$DB_USER'@'localhost';
FLUSH PRIVILEGES;
SQL
    if [ "$fresh_start" = "1" ] && [ "$DB_USER" != "$LEGACY_USER" ]; then
      # the earlier scheme's account had a published password; nothing from then is still connected
      sql_root -e "DROP USER IF EXISTS '$LEGACY_USER'@'127.0.0.1', '$LEGACY_USER'@'localhost'; FLUSH PRIVILEGES;"
    fi
    ;;
  stop)
    if is_running; then
      pid="$(cat "$PID_FILE")"
      "$ADMIN" --defaults-file="$ROOT_CNF" shutdown >/dev/null 2>&1 ||
        "$ADMIN" --no-defaults --socket="$SOCK" -uroot shutdown >/dev/null 2>&1 || kill "$pid" 2>/dev/null || true
      for _ in $(seq 1 120); do
        kill -0 "$pid" 2>/dev/null || break
        sleep 0.25
      done
      if kill -0 "$pid" 2>/dev/null; then kill -9 "$pid" 2>/dev/null || true; fi
      echo "MariaDB stopped"
    else
      echo "MariaDB (ours) is not running"
    fi
    ;;
  status)
    if is_running && ping_db; then echo "running on 127.0.0.1:$DB_PORT"; exit 0; else echo "not running"; exit 1; fi
    ;;
  sql)
    shift
    upgrade_root >/dev/null
    sql_root "$@"
    ;;
  *)
    echo "usage: scripts/mariadb.sh start|stop|status|sql" >&2
    exit 2
    ;;
esac
