// The CSV import reads a file in one full parse and refuses files with more rows than it takes
// (lib/csv-import.ts, lib/csv/analyze.ts).
import Papa from "papaparse";
import { afterEach, describe, expect, it, vi } from "vitest";
import { analyzeCsv, MAX_IMPORT_ROWS, parseCsv } from "@/lib/csv-import";

afterEach(() => vi.restoreAllMocks());

const humidityFile = (rows: number) => {
  const lines = ["Logger HF-TH-01", "Time;Temp (°C);RH (%)"];
  const t0 = Date.UTC(2026, 0, 1);
  for (let i = 0; i < rows; i++) lines.push(`${new Date(t0 + i * 60_000).toISOString()};21,5;${40 + (i % 10)}`);
  return lines.join("\n");
};

describe("CSV import", () => {
  it("parses the whole file once (the layout guess reads only its first rows)", () => {
    const spy = vi.spyOn(Papa, "parse");
    const result = parseCsv("humidity_log", humidityFile(500), { timeZone: "Europe/London" });
    expect(result.rows).toHaveLength(500);
    const fullParses = spy.mock.calls.filter(([, config]) => !(config as { preview?: number } | undefined)?.preview);
    expect(fullParses).toHaveLength(1);
  });

  it("refuses a file with more rows than MAX_IMPORT_ROWS, without reading past the cap", () => {
    const analysis = analyzeCsv("humidity_log", humidityFile(MAX_IMPORT_ROWS + 1));
    expect(analysis.fileErrors.join(" ")).toMatch(/more than 200,000 rows/);
    const ok = analyzeCsv("humidity_log", humidityFile(1000));
    expect(ok.fileErrors).toEqual([]);
    expect(ok.headerLine).toBe(2);
    expect(ok.preview[0].line).toBe(3);
  });
});
