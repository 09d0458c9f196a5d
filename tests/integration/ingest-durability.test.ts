// Nothing accepted is lost:
//  - MariaDB is stopped while the plant simulator publishes and started again: every reading
//    the broker acknowledged before, during and after the outage ends up in the table (the
//    worker buffers, spills past its memory bound, retries and replays);
//  - the worker is killed (SIGKILL) and restarted: the QoS-1 messages published meanwhile (and
//    the ones it held unacknowledged) arrive, none lost.
// Runs on a private MariaDB server of its own so stopping it disturbs no other suite.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { ROOT, spawnTs, startIngestStack, waitFor, type IngestStack } from "./ingest-support/processes";
import { startPrivateMariadb, withDbPort, type PrivateMariadb } from "./ingest-support/private-mariadb";

let mdb: PrivateMariadb;
let tdb: TestDatabase;
let stack: IngestStack;
const DAY = 86_400_000;

beforeAll(async () => {
  mdb = await startPrivateMariadb("durability");
  tdb = await withDbPort(mdb.port, () => createTestDatabase("ingest_durable", { seed: true }));
  stack = await startIngestStack("durable", tdb.env, {
    env: {
      // a small memory bound so the outage also exercises spilling to files
      INGEST_MEMORY_MAX_READINGS: "1500",
      INGEST_MAX_UNACKED: "1000",
      INGEST_RETRY_MAX_MS: "500",
      DB_POOL_SIZE: "4",
    },
  });
});

afterAll(async () => {
  await stack?.stop();
  await tdb?.close().catch(() => undefined);
  await mdb?.destroy();
});

function startPlant(args: string[]) {
  // the simulator reads the seeded device secrets from the project's data folder
  return spawnTs("plant", "simulators/plant.ts", args, { ...stack.env, DATA_DIR: path.join(ROOT, ".data") });
}

function readAcked(file: string): Array<{ code: string; channel: string; ts: number }> {
  return fs
    .readFileSync(file, "utf8")
    .split("\n")
    .filter(Boolean)
    .map((l) => {
      const [code, channel, ts] = l.split(",");
      return { code, channel, ts: Number(ts) };
    });
}

/** How many of the acknowledged readings are missing from the table (retrying while the db wakes). */
async function missing(acked: Array<{ code: string; channel: string; ts: number }>): Promise<number> {
  const minTs = Math.min(...acked.map((a) => a.ts));
  const maxTs = Math.max(...acked.map((a) => a.ts));
  const [rows] = await tdb.pool.query(
    "SELECT d.code AS code, r.channel AS channel, r.ts AS ts FROM readings r JOIN devices d ON d.id = r.device_id WHERE r.ts BETWEEN ? AND ?",
    [minTs, maxTs],
  );
  const have = new Set((rows as Array<{ code: string; channel: string; ts: number }>).map((r) => `${r.code},${r.channel},${Number(r.ts)}`));
  return acked.filter((a) => !have.has(`${a.code},${a.channel},${a.ts}`)).length;
}

async function rollupsMatchRaw(fromTs: number): Promise<void> {
  const [[raw], [roll]] = await Promise.all([
    tdb.pool.query("SELECT COUNT(*) AS n FROM readings WHERE ts >= ?", [Math.floor(fromTs / 3_600_000) * 3_600_000]),
    tdb.pool.query("SELECT SUM(count) AS n FROM rollup_1h WHERE bucket_ts >= ?", [Math.floor(fromTs / 3_600_000) * 3_600_000]),
  ]);
  expect(Number((roll as Array<{ n: string }>)[0].n)).toBe(Number((raw as Array<{ n: number }>)[0].n));
}

describe("database outage", () => {
  it("keeps every acknowledged reading while MariaDB is stopped and started again", async () => {
    const ackedFile = path.join(stack.dataDir, "acked-outage.csv");
    // 20 simulated minutes at 40× (about 700 readings/s), scenario events far away
    const plant = startPlant([
      "--backfill-days", "0", "--from=-20m", "--speed", "40", "--duration-s", "24",
      "--malformed-every-s", "0", "--anchor", String(Date.now() - 30 * DAY), "--log-acked", ackedFile,
    ]);
    await waitFor("readings before the outage", async () => (await stack.workerStats()).committed.readings > 500, 30_000);
    await mdb.stop();
    const duringOutage = Date.now();
    await waitFor("the worker to notice", async () => !(await stack.workerStats()).dbHealthy, 15_000);
    await new Promise((r) => setTimeout(r, Math.max(0, 8000 - (Date.now() - duringOutage))));
    const mid = await stack.workerStats();
    expect(mid.spilled.readings).toBeGreaterThan(0);
    expect(mid.buffered.readings).toBeLessThanOrEqual(1500 + 1000);
    await mdb.start();
    expect(await plant.exit(60_000), plant.output()).toBe(0);

    const acked = readAcked(ackedFile);
    expect(acked.length).toBeGreaterThan(8000);
    await waitFor("every acknowledged reading in the table", async () => (await missing(acked)) === 0, 60_000, 500);
    const after = await stack.workerStats();
    expect(after.dbHealthy).toBe(true);
    expect(after.batch.failures).toBeGreaterThan(0);
    expect(after.spilled.replayedReadings).toBeGreaterThan(0);
    await waitFor("spill files replayed", async () => fs.readdirSync(path.join(stack.dataDir, "spill", stack.env.DB_NAME, stack.env.INGEST_CLIENT_ID)).length === 0);
    await rollupsMatchRaw(Math.min(...acked.map((a) => a.ts)));
  });
});

describe("worker crash", () => {
  it("loses no QoS-1 message when the worker is killed and restarted", async () => {
    const ackedFile = path.join(stack.dataDir, "acked-crash.csv");
    const plant = startPlant([
      "--backfill-days", "0", "--from=-9m", "--speed", "25", "--duration-s", "18",
      "--malformed-every-s", "0", "--anchor", String(Date.now() - 30 * DAY), "--log-acked", ackedFile,
    ]);
    const before = (await stack.workerStats()).committed.readings;
    await waitFor("readings flowing", async () => (await stack.workerStats()).committed.readings > before + 300, 30_000);
    await stack.worker!.stop("SIGKILL");
    await new Promise((r) => setTimeout(r, 5000)); // the simulator keeps publishing meanwhile
    await stack.startWorker();
    expect(await plant.exit(60_000), plant.output()).toBe(0);

    const acked = readAcked(ackedFile);
    expect(acked.length).toBeGreaterThan(3000);
    await waitFor("every acknowledged reading in the table", async () => (await missing(acked)) === 0, 60_000, 500);
    await rollupsMatchRaw(Math.min(...acked.map((a) => a.ts)));
  });
});
