// The Health page's read model against the real MariaDB: the figures each worker and broker
// wrote to ingest_status (from the real WorkerCounters), the alert owner's lease, the mail queue,
// and the verdict that GET /api/health answers with.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql } from "drizzle-orm";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { outbox } from "@/db/schema";
import { upsertIngestStatus } from "@/db/queries/ingest-diagnostics";
import { getHealthReport, HEALTH_STALE_MS } from "@/db/queries/health";
import { WorkerCounters } from "@/ingest/stats";
import { healthVerdict } from "@/lib/health-verdict";

let tdb: TestDatabase;
const replica = { configured: false, usable: false, lagS: null, reason: "no replica is configured", checkedTs: null };

beforeAll(async () => {
  tdb = await createTestDatabase("health_report");
});
afterAll(async () => {
  await tdb?.close();
});

describe("health report", () => {
  it("shows each worker's rates, in-flight and spilled figures and each broker's clients", async () => {
    const now = Date.now();
    const w = new WorkerCounters("worker-a");
    for (let i = 0; i < 30; i++) w.countMessage("fm-1", 2, now);
    w.countFlush(60, 60, 0, 12, now);
    w.mqttConnected = true;
    await upsertIngestStatus(tdb.db, "worker-a", now, w.snapshot({ bufferedReadings: 7, unackedMessages: 3 }));
    await upsertIngestStatus(tdb.db, "worker-b", now - HEALTH_STALE_MS - 1000, new WorkerCounters("worker-b").snapshot({ bufferedReadings: 0, unackedMessages: 0 }));
    await upsertIngestStatus(tdb.db, "broker@test", now, { kind: "broker", brokerId: "broker@test", startedTs: now - 5000, nowTs: now, clients: 27, refused: { auth: 0, publish: 0, subscribe: 0, oversized: 0 }, messagesIn: 900, rates: { messagesPerS: 30 } });
    const r = await getHealthReport(tdb.db, replica, now);
    const a = r.workers.find((x) => x.id === "worker-a")!;
    // 60 readings committed and 30 messages within a worker's first second: rates over ≥ 1 s
    expect(a.readingsPerS).toBeGreaterThan(0);
    expect(a.readingsPerS).toBeLessThanOrEqual(60);
    expect(a.messagesPerS).toBeLessThanOrEqual(30);
    expect(a).toMatchObject({ stale: false, inFlightReadings: 7, unackedMessages: 3, spillPendingReadings: 0, startedTs: w.startedTs });
    expect(r.workers.find((x) => x.id === "worker-b")!.stale).toBe(true);
    expect(r.brokers).toEqual([expect.objectContaining({ id: "broker@test", clients: 27, messagesPerS: 30, stale: false, startedTs: now - 5000 })]);
    expect(healthVerdict(r).problems).toEqual([expect.stringMatching(/worker-b has not reported/)]);
  });

  it("shows the alert owner and since when, and says when nobody holds the lease", async () => {
    // no lease yet: the rules run in the one worker that reports running them on its own readings
    // (worker-a, the settings' default); a worker with alerting off is not named
    await upsertIngestStatus(tdb.db, "worker-off", Date.now(), new WorkerCounters("worker-off", "off").snapshot({ bufferedReadings: 0, unackedMessages: 0 }));
    const none = await getHealthReport(tdb.db, replica);
    expect(none.alertOwner).toBeNull();
    expect(none.workers.find((x) => x.id === "worker-off")!.alerts).toBe("off");
    expect(none.alertsInWorker).toEqual({ id: "worker-a", startedTs: none.workers.find((x) => x.id === "worker-a")!.startedTs });
    await tdb.db.execute(sql`DELETE FROM ingest_status WHERE worker_id = 'worker-a'`);
    expect((await getHealthReport(tdb.db, replica)).alertsInWorker).toBeNull();
    const since = Date.now() - 60_000;
    await tdb.db.execute(sql`INSERT INTO service_leases (name, holder, token, expires_ts, acquired_ts) VALUES ('alert-owner', 'worker-a', 3, CAST(UNIX_TIMESTAMP(NOW(3)) * 1000 AS SIGNED) + 10000, ${since})`);
    const held = await getHealthReport(tdb.db, replica);
    expect(held.alertOwner).toMatchObject({ holder: "worker-a", sinceTs: since, held: true, token: 3 });
    expect(held.alertsInWorker).toBeNull();
    await tdb.db.execute(sql`UPDATE service_leases SET expires_ts = CAST(UNIX_TIMESTAMP(NOW(3)) * 1000 AS SIGNED) - 1 WHERE name = 'alert-owner'`);
    const lapsed = await getHealthReport(tdb.db, replica);
    expect(lapsed.alertOwner!.held).toBe(false);
    expect(healthVerdict(lapsed).problems).toContain("No process holds the alert owner's lease.");
  });

  it("counts the mail queue by state, with the oldest waiting mail", async () => {
    const now = Date.now();
    const mail = (key: string, state: "pending" | "sending" | "sent" | "failed", createdTs: number) => ({ dedupeKey: key, toAddress: "lead@harrowfen.example", subject: "s", bodyText: "b", state, nextAttemptTs: now, createdTs });
    await tdb.db.insert(outbox).values([mail("a", "pending", now - 5000), mail("b", "pending", now - 9000), mail("c", "sent", now - 99_000), mail("d", "failed", now - 1000), mail("e", "sending", now)]);
    const r = await getHealthReport(tdb.db, replica, now);
    expect(r.mail).toEqual({ pending: 2, sending: 1, failed: 1, oldestPendingTs: now - 9000 });
    expect(healthVerdict(r).problems).toContain("1 e-mail(s) failed for good.");
  });
});
