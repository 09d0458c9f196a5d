#!/usr/bin/env bash
# A private MariaDB for Stillfield: data under $DATA_DIR/mariadb, bound to 127.0.0.1 on its own
# port and socket (never the system's 3306), started and stopped by our scripts.
#   scripts/mariadb.sh start   install if missing, initialise, start, wait, create db + user
#   scripts/mariadb.sh stop    clean shutdown
#   scripts/mariadb.sh status  exit 0 when ours is running
#   scripts/mariadb.sh sql     a SQL shell as root on our socket
set -euo pipefail
cd "$(dirname "$0")/.."
ROOT_DIR="$(pwd)"

DATA_DIR="${DATA_DIR:-.data}"
case "$DATA_DIR" in /*) ;; *) DATA_DIR="$ROOT_DIR/$DATA_DIR" ;; esac
DB_PORT="${DB_PORT:-3407}"
DB_USER="${DB_USER:-stillfield}"
DB_PASSWORD="${DB_PASSWORD:-stillfield-local}"
DB_NAME="${DB_NAME:-stillfield}"
MDB_DIR="$DATA_DIR/mariadb"
RUN_DIR="$DATA_DIR/run"
SOCK="$RUN_DIR/mariadb.sock"
PID_FILE="$RUN_DIR/mariadb.pid"
CNF="$RUN_DIR/mariadb.cnf"
LOG="$RUN_DIR/mariadb.log"

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

ping_db() {
  "$ADMIN" --no-defaults --socket="$SOCK" -uroot ping >/dev/null 2>&1
}

port_busy() {
  (exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null
}

sql_root() {
  "$CLIENT" --no-defaults --socket="$SOCK" -uroot "$@"
}

cmd="${1:-start}"
if [ "$cmd" = "start" ]; then
  bash scripts/ensure-system.sh
fi
MARIADBD="$(find_bin mariadbd mysqld || true)"
ADMIN="$(find_bin mariadb-admin mysqladmin || true)"
CLIENT="$(find_bin mariadb mysql || true)"
INSTALL_DB="$(find_bin mariadb-install-db mysql_install_db || true)"

case "$cmd" in
  start)
    mkdir -p "$RUN_DIR"
    if is_running && ping_db; then
      echo "MariaDB (ours) already running on 127.0.0.1:$DB_PORT"
    else
      rm -f "$PID_FILE" "$SOCK"
      if port_busy "$DB_PORT"; then
        echo "Port $DB_PORT on 127.0.0.1 is already in use by another program." >&2
        echo "Stop it, or choose another port: DB_PORT=3408 npm run demo" >&2
        exit 3
      fi
      cat >"$CNF" <<CNF
[mysqld]
user=root
datadir=$MDB_DIR
socket=$SOCK
pid-file=$PID_FILE
port=$DB_PORT
bind-address=127.0.0.1
skip-name-resolve
character-set-server=utf8mb4
collation-server=utf8mb4_unicode_ci
innodb_buffer_pool_size=512M
innodb_log_file_size=256M
innodb_flush_log_at_trx_commit=2
max_connections=300
log-error=$LOG
CNF
      if [ ! -d "$MDB_DIR/mysql" ]; then
        echo "Initialising a private MariaDB in $MDB_DIR…"
        mkdir -p "$MDB_DIR"
        "$INSTALL_DB" --no-defaults --user=root --datadir="$MDB_DIR" \
          --auth-root-authentication-method=normal --skip-test-db >"$RUN_DIR/install-db.log" 2>&1 \
          || { echo "mariadb-install-db failed; see $RUN_DIR/install-db.log" >&2; exit 1; }
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
      echo "MariaDB started on 127.0.0.1:$DB_PORT (data in $MDB_DIR)"
    fi
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
    ;;
  stop)
    if is_running; then
      pid="$(cat "$PID_FILE")"
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
    sql_root "$@"
    ;;
  *)
    echo "usage: scripts/mariadb.sh start|stop|status|sql" >&2
    exit 2
    ;;
esac
