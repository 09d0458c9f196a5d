// The device payload contract (lib/contract/README.md): what is accepted, and the reason given for each
// kind of bad input. Ranges are the contract's own limits (see CHANNEL_RANGES for their basis).
import { describe, expect, it } from "vitest";
import {
  checkReadingSets,
  CHANNEL_RANGES,
  devicePayloadSchema,
  MAX_BATCH_LENGTH,
  parseDevicePayload,
  type CheckContext,
  type ReadingSet,
} from "@/lib/contract/readings-payload";

const NOW = Date.UTC(2026, 0, 15, 12, 0, 0);
const DAY = 86_400_000;
const ctx = (kind: CheckContext["deviceKind"]): CheckContext => ({ deviceKind: kind, nowMs: NOW, oldestAcceptedMs: NOW - 14 * DAY });

function sets(body: string): ReadingSet[] {
  const p = parseDevicePayload(body);
  if (!p.ok) throw new Error(`expected ok, got ${p.rejection.reason}`);
  return p.sets;
}

function reasonOf(body: string): string {
  const p = parseDevicePayload(body);
  return p.ok ? "ok" : p.rejection.reason;
}

describe("parseDevicePayload", () => {
  it("accepts one reading set with an epoch-ms timestamp", () => {
    const s = sets(JSON.stringify({ ts: NOW, values: { charge_kv: -3.5 } }));
    expect(s).toHaveLength(1);
    expect(s[0].values.charge_kv).toBe(-3.5);
  });

  it("accepts ISO 8601 timestamps with Z or an offset and converts them to the same instant", () => {
    const a = sets(JSON.stringify({ ts: "2026-01-15T12:00:00.000Z", values: { temp_c: 21 } }));
    const b = sets(JSON.stringify({ ts: "2026-01-15T13:00:00+01:00", values: { temp_c: 21 } }));
    const ra = checkReadingSets(a, ctx("th_logger")).readings;
    const rb = checkReadingSets(b, ctx("th_logger")).readings;
    expect(ra[0].ts).toBe(NOW);
    expect(rb[0].ts).toBe(NOW);
  });

  it("accepts a batch", () => {
    const batch = Array.from({ length: 10 }, (_, i) => ({ ts: NOW - i * 1000, values: { speed_mpm: 200 + i, running: 1 } }));
    expect(sets(JSON.stringify({ batch }))).toHaveLength(10);
  });

  it("names each kind of malformed input", () => {
    expect(reasonOf("{not json")).toBe("malformed_json");
    expect(reasonOf("")).toBe("malformed_json");
    expect(reasonOf(`{"ts":${NOW},"values":{"charge_kv":NaN}}`)).toBe("non_finite");
    expect(reasonOf(`{"ts":${NOW},"values":{"charge_kv":1e999}}`)).toBe("non_finite");
    expect(reasonOf(`{"ts":${NOW},"values":{"charge_kv":"high"}}`)).toBe("invalid_shape");
    expect(reasonOf(`[1,2,3]`)).toBe("invalid_shape");
    expect(reasonOf(`{"values":{"charge_kv":1}}`)).toBe("bad_timestamp");
    expect(reasonOf(`{"ts":"yesterday","values":{"charge_kv":1}}`)).toBe("bad_timestamp");
    expect(reasonOf(`{"ts":"2026-01-15T12:00:00","values":{"charge_kv":1}}`)).toBe("bad_timestamp");
    expect(reasonOf(`{"ts":${NOW}.5,"values":{"charge_kv":1}}`)).toBe("bad_timestamp");
    expect(reasonOf(`{"ts":${NOW},"values":{"voltage":1}}`)).toBe("unknown_channel");
    expect(reasonOf(`{"ts":${NOW},"values":{"charge_kv":1},"extra":true}`)).toBe("invalid_shape");
    const long = Array.from({ length: MAX_BATCH_LENGTH + 1 }, (_, i) => ({ ts: NOW - i, values: { charge_kv: 1 } }));
    expect(reasonOf(JSON.stringify({ batch: long }))).toBe("batch_too_long");
    expect(reasonOf(JSON.stringify({ batch: [] }))).toBe("invalid_shape");
  });

  it("accepts and refuses exactly what the zod schemas do, with or without the hand-checked fast path", () => {
    // the reference is zod's own parse of the published schemas (devicePayloadSchema)
    const bodies = [
      `{"ts":${NOW},"values":{"charge_kv":-3.5}}`,
      `{"values":{"charge_kv":-3.5},"ts":${NOW}}`,
      `{"ts":0,"values":{"running":1,"speed_mpm":12.5}}`,
      `{"ts":${NOW},"values":{}}`,
      `{"ts":-1,"values":{"charge_kv":1}}`,
      `{"ts":9007199254740993,"values":{"charge_kv":1}}`,
      `{"ts":1e21,"values":{"charge_kv":1}}`,
      `{"ts":${NOW},"values":{"charge_kv":1e999}}`,
      `{"ts":${NOW},"values":{"charge_kv":-1e999}}`,
      `{"ts":${NOW},"values":{"charge_kv":null}}`,
      `{"ts":${NOW},"values":{"charge_kv":[1]}}`,
      `{"ts":${NOW},"values":{"charge_kv":true}}`,
      `{"ts":${NOW},"values":{"__proto__":{"charge_kv":1}}}`,
      `{"__proto__":{"x":1},"ts":${NOW},"values":{"charge_kv":1}}`,
      `{"ts":${NOW},"values":[1]}`,
      `{"ts":${NOW},"values":null}`,
      `{"ts":"${new Date(NOW).toISOString()}","values":{"rh_pct":40}}`,
      `{"ts":${NOW}}`,
      `{"ts":${NOW},"values":{"charge_kv":1},"values2":{}}`,
      `{"batch":[{"ts":${NOW},"values":{"charge_kv":1}},{"ts":${NOW + 1},"values":{"charge_kv":2}}]}`,
      `{"batch":[{"ts":${NOW},"values":{"charge_kv":1}},{"ts":"${new Date(NOW).toISOString()}","values":{"charge_kv":2}}]}`,
      `{"batch":[{"ts":${NOW},"values":{"charge_kv":1}},{"ts":${NOW},"values":{"volts":2}}]}`,
      `{"batch":[]}`,
      `{"batch":{}}`,
      `{"batch":[{"ts":${NOW},"values":{"charge_kv":1}}],"ts":${NOW}}`,
      `{"batch":[${Array.from({ length: MAX_BATCH_LENGTH }, (_, i) => `{"ts":${NOW + i},"values":{"charge_kv":1}}`).join(",")}]}`,
      `{"batch":[${Array.from({ length: MAX_BATCH_LENGTH + 1 }, (_, i) => `{"ts":${NOW + i},"values":{"charge_kv":1}}`).join(",")}]}`,
      `[{"ts":${NOW},"values":{"charge_kv":1}}]`,
      `null`,
      `42`,
    ];
    let accepted = 0;
    for (const body of bodies) {
      const ours = parseDevicePayload(body);
      const ref = devicePayloadSchema.safeParse(JSON.parse(body));
      expect(ours.ok, body.slice(0, 120)).toBe(ref.success);
      if (ours.ok && ref.success) {
        accepted++;
        const refSets = "batch" in ref.data ? ref.data.batch : [ref.data];
        expect(ours.sets).toEqual(refSets);
      }
    }
    expect(accepted).toBe(8);
  });

  it("reads bytes as well as text", () => {
    const p = parseDevicePayload(new TextEncoder().encode(JSON.stringify({ ts: NOW, values: { rh_pct: 40 } })));
    expect(p.ok).toBe(true);
  });
});

describe("checkReadingSets", () => {
  it("keeps good values and rejects the rest by reason, value by value", () => {
    const r = checkReadingSets(sets(JSON.stringify({ ts: NOW, values: { temp_c: 21.5, rh_pct: 120 } })), ctx("th_logger"));
    expect(r.readings).toEqual([{ channel: "temp_c", ts: NOW, value: 21.5 }]);
    expect(r.rejections).toEqual([expect.objectContaining({ reason: "out_of_range", count: 1 })]);
  });

  it("enforces each channel's physical range at its edges", () => {
    const cases: Array<[CheckContext["deviceKind"], string, number, boolean]> = [
      ["field_meter", "charge_kv", 200, true],
      ["field_meter", "charge_kv", -200, true],
      ["field_meter", "charge_kv", 200.01, false],
      ["field_meter", "charge_kv", -250, false],
      ["th_logger", "rh_pct", 0, true],
      ["th_logger", "rh_pct", 100, true],
      ["th_logger", "rh_pct", -0.1, false],
      ["th_logger", "temp_c", -40, true],
      ["th_logger", "temp_c", 90.5, false],
      ["speed_gateway", "speed_mpm", 2000, true],
      ["speed_gateway", "speed_mpm", -1, false],
      ["speed_gateway", "running", 1, true],
      ["speed_gateway", "running", 0.5, false],
      ["speed_gateway", "running", 2, false],
    ];
    for (const [kind, channel, value, ok] of cases) {
      const r = checkReadingSets(sets(JSON.stringify({ ts: NOW, values: { [channel]: value } })), ctx(kind));
      expect({ channel, value, ok: r.readings.length === 1 }).toEqual({ channel, value, ok });
    }
    expect(CHANNEL_RANGES.charge_kv.max).toBe(200);
  });

  it("rejects channels that do not belong to the device's kind", () => {
    const r = checkReadingSets(sets(JSON.stringify({ ts: NOW, values: { rh_pct: 40 } })), ctx("field_meter"));
    expect(r.readings).toHaveLength(0);
    expect(r.rejections[0].reason).toBe("wrong_channel");
  });

  it("accepts up to five minutes ahead of the server clock, and back to the retention", () => {
    const at = (ts: number) => checkReadingSets(sets(JSON.stringify({ ts, values: { charge_kv: 1 } })), ctx("field_meter"));
    expect(at(NOW + 5 * 60_000).readings).toHaveLength(1);
    expect(at(NOW + 5 * 60_000 + 1).rejections[0].reason).toBe("ts_future");
    expect(at(NOW - 14 * DAY).readings).toHaveLength(1);
    expect(at(NOW - 14 * DAY - 1).rejections[0].reason).toBe("ts_too_old");
  });

  it("counts how many values one reason hit", () => {
    const batch = [1, 2, 3].map((i) => ({ ts: NOW + 3_600_000 + i, values: { charge_kv: 1 } }));
    const r = checkReadingSets(sets(JSON.stringify({ batch })), ctx("field_meter"));
    expect(r.rejections).toEqual([expect.objectContaining({ reason: "ts_future", count: 3 })]);
  });
});
