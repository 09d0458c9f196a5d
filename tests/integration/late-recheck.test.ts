// The late re-check (ingest/late-recheck.ts) on the real broker, worker with its alerts runner,
// and MariaDB: a Sparkplug edge node (simulators/sparkplug-edge-node.ts) that was cut off
// uploads 50 minutes of buffered readings as historical metrics. They hold two excursions above
// the seeded plant-wide charge limit (lib/rules/defaults.ts: medium above 12 kV, clear below
// 10 kV, on-delay 10 s, off-delay 30 s). The one that ended about 40 minutes ago is kept in the
// alert history marked found late and pages nobody; the one that ended about 3 minutes ago is
// marked found late and pages on call (LATE_FINDING_QUIET_AFTER_MS, default 15 minutes). The
// live engine's state for the point (its watermark and the charge evaluators) is unchanged.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { readDeviceSecrets } from "../../db/seed";
import { createEdgeNode, saveMapping } from "../../db/queries/gateways";
import { listAlerts } from "../../db/queries/alert-list";
import { hashDeviceSecret } from "../../lib/device-secrets";
import { EdgeNode } from "../../simulators/sparkplug-edge-node";
import { connectDevice, endClient, publishAsync, startIngestStack, waitFor, type IngestStack } from "./ingest-support/processes";

const MIN = 60_000;
const FM = "fm-laminator-1-primary-unwind";
const NODE = { code: "spb-late", nodeId: "late-gw", secret: "late-node-secret-0123456789" };

let tdb: TestDatabase;
let stack: IngestStack;

async function q<T>(sql: string, params: unknown[] = []): Promise<T[]> {
  const [rows] = await tdb.pool.query(sql, params);
  return rows as T[];
}

type Snapshot = { sensors: Array<{ sensorKey: string; channelLastTs: Record<string, number> }>; evaluators: Array<{ ruleId: number; subjectKey: string; kind: string }> };
async function engineSnapshot(): Promise<Snapshot | null> {
  const [row] = await q<{ value: Snapshot | string }>("SELECT value FROM settings WHERE `key` = 'alerts.engine_state'");
  if (!row) return null;
  return typeof row.value === "string" ? (JSON.parse(row.value) as Snapshot) : row.value;
}

beforeAll(async () => {
  tdb = await createTestDatabase("late_recheck", { seed: true });
  await createEdgeNode(tdb.db, { code: NODE.code, groupId: "harrow-fen", nodeId: NODE.nodeId, label: "Late test gateway", secretHash: hashDeviceSecret(NODE.secret) }, null);
  stack = await startIngestStack("late_recheck", tdb.env, {
    env: { INGEST_DEVICE_REFRESH_MS: "300", BROKER_DEVICE_CHECK_MS: "300", ALERTS_SNAPSHOT_EVERY_MS: "200", ALERTS_RULES_POLL_MS: "500", LATE_RECHECK_SETTLE_MS: "800" },
  });
}, 120_000);

afterAll(async () => {
  await stack?.stop();
  await tdb?.close();
});

describe("late re-check of a historical upload", () => {
  it("stores a long-ended excursion as found late without paging, pages for a recent one, and leaves the live engine alone", async () => {
    const now = Date.now();
    const [{ id: fmId, point_id: pointId }] = await q<{ id: number; point_id: number }>("SELECT id, point_id FROM devices WHERE code = ?", [FM]);
    const subjectKey = `point:${pointId}`;
    const [medium] = await q<{ id: number }>("SELECT id FROM rules WHERE kind = 'charge_high' AND point_id IS NULL AND line_id IS NULL AND area_id IS NULL ORDER BY id LIMIT 1");

    // live readings (JSON) from 60 to 50 minutes ago: the live engine's watermark for the meter
    const secrets = readDeviceSecrets(tdb.name);
    const dev = await connectDevice(stack, FM, secrets[FM]);
    const liveStart = Math.floor((now - 60 * MIN) / 1000) * 1000;
    const live = Array.from({ length: 30 }, (_, i) => ({ ts: liveStart + i * 20_000, values: { charge_kv: -3 } }));
    const lastLiveTs = live[live.length - 1].ts;
    await publishAsync(dev, `stillfield/d/${FM}/readings`, JSON.stringify({ batch: live }));
    await endClient(dev);
    const before = await waitFor("the live engine's watermark saved", async () => {
      const s = await engineSnapshot();
      return s?.sensors.find((x) => x.sensorKey === FM)?.channelLastTs.charge_kv === lastLiveTs ? s : null;
    });
    const pointEvaluatorsBefore = before.evaluators.filter((e) => e.subjectKey === subjectKey);
    expect(pointEvaluatorsBefore.length).toBeGreaterThan(0);

    // the gateway, cut off from 50 minutes ago until now, buffered its unwind meter every 10 s
    const node = new EdgeNode({ port: stack.mqttPort, code: NODE.code, secret: NODE.secret, groupId: "harrow-fen", nodeId: NODE.nodeId, devices: [{ name: "unwind", metrics: [{ name: "Charge", datatype: "Float", unit: "V" }] }] });
    await node.connect();
    const [metric] = await waitFor("the birth's metric", async () => {
      const r = await q<{ id: number }>("SELECT id FROM gateway_metrics WHERE device_name = 'unwind' AND name = 'Charge'");
      return r.length ? r : null;
    });
    await saveMapping(tdb.db, { metricId: metric.id, targetDeviceId: fmId, channel: "charge_kv", conversion: "v_to_kv" }, null);
    await new Promise((r) => setTimeout(r, 1500)); // the host reloads mappings

    const upStart = lastLiveTs + 10_000;
    const aFrom = now - 45 * MIN; // excursion A: 45 → 40 minutes ago
    const aTo = now - 40 * MIN;
    const bFrom = now - 8 * MIN; // excursion B: 8 → 4 minutes ago
    const bTo = now - 4 * MIN;
    node.offline = true;
    for (let ts = upStart; ts < now - MIN; ts += 10_000) {
      const kv = (ts >= aFrom && ts < aTo) || (ts >= bFrom && ts < bTo) ? -15 : -3;
      await node.data("unwind", { Charge: kv * 1000 }, ts);
    }
    node.offline = false;
    const uploaded = await node.uploadBuffer(50);
    expect(uploaded).toBeGreaterThan(250);

    const findings = await waitFor(
      "two found-late alerts",
      async () => {
        const r = await q<{ id: number; rule_id: number; subject_key: string; state: string; start_ts: number; end_ts: number; peak_value: number; quiet: number; ended_ts: number }>(
          "SELECT a.id, a.rule_id, a.subject_key, a.state, a.start_ts, a.end_ts, a.peak_value, f.quiet, f.ended_ts FROM alerts a JOIN late_findings f ON f.alert_id = a.id WHERE a.subject_key = ? AND a.rule_id = ? ORDER BY a.start_ts",
          [subjectKey, medium.id],
        );
        return r.length >= 2 ? r : null;
      },
      60_000,
    );
    expect(findings).toHaveLength(2);
    await new Promise((r) => setTimeout(r, 1500)); // the re-check stores its findings one by one
    // other rules on the point may find their own excursions in the same span (a steep rise: charge_rate)
    const others = await q<{ kind: string }>("SELECT a.kind FROM alerts a JOIN late_findings f ON f.alert_id = a.id WHERE a.rule_id <> ?", [medium.id]);
    console.info("other found-late alerts:", others.map((o) => o.kind).join(", ") || "none");
    expect(others.every((o) => o.kind !== "charge_high")).toBe(true);
    const [a, b] = findings;
    for (const f of findings) {
      expect(f.rule_id).toBe(medium.id);
      expect(f.state).toBe("cleared_unacked");
      expect(f.peak_value).toBeCloseTo(-15, 4); // signed, as sent (−15 000 V)
    }
    // raised at the first reading above 12 kV that has stayed so for the 10 s on-delay; readings
    // every 10 s from upStart, so within one step of the excursion's start plus the on-delay
    expect(Number(a.start_ts)).toBeGreaterThanOrEqual(aFrom + 10_000);
    expect(Number(a.start_ts)).toBeLessThanOrEqual(aFrom + 20_000 + 10_000);
    // cleared after 30 s below 10 kV (off-delay)
    expect(Number(a.end_ts)).toBeGreaterThanOrEqual(aTo + 30_000);
    expect(Number(a.end_ts)).toBeLessThanOrEqual(aTo + 50_000);
    expect(a.quiet).toBe(1);
    expect(b.quiet).toBe(0);
    expect(Number(b.end_ts)).toBeGreaterThanOrEqual(bTo + 30_000);

    // the long-ended one queued no mail; the recent one paged on call (order 1 of the seeded roster this week)
    expect(await q("SELECT id FROM outbox WHERE dedupe_key LIKE ?", [`alert:${a.id}:%`])).toEqual([]);
    const mails = await q<{ to_address: string; subject: string }>("SELECT to_address, subject FROM outbox WHERE dedupe_key LIKE ?", [`alert:${b.id}:%`]);
    expect(mails).toHaveLength(1);
    const [first] = await q<{ email: string }>("SELECT p.email FROM oncall_shifts s JOIN people p ON p.id = s.person_id WHERE s.start_ts <= ? AND s.end_ts > ? AND s.escalation_order = 1", [now, now]);
    expect(mails[0].to_address).toBe(first.email);
    expect(mails[0].subject.startsWith("[Found late]")).toBe(true);

    // the alert history's read model carries the mark
    const listed = await listAlerts(tdb.db, { ids: [a.id, b.id] });
    expect(listed.find((x) => x.id === a.id)).toMatchObject({ foundLateQuiet: true, foundLateTs: expect.any(Number) });
    expect(listed.find((x) => x.id === b.id)).toMatchObject({ foundLateQuiet: false, foundLateTs: expect.any(Number) });

    // no live alert for the point: the historical readings never reached the live engine
    expect(await q("SELECT a.id FROM alerts a LEFT JOIN late_findings f ON f.alert_id = a.id WHERE a.subject_key = ? AND f.alert_id IS NULL", [subjectKey])).toEqual([]);
    // and its state for the point is as it was: same watermark, same charge evaluators
    await new Promise((r) => setTimeout(r, 800));
    const after = await engineSnapshot();
    expect(after?.sensors.find((x) => x.sensorKey === FM)?.channelLastTs.charge_kv).toBe(lastLiveTs);
    expect(after?.evaluators.filter((e) => e.subjectKey === subjectKey)).toEqual(pointEvaluatorsBefore);

    // part of the same upload sent again: nothing new is stored, so nothing new is found
    node.offline = true;
    for (let ts = upStart; ts < now - MIN; ts += 10_000) if (ts >= bFrom - MIN && ts < bTo + MIN) await node.data("unwind", { Charge: (ts >= bFrom && ts < bTo ? -15 : -3) * 1000 }, ts);
    node.offline = false;
    await node.uploadBuffer(50);
    await new Promise((r) => setTimeout(r, 3000));
    expect((await q("SELECT alert_id FROM late_findings")).length).toBe(2 + others.length);
    await node.stop();
  }, 120_000);
});
