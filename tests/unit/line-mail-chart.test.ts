// The outbox chart value (one spec or a list) and the merge of a line's meters into one band.
import { describe, expect, it } from "vitest";
import { isLineChartSpec, lineChartAlt, lineChartCid, mailChartSpecs, mergeSeries } from "@/lib/charts/line-mail-chart";

const alertSpec = { alertId: 7, deviceId: 3, channel: "charge_kv", unit: "kV", fromTs: 0, toTs: 3_600_000, markTs: 1_800_000, limits: [{ value: 20, label: "limit +20 kV" }], title: "Charge high", lineId: 2 };
const lineSpec = { kind: "line", lineId: 2, deviceIds: [3, 4], fromTs: 0, toTs: 28_800_000, limitKv: 20, title: "Gravure Press 1" };

describe("mail chart value", () => {
  it("reads one alert spec as before, a list of line specs, and rejects what is not a spec", () => {
    expect(mailChartSpecs(alertSpec)).toHaveLength(1);
    expect(isLineChartSpec(mailChartSpecs(alertSpec)[0])).toBe(false);
    const list = mailChartSpecs([lineSpec, { ...lineSpec, lineId: 5 }]);
    expect(list.map((s) => isLineChartSpec(s) && s.lineId)).toEqual([2, 5]);
    expect(mailChartSpecs({ kind: "line", lineId: 2, deviceIds: [] })).toEqual([]);
    expect(mailChartSpecs("chart")).toEqual([]);
    expect(mailChartSpecs(null)).toEqual([]);
  });

  it("names each line's image by its own cid and describes it in words", () => {
    expect(lineChartCid(12)).toBe("line-12-chart@stillfield");
    expect(lineChartAlt({ title: "Slitter 2", limitKv: 15 })).toBe("Charge of the points on Slitter 2 over the shift (kV, limit ±15 kV)");
    expect(lineChartAlt({ title: "Slitter 2", limitKv: null })).toContain("no charge limit set");
  });
});

describe("mergeSeries", () => {
  it("keeps per bucket the lowest minimum, the highest maximum and the mean furthest from zero (worked by hand)", () => {
    const a = [{ ts: 0, min: -2, mean: 1, max: 3 }, { ts: 60_000, min: 0, mean: 2, max: 4 }];
    const b = [{ ts: 0, min: -9, mean: -6, max: -1 }, { ts: 120_000, min: 1, mean: 1, max: 1 }];
    expect(mergeSeries([a, b])).toEqual([
      { ts: 0, min: -9, mean: -6, max: 3 },
      { ts: 60_000, min: 0, mean: 2, max: 4 },
      { ts: 120_000, min: 1, mean: 1, max: 1 },
    ]);
    expect(mergeSeries([])).toEqual([]);
  });
});
