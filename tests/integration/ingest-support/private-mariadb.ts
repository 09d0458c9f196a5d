// A throwaway MariaDB server of our own (its own data folder, port and socket under .data/),
// for tests and the benchmark that must stop and start the database without disturbing the
// project's shared server that other suites use at the same time. Same settings as
// scripts/mariadb.sh, smaller buffers.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import mysql from "mysql2/promise";
import { freePort, ROOT, waitFor } from "./processes";

const USER = "stillfield";
const PASSWORD = "stillfield-local";

function findBin(names: string[]): string {
  for (const n of names) {
    for (const dir of ["/usr/sbin", "/usr/bin", "/usr/local/sbin", "/usr/local/bin"]) {
      const p = path.join(dir, n);
      if (fs.existsSync(p)) return p;
    }
  }
  throw new Error(`None of ${names.join(", ")} found; install mariadb-server (scripts/ensure-system.sh)`);
}

export type PrivateMariadb = {
  port: number;
  /** DB_* settings for a database on this server (pass a name) */
  env(dbName: string): Record<string, string>;
  running(): boolean;
  /** process id of the server (undefined while stopped) */
  pid(): number | undefined;
  /** clean shutdown (SIGTERM), waits until the process is gone */
  stop(): Promise<void>;
  start(): Promise<void>;
  destroy(): Promise<void>;
};

export async function startPrivateMariadb(name: string, opts: { bufferPoolMb?: number } = {}): Promise<PrivateMariadb> {
  const base = path.join(ROOT, ".data", "test-ingest", `${name}-mariadb`);
  const dataDir = path.join(base, "data");
  const runDir = path.join(base, "run");
  fs.rmSync(base, { recursive: true, force: true });
  fs.mkdirSync(dataDir, { recursive: true });
  fs.mkdirSync(runDir, { recursive: true });
  const port = await freePort();
  const sock = path.join(runDir, "mariadb.sock");
  const cnf = path.join(runDir, "mariadb.cnf");
  fs.writeFileSync(
    cnf,
    [
      "[mysqld]",
      "user=root",
      `datadir=${dataDir}`,
      `socket=${sock}`,
      `pid-file=${path.join(runDir, "mariadb.pid")}`,
      `port=${port}`,
      "bind-address=127.0.0.1",
      "skip-name-resolve",
      "character-set-server=utf8mb4",
      "collation-server=utf8mb4_unicode_ci",
      `innodb_buffer_pool_size=${opts.bufferPoolMb ?? 128}M`,
      "innodb_log_file_size=256M",
      "innodb_flush_log_at_trx_commit=2",
      "max_connections=200",
      `log-error=${path.join(runDir, "mariadb.log")}`,
      "",
    ].join("\n"),
  );
  const install = spawnSync(
    findBin(["mariadb-install-db", "mysql_install_db"]),
    ["--no-defaults", "--user=root", `--datadir=${dataDir}`, "--auth-root-authentication-method=normal", "--skip-test-db"],
    { encoding: "utf8" },
  );
  if (install.status !== 0) throw new Error(`mariadb-install-db failed: ${install.stderr || install.stdout}`);

  const mariadbd = findBin(["mariadbd", "mysqld"]);
  let child: ChildProcess | null = null;

  async function start(): Promise<void> {
    if (child && child.exitCode === null) return;
    if (fs.existsSync(sock)) fs.rmSync(sock, { force: true });
    child = spawn(mariadbd, [`--defaults-file=${cnf}`], { stdio: "ignore" });
    await waitFor(
      "the private MariaDB to accept connections",
      async () => {
        const c = await mysql.createConnection({ socketPath: sock, user: "root" });
        await c.end();
        return true;
      },
      30_000,
      100,
    );
  }

  async function stop(): Promise<void> {
    const c = child;
    if (!c || c.exitCode !== null || c.signalCode !== null) return;
    const gone = new Promise<void>((r) => c.once("exit", () => r()));
    c.kill("SIGTERM");
    const t = setTimeout(() => c.kill("SIGKILL"), 30_000);
    await gone;
    clearTimeout(t);
  }

  await start();
  const root = await mysql.createConnection({ socketPath: sock, user: "root" });
  for (const host of ["127.0.0.1", "localhost"]) {
    await root.query(`CREATE USER IF NOT EXISTS '${USER}'@'${host}' IDENTIFIED BY '${PASSWORD}'`);
    await root.query(`GRANT ALL PRIVILEGES ON \`stillfield%\`.* TO '${USER}'@'${host}'`);
  }
  await root.end();

  return {
    port,
    env: (dbName) => ({ DB_HOST: "127.0.0.1", DB_PORT: String(port), DB_USER: USER, DB_PASSWORD: PASSWORD, DB_NAME: dbName }),
    running: () => child !== null && child.exitCode === null && child.signalCode === null,
    pid: () => child?.pid,
    stop,
    start,
    async destroy() {
      await stop();
      fs.rmSync(base, { recursive: true, force: true });
    },
  };
}

/**
 * createTestDatabase (tests/helpers/test-db.ts) on the private server: it reads DB_HOST/DB_PORT
 * and the account from the environment at call time, so point them there for the call.
 */
export async function withDbPort<T>(port: number, fn: () => Promise<T>): Promise<T> {
  // the private server has its own account, not the shared server's per-install one
  const point = { DB_PORT: String(port), DB_USER: USER, DB_PASSWORD: PASSWORD };
  const saved = Object.fromEntries(Object.keys(point).map((k) => [k, process.env[k]]));
  Object.assign(process.env, point);
  try {
    return await fn();
  } finally {
    for (const [k, v] of Object.entries(saved)) {
      if (v === undefined) delete process.env[k];
      else process.env[k] = v;
    }
  }
}
