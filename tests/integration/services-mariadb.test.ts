// scripts/mariadb.sh's hardening, on a server of its own (own data folder and port, so the shared
// one is not touched): root signs in by the socket only, no SQL writes files outside
// secure_file_priv, the app's account has a random per-install password kept with mode 600, and
// the server runs as the `stillfield` system user when started by root.
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import mysql from "mysql2/promise";
import { freePort, ROOT } from "./ingest-support/processes";

let dataDir: string;
let port: number;
const run = (cmd: string) =>
  execFileSync("bash", ["scripts/mariadb.sh", cmd], {
    cwd: ROOT,
    env: { ...process.env, DATA_DIR: dataDir, DB_PORT: String(port), DB_BUFFER_POOL: "64M", DB_PASSWORD: "", DB_USER: "stillfield_app" },
    encoding: "utf8",
  });
const secret = (name: string) => fs.readFileSync(path.join(dataDir, "secrets", name), "utf8").trim();

beforeAll(async () => {
  dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "sf-mariadb-"));
  fs.chmodSync(dataDir, 0o711);
  port = await freePort();
  run("start");
}, 90_000);

afterAll(() => {
  if (dataDir) {
    run("stop");
    fs.rmSync(dataDir, { recursive: true, force: true });
  }
});

describe("a hardened private MariaDB", () => {
  it("refuses root over TCP, with or without root's password", async () => {
    await expect(mysql.createConnection({ host: "127.0.0.1", port, user: "root" })).rejects.toThrow(/Access denied/);
    await expect(mysql.createConnection({ host: "127.0.0.1", port, user: "root", password: secret("db-root-password") })).rejects.toThrow(/Access denied/);
  });

  it("lets root in by the socket, where secure_file_priv stops SELECT … INTO DUMPFILE outside its folder", async () => {
    const c = await mysql.createConnection({ socketPath: path.join(dataDir, "run", "mariadb.sock"), user: "root", password: secret("db-root-password") });
    const target = path.join(os.tmpdir(), `sf-dump-${process.pid}.txt`);
    await expect(c.query(`SELECT 'x' INTO DUMPFILE '${target}'`)).rejects.toThrow(/secure-file-priv/);
    expect(fs.existsSync(target)).toBe(false);
    const [rows] = await c.query("SELECT @@secure_file_priv AS dir");
    expect(String((rows as { dir: string }[])[0].dir)).toContain(path.join(dataDir, "mariadb-files"));
    await c.end();
  });

  it("gives the app's account a random password kept with mode 600, and no FILE right", async () => {
    const password = secret("db-password");
    expect(password.length).toBeGreaterThanOrEqual(32);
    expect(password).not.toBe("stillfield-local");
    for (const f of ["db-password", "db-root-password", "db-root.cnf"]) expect(fs.statSync(path.join(dataDir, "secrets", f)).mode & 0o777).toBe(0o600);
    await expect(mysql.createConnection({ host: "127.0.0.1", port, user: "stillfield_app", password: "stillfield-local" })).rejects.toThrow(/Access denied/);
    const c = await mysql.createConnection({ host: "127.0.0.1", port, user: "stillfield_app", password });
    await expect(c.query(`SELECT 'x' INTO DUMPFILE '${path.join(dataDir, "mariadb-files", "x.txt")}'`)).rejects.toThrow(/FILE privilege/);
    await c.end();
  });

  it("runs the server as the stillfield system user when started by root", () => {
    if (process.getuid?.() !== 0) return expect(fs.readFileSync(path.join(dataDir, "run", "mariadb.cnf"), "utf8")).toMatch(/^user=/m);
    const pid = fs.readFileSync(path.join(dataDir, "run", "mariadb.pid"), "utf8").trim();
    const uid = fs.readFileSync(`/proc/${pid}/status`, "utf8").match(/^Uid:\s+(\d+)/m)?.[1];
    expect(execFileSync("id", ["-un", String(uid)], { encoding: "utf8" }).trim()).toBe("stillfield");
  });
});
