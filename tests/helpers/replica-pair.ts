// The settings of a private MariaDB primary with its binary log (scripts/mariadb.sh, DB_BINLOG=1)
// and a GTID replica of it (scripts/mariadb-replica.sh), small, in a data folder of their own:
// used by the replica routing test and by bench:scale's replica drill.
export function replicaPairEnv(p: { dataDir: string; primaryPort: number; replicaPort: number; dbName: string }): NodeJS.ProcessEnv {
  return {
    ...process.env,
    DATA_DIR: p.dataDir,
    DB_PORT: String(p.primaryPort),
    DB_REPLICA_PORT: String(p.replicaPort),
    DB_NAME: p.dbName,
    DB_BINLOG: "1",
    DB_BUFFER_POOL: "64M",
    DB_REPLICA_BUFFER_POOL: "64M",
    DB_LOG_FILE_SIZE: "48M",
  };
}
