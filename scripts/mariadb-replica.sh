#!/usr/bin/env bash
# A private read-only MariaDB replica of our primary (scripts/mariadb.sh), on loopback, for chart,
# report and export reads (db/read-replica.ts). GTID replication; data under
# $DATA_DIR/mariadb-replica, port DB_REPLICA_PORT (default DB_PORT + 10), server_id 2.
#   scripts/mariadb-replica.sh start [--restart-primary]
#        makes the replication account on the primary, initialises the replica from a consistent
#        dump of the primary's stillfield% databases (with its GTID position), starts it and
#        replication. The primary needs its binary log: it is turned on at the primary's next
#        start once the replica's folder exists; --restart-primary restarts it now.
#   scripts/mariadb-replica.sh stop | status | sql [args…]
# Then run the app with DB_REPLICA_PORT set (lib/settings.ts). Hardened like the primary: runs as
# the system user `stillfield` when started by root, root by socket only, the app's account may
# read (SELECT) and see the replication state (SLAVE MONITOR), read_only for everyone else.
set -euo pipefail
cd "$(dirname "$0")/.."
ROOT_DIR="$(pwd)"

DATA_DIR="${DATA_DIR:-.data}"
case "$DATA_DIR" in /*) ;; *) DATA_DIR="$ROOT_DIR/$DATA_DIR" ;; esac
export DATA_DIR
# shellcheck source=scripts/secrets.sh
source scripts/secrets.sh
DB_PORT="${DB_PORT:-3407}"
REPLICA_PORT="${DB_REPLICA_PORT:-$((DB_PORT + 10))}"
DB_USER="${DB_USER:-stillfield_app}"
DB_PASSWORD="${DB_PASSWORD:-$(ensure_secret secrets/db-password)}"
ROOT_PASSWORD="$(ensure_secret secrets/db-root-password)"
REPL_USER="stillfield_repl"
REPL_PASSWORD="$(ensure_secret secrets/db-repl-password)"
PRIMARY_ROOT_CNF="$DATA_DIR/secrets/db-root.cnf"
MDB_DIR="$DATA_DIR/mariadb-replica"
RUN_DIR="$DATA_DIR/run"
FILES_DIR="$DATA_DIR/mariadb-replica-files"
SOCK="$RUN_DIR/mariadb-replica.sock"
PID_FILE="$RUN_DIR/mariadb-replica.pid"
CNF="$RUN_DIR/mariadb-replica.cnf"
ROOT_CNF="$DATA_DIR/secrets/db-replica-root.cnf"
LOG="$RUN_DIR/mariadb-replica.log"
OS_USER="stillfield"

find_bin() {
  for b in "$@"; do
    if command -v "$b" >/dev/null 2>&1; then command -v "$b"; return 0; fi
    for d in /usr/sbin /usr/bin; do if [ -x "$d/$b" ]; then echo "$d/$b"; return 0; fi; done
  done
  return 1
}
MARIADBD="$(find_bin mariadbd mysqld || true)"
ADMIN="$(find_bin mariadb-admin mysqladmin || true)"
CLIENT="$(find_bin mariadb mysql || true)"
DUMP="$(find_bin mariadb-dump mysqldump || true)"
INSTALL_DB="$(find_bin mariadb-install-db mysql_install_db || true)"

is_running() { [ -f "$PID_FILE" ] && kill -0 "$(cat "$PID_FILE")" 2>/dev/null; }
ping_db() {
  local out
  out="$("$ADMIN" --no-defaults --socket="$SOCK" --connect-timeout=2 -uping-probe ping 2>&1)" && return 0
  case "$out" in *"Access denied"*) return 0 ;; esac
  return 1
}
primary() { "$CLIENT" --defaults-file="$PRIMARY_ROOT_CNF" "$@"; }
replica() { "$CLIENT" --defaults-file="$ROOT_CNF" "$@"; }

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
  fi
  echo root
}

mkdir -p "$RUN_DIR" "$DATA_DIR/secrets"
(umask 077 && printf '[client]\nuser=root\npassword=%s\nsocket=%s\n' "$ROOT_PASSWORD" "$SOCK" >"$ROOT_CNF")

start() {
  # the folder's presence turns on the primary's binary log at its next start (scripts/mariadb.sh)
  mkdir -p "$MDB_DIR" "$FILES_DIR"
  chmod 700 "$FILES_DIR"
  if ! bash scripts/mariadb.sh status >/dev/null 2>&1; then
    echo "The primary MariaDB is not running; start it first (npm run db:start)." >&2
    exit 3
  fi
  if [ "$(primary -N -e 'SELECT @@log_bin')" != "1" ]; then
    if [ "${1:-}" = "--restart-primary" ]; then
      echo "Restarting the primary MariaDB to turn on its binary log…"
      bash scripts/mariadb.sh stop && bash scripts/mariadb.sh start
    else
      echo "The primary has no binary log yet. It turns on at the primary's next start:" >&2
      echo "  npm run db:stop && npm run db:start   (or: scripts/mariadb-replica.sh start --restart-primary)" >&2
      exit 4
    fi
  fi
  primary <<SQL
CREATE USER IF NOT EXISTS '$REPL_USER'@'127.0.0.1' IDENTIFIED BY '$REPL_PASSWORD';
ALTER USER '$REPL_USER'@'127.0.0.1' IDENTIFIED BY '$REPL_PASSWORD';
GRANT REPLICATION SLAVE ON *.* TO '$REPL_USER'@'127.0.0.1';
FLUSH PRIVILEGES;
SQL
  if is_running && ping_db; then
    echo "MariaDB replica (ours) already running on 127.0.0.1:$REPLICA_PORT"
  else
    rm -f "$PID_FILE" "$SOCK"
    if (exec 3<>"/dev/tcp/127.0.0.1/$REPLICA_PORT") 2>/dev/null; then
      echo "Port $REPLICA_PORT on 127.0.0.1 is already in use; choose another: DB_REPLICA_PORT=…" >&2
      exit 3
    fi
    local initialise=0 run_as
    [ -d "$MDB_DIR/mysql" ] || initialise=1
    run_as="$(choose_os_user)"
    cat >"$CNF" <<CNF
[mysqld]
user=$run_as
datadir=$MDB_DIR
socket=$SOCK
pid-file=$PID_FILE
port=$REPLICA_PORT
bind-address=127.0.0.1
skip-name-resolve
secure_file_priv=$FILES_DIR
local_infile=0
character-set-server=utf8mb4
collation-server=utf8mb4_unicode_ci
innodb_buffer_pool_size=${DB_REPLICA_BUFFER_POOL:-256M}
innodb_log_file_size=${DB_LOG_FILE_SIZE:-256M}
innodb_flush_log_at_trx_commit=2
max_connections=300
log-error=$LOG
server_id=2
read_only=1
relay_log=relay-bin
gtid_strict_mode=1
slave_parallel_threads=2
CNF
    if [ "$initialise" = "1" ]; then
      echo "Initialising a private MariaDB replica in $MDB_DIR…"
      "$INSTALL_DB" --no-defaults --user="$run_as" --datadir="$MDB_DIR" --skip-test-db \
        --auth-root-authentication-method=socket --auth-root-socket-user="$(id -un)" >"$RUN_DIR/install-db-replica.log" 2>&1 \
        || { echo "mariadb-install-db failed; see $RUN_DIR/install-db-replica.log" >&2; exit 1; }
      [ "$run_as" = "root" ] || chown -R "$run_as:" "$MDB_DIR"
    fi
    nohup "$MARIADBD" --defaults-file="$CNF" >>"$LOG" 2>&1 </dev/null &
    for _ in $(seq 1 120); do ping_db && break; sleep 0.25; done
    if ! ping_db; then
      echo "The MariaDB replica did not start; the last lines of $LOG:" >&2
      tail -n 20 "$LOG" >&2 || true
      exit 1
    fi
    if [ "$initialise" = "1" ]; then
      "$CLIENT" --no-defaults --socket="$SOCK" -uroot -e \
        "ALTER USER 'root'@'localhost' IDENTIFIED VIA unix_socket OR mysql_native_password USING PASSWORD('$ROOT_PASSWORD'); FLUSH PRIVILEGES;"
    fi
    echo "MariaDB replica started on 127.0.0.1:$REPLICA_PORT as OS user $run_as (data in $MDB_DIR)"
  fi
  replica <<SQL
CREATE USER IF NOT EXISTS '$DB_USER'@'127.0.0.1' IDENTIFIED BY '$DB_PASSWORD';
CREATE USER IF NOT EXISTS '$DB_USER'@'localhost' IDENTIFIED BY '$DB_PASSWORD';
GRANT SELECT ON \`stillfield%\`.* TO '$DB_USER'@'127.0.0.1';
GRANT SELECT ON \`stillfield%\`.* TO '$DB_USER'@'localhost';
GRANT SLAVE MONITOR ON *.* TO '$DB_USER'@'127.0.0.1';
GRANT SLAVE MONITOR ON *.* TO '$DB_USER'@'localhost';
FLUSH PRIVILEGES;
SQL
  if [ -z "$(replica -N -e 'SHOW SLAVE STATUS')" ]; then
    local dbs
    dbs="$(primary -N -e "SELECT schema_name FROM information_schema.schemata WHERE schema_name LIKE 'stillfield%'" | tr '\n' ' ')"
    echo "Copying the primary's databases to the replica (${dbs:-none yet})…"
    # one consistent snapshot and the GTID position it stands at (SET GLOBAL gtid_slave_pos)
    if [ -n "$dbs" ]; then
      # shellcheck disable=SC2086 # one word per database name
      "$DUMP" --defaults-file="$PRIMARY_ROOT_CNF" --single-transaction --gtid --master-data=1 --routines --events --databases $dbs | replica
    else
      replica -e "SET GLOBAL gtid_slave_pos = '$(primary -N -e 'SELECT @@gtid_binlog_pos')'"
    fi
    replica -e "CHANGE MASTER TO MASTER_HOST='127.0.0.1', MASTER_PORT=$DB_PORT, MASTER_USER='$REPL_USER', MASTER_PASSWORD='$REPL_PASSWORD', MASTER_USE_GTID=slave_pos, MASTER_CONNECT_RETRY=2; START SLAVE;"
  else
    replica -e "START SLAVE" 2>/dev/null || true
  fi
  for _ in $(seq 1 40); do
    if replica -e 'SHOW SLAVE STATUS\G' | grep -q 'Slave_IO_Running: Yes'; then
      echo "Replicating from 127.0.0.1:$DB_PORT (GTID); set DB_REPLICA_PORT=$REPLICA_PORT for the app"
      return 0
    fi
    sleep 0.25
  done
  echo "The replica started but is not replicating yet:" >&2
  replica -e 'SHOW SLAVE STATUS\G' | grep -E 'Running|Error' >&2 || true
  exit 1
}

cmd="${1:-start}"
case "$cmd" in
  start) shift || true; start "${1:-}" ;;
  stop)
    if is_running; then
      pid="$(cat "$PID_FILE")"
      "$ADMIN" --defaults-file="$ROOT_CNF" shutdown >/dev/null 2>&1 || kill "$pid" 2>/dev/null || true
      for _ in $(seq 1 120); do kill -0 "$pid" 2>/dev/null || break; sleep 0.25; done
      if kill -0 "$pid" 2>/dev/null; then kill -9 "$pid" 2>/dev/null || true; fi
      echo "MariaDB replica stopped"
    else
      echo "MariaDB replica (ours) is not running"
    fi
    ;;
  status)
    if is_running && ping_db; then
      replica -e 'SHOW SLAVE STATUS\G' | grep -E 'Slave_(IO|SQL)_Running:|Seconds_Behind_Master|Gtid_IO_Pos' || true
      exit 0
    fi
    echo "not running"; exit 1
    ;;
  sql) shift; replica "$@" ;;
  *) echo "usage: scripts/mariadb-replica.sh start [--restart-primary]|stop|status|sql" >&2; exit 2 ;;
esac
