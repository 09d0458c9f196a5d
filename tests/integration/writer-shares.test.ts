// A Sparkplug message whose metrics feed several devices reaches the writer as one share per
// device (ingest/writer.ts shareAck): it is acknowledged once, after the last of its parts is
// committed in the real MariaDB, and counts as one unacknowledged message meanwhile (the bound
// INGEST_MAX_UNACKED is about MQTT message ids, one per message).
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { ReadingWriter, type WriterAck } from "../../ingest/writer";
import { SpillStore } from "../../ingest/spill";
import { WorkerCounters } from "../../ingest/stats";
import { createLogger } from "../../ingest/log";
import type { ReadingRow } from "../../db/queries/readings-write";

let tdb: TestDatabase;
let spillDir: string;
const T0 = Math.floor((Date.now() - 2 * 3_600_000) / 60_000) * 60_000;

beforeAll(async () => {
  tdb = await createTestDatabase("writer_shares");
  spillDir = fs.mkdtempSync(path.join(os.tmpdir(), "writer-shares-"));
});
afterAll(async () => {
  await tdb?.close();
  fs.rmSync(spillDir, { recursive: true, force: true });
});

describe("ReadingWriter shares", () => {
  it("counts a message split over ten devices once and acknowledges it once, after every part is committed", async () => {
    const released: WriterAck[] = [];
    const writer = new ReadingWriter(
      tdb.pool,
      new SpillStore(spillDir),
      { flushMs: 20, flushRows: 5000, lanes: 2, memoryMaxReadings: 100_000, maxUnacked: 20_000, retryMaxMs: 200 },
      {
        ack: (tokens) => {
          for (const t of tokens) {
            if (t && "release" in t) t.release();
            released.push(t);
          }
        },
        committed: () => undefined,
        log: createLogger("writer-shares-test"),
        counters: new WorkerCounters("writer-shares-test"),
      },
    );
    const devices = Array.from({ length: 10 }, (_, i) => 950 + i);
    const done: number[] = [];
    // three messages, each with one reading for each of the ten devices
    for (let m = 0; m < 3; m++) {
      const shares = writer.shareAck(devices.length, () => done.push(m));
      devices.forEach((deviceId, i) => {
        const rows: ReadingRow[] = [{ deviceId, channel: "charge_kv", ts: T0 + m * 1000, value: -(m + i) / 10 }];
        writer.add(deviceId, rows, shares[i]);
      });
    }
    // 30 shares in the lanes, but 3 messages waiting for their acknowledgement
    expect(writer.unackedMessages).toBe(3);
    expect(done).toEqual([]);

    const deadline = Date.now() + 10_000;
    while (done.length < 3 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 20));
    expect(done).toEqual([0, 1, 2]);
    expect(released).toHaveLength(30);
    expect(writer.unackedMessages).toBe(0);
    const [rows] = await tdb.pool.query("SELECT COUNT(*) AS n FROM readings WHERE device_id IN (?)", [devices]);
    expect(Number((rows as Array<{ n: number }>)[0].n)).toBe(30);
    await writer.drain(1000);
  });
});
