// The plant simulator's model: deterministic, inside the device contract, and showing the
// scenario's events (simulators/plant-model.ts).
import { describe, expect, it } from "vitest";
import { DEMO_LINES } from "@/lib/demo-plant";
import { checkReadingSets } from "@/lib/contract/readings-payload";
import {
  coldSnapDepth,
  humidityFactor,
  MAX_KV,
  neutralizerEffect,
  PlantModel,
  SAMPLE_PERIOD_MS,
} from "@/simulators/plant-model";

const H = 3_600_000;
const ANCHOR = Date.UTC(2026, 0, 20, 12, 0, 0);
const sc = { anchorMs: ANCHOR, seed: 7 };

describe("plant model", () => {
  it("gives the same value for the same seed and instant, whatever was asked before", () => {
    const a = new PlantModel(sc);
    const b = new PlantModel(sc);
    const d = a.devices.find((x) => x.code === "fm-gravure-1-unwind")!;
    const t = ANCHOR - 5 * H;
    for (let i = 0; i < 50; i++) a.valuesAt(d, ANCHOR - 40 * H + i * 1000);
    expect(a.valuesAt(d, t)).toEqual(b.valuesAt(b.devices.find((x) => x.code === d.code)!, t));
    const other = new PlantModel({ ...sc, seed: 8 });
    expect(other.valuesAt(other.devices.find((x) => x.code === d.code)!, t)).not.toEqual(a.valuesAt(d, t));
  });

  it("charges tenfold less at 60 % RH than at 20 % RH (common practice)", () => {
    expect(humidityFactor(20) / humidityFactor(60)).toBeCloseTo(10, 6);
    expect(humidityFactor(40)).toBeLessThan(humidityFactor(30));
  });

  it("dries the halls during the cold snap", () => {
    const m = new PlantModel(sc);
    const logger = m.devices.find((x) => x.code === "th-press-hall")!;
    const before = m.valuesAt(logger, ANCHOR - 48 * H)!.rh_pct!;
    const during = m.valuesAt(logger, ANCHOR - 12 * H)!.rh_pct!;
    expect(coldSnapDepth(sc, ANCHOR - 48 * H)).toBe(0);
    expect(coldSnapDepth(sc, ANCHOR - 12 * H)).toBe(1);
    expect(before).toBeGreaterThan(38);
    expect(during).toBeLessThan(25);
  });

  it("fouls the Gravure Press 1 infeed neutralizer (meters before and after it) until most of its effect is gone, and faults a power unit", () => {
    const g1 = DEMO_LINES.findIndex((l) => l.slug === "gravure-1");
    const f2 = DEMO_LINES.findIndex((l) => l.slug === "flexo-2");
    expect(neutralizerEffect(sc, DEMO_LINES[g1], g1, 1, ANCHOR - 6.4 * 24 * H)).toBeGreaterThan(0.85);
    expect(neutralizerEffect(sc, DEMO_LINES[g1], g1, 1, ANCHOR)).toBeLessThan(0.2);
    const printExit = DEMO_LINES[f2].points.findIndex((p) => p.slug === "print-exit");
    expect(neutralizerEffect(sc, DEMO_LINES[f2], f2, printExit, ANCHOR - 5.5 * H)).toBe(0);
    expect(neutralizerEffect(sc, DEMO_LINES[f2], f2, printExit, ANCHOR - 3 * H)).toBeGreaterThan(0.7);
  });

  it("stays inside the device contract and below air breakdown at 25 mm over a day", () => {
    const m = new PlantModel(sc);
    for (const d of m.devices) {
      const period = SAMPLE_PERIOD_MS[d.kind] * 60;
      for (let t = ANCHOR - 24 * H; t < ANCHOR; t += period) {
        const v = m.valuesAt(d, t);
        if (!v) continue;
        const r = checkReadingSets([{ ts: t, values: v }], { deviceKind: d.kind, nowMs: ANCHOR, oldestAcceptedMs: ANCHOR - 14 * 24 * H });
        expect(r.rejections).toEqual([]);
        if (v.charge_kv !== undefined) expect(Math.abs(v.charge_kv)).toBeLessThanOrEqual(MAX_KV);
      }
    }
  });

  it("keeps the knife-exit meter of Slitter S1 silent in its window", () => {
    const m = new PlantModel(sc);
    const d = m.devices.find((x) => x.code === "fm-slitter-1-knife-exit")!;
    expect(m.valuesAt(d, ANCHOR - 9 * H)).toBeNull();
    expect(m.valuesAt(d, ANCHOR - 7 * H)).not.toBeNull();
  });

  it("shows a healthy bar's real reduction: after = before × (1 − η) + pickup (simulators/plant-model.ts)", () => {
    const m = new PlantModel({ ...sc, incidents: { coldSpells: [], humidifierFailures: [], fouling: [], powerFaults: [], silences: [], speedUps: [] } });
    const g1 = DEMO_LINES.findIndex((l) => l.slug === "gravure-1");
    const line = DEMO_LINES[g1];
    const t = ANCHOR - 3 * H;
    const [unwind, infeed] = m.lineCharges(line, g1, t);
    const eta = neutralizerEffect(m.scenario, line, g1, 1, t);
    // the pickup term is at most PICKUP × |fresh charge| of the infeed, well under the bar's share
    expect(Math.abs(infeed - unwind * (1 - eta))).toBeLessThan(0.1 * Math.abs(unwind));
    expect(1 - Math.abs(infeed) / Math.abs(unwind)).toBeGreaterThan(0.75);
  });
});
