// The alert chart (lib/charts/svg-chart.ts, lib/charts/alert-chart.ts) and its PNG for e-mail
// (ingest/mail-chart.ts). Expected values are worked by hand from the functions' stated rules.
import { describe, expect, it } from "vitest";
import { alertChartWindow, describeRule, frozenLineLink, limitLinesOf } from "@/lib/charts/alert-chart";
import { niceTicks, renderSvgChart } from "@/lib/charts/svg-chart";
import { MAX_CHART_BYTES, svgToPng } from "@/ingest/mail-chart";

const T0 = Date.UTC(2026, 0, 15, 9, 0, 0);
const points = Array.from({ length: 120 }, (_, i) => {
  const v = -8 - (i > 90 ? (i - 90) * 0.6 : 0);
  return { ts: T0 + i * 30_000, min: v - 0.4, mean: v, max: v + 0.4 };
});

describe("the alert chart", () => {
  it("ticks fall on round numbers covering the range (1, 2, 2.5, 5 × 10ⁿ steps)", () => {
    expect(niceTicks(-26, -6, 4)).toEqual([-25, -20, -15, -10]);
    expect(niceTicks(0, 1, 4)).toEqual([0, 0.25, 0.5, 0.75, 1]);
  });
  it("a charge limit is drawn at both polarities; an RH limit once", () => {
    expect(limitLinesOf("charge_high", { limitKv: 20, clearKv: 17 }).map((l) => l.value)).toEqual([20, -20]);
    expect(limitLinesOf("rh_low", { limitPct: 30, clearPct: 33 })).toEqual([{ value: 30, label: "limit 30 % RH" }]);
  });
  it("covers the hour up to now for an open alert raised 10 min ago, the hour around the raise for an old one", () => {
    const now = T0 + 3_600_000;
    expect(alertChartWindow({ startTs: now - 600_000, endTs: null }, now)).toEqual({ fromTs: now - 3_600_000, toTs: now });
    expect(alertChartWindow({ startTs: now - 5 * 3_600_000, endTs: now - 4 * 3_600_000 }, now)).toEqual({ fromTs: now - 5.5 * 3_600_000, toTs: now - 4.5 * 3_600_000 });
  });
  it("the frozen link names the moment and the same span", () => {
    expect(frozenLineLink("https://stillfield.example/", 3, { fromTs: 1000, toTs: 3_601_000, markTs: 2000 })).toBe("https://stillfield.example/lines/3?at=2000&range=custom&from=1000&to=3601000");
  });
  it("says the rule in words with its limit and clear level", () => {
    expect(describeRule("charge_high", { limitKv: 20, clearKv: 17 }, 10, 30)).toBe("Raised when the charge of either polarity is above 20 kV for 10 s; cleared when it is back below 17 kV for 30 s.");
  });
  it("draws the limit, the moment and the series, escaping words", () => {
    const svg = renderSvgChart({ points, fromTs: T0, toTs: T0 + 3_600_000, unit: "kV", timeZone: "Europe/London", limits: limitLinesOf("charge_high", { limitKv: 20 }), mark: { ts: T0 + 46 * 60_000, label: "raised 09:46 <x>" }, title: "Charge & more" });
    expect(svg).toContain("limit +20 kV");
    expect(svg).toContain("limit \u221220 kV");
    expect(svg).toContain("raised 09:46 &lt;x&gt;");
    expect(svg).toContain("Charge &amp; more");
    expect(svg).toContain(">09:15<"); // time ticks every 15 min, plant time (GMT in January)
    expect(svg.match(/<polyline/g)).toHaveLength(1);
  });
  it("says so when the hour holds no readings", () => {
    expect(renderSvgChart({ points: [], fromTs: T0, toTs: T0 + 3_600_000, unit: "% RH", timeZone: "Europe/London" })).toContain("No readings in this span");
  });
  it("as a PNG for e-mail it stays under 60 kB", async () => {
    const svg = renderSvgChart({ points, fromTs: T0, toTs: T0 + 3_600_000, unit: "kV", timeZone: "Europe/London", limits: limitLinesOf("charge_high", { limitKv: 20 }), mark: { ts: T0 + 46 * 60_000, label: "raised 09:46" }, title: "Charge over limit" });
    const png = await svgToPng(svg, 600);
    expect(png.subarray(1, 4).toString("latin1")).toBe("PNG");
    expect(png.length).toBeLessThan(MAX_CHART_BYTES);
    expect(png.readUInt32BE(16)).toBe(600); // IHDR width
  });
});
