// CSV files as instruments really export them: BOM, preamble, semicolons, decimal commas,
// separate date and time columns, °F, day/month order, short rows and bad dates.
import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeCsv, parseCsv, parseDateCell, parseNumberCell } from "@/lib/csv-import";

const fixture = (name: string) => fs.readFileSync(path.resolve(import.meta.dirname, "../../fixtures", name), "utf8");
const TZ = "Europe/London";

describe("check log from a charged-plate instrument (BOM, preamble, ';' and decimal commas)", () => {
  const text = fixture("check-log-semicolon-bom.csv");

  it("finds the delimiter, the header under the preamble, the columns and their units", () => {
    const a = analyzeCsv("check_log", text);
    expect(a.hadBom).toBe(true);
    expect(a.delimiter).toBe(";");
    expect(a.decimalComma).toBe(true);
    expect(a.headerLine).toBe(5);
    expect(a.mapping).toMatchObject({ date: 0, tag: 1, decayPos: 2, decayNeg: 3, offset: 4, plateDistance: 5 });
    expect(a.units.decayPos).toBe("s");
    expect(a.unitSources.decayPos).toBe("header");
    expect(a.units.offset).toBe("V");
    // 14/01/2026: the 14 can only be a day
    expect(a.dateOrder).toBe("dmy");
    expect(a.dateOrderSource).toBe("values");
    expect(a.missingRequired).toEqual([]);
    expect(a.preview[0]).toEqual({ line: 6, cells: ["14/01/2026 09:12", "N-GRAVURE-1-UNWIND", "4,2", "4,8", "+12", "25"] });
  });

  it("reads good rows with decimal commas and lists each bad row with its line and reason", () => {
    const r = parseCsv("check_log", text, { timeZone: TZ });
    expect(r.rows.map((x) => x.line)).toEqual([6, 7, 10, 11]);
    const first = r.rows[0];
    // 14 Jan 2026 09:12 in London is GMT (UTC+0)
    expect(first.ts).toBe(Date.UTC(2026, 0, 14, 9, 12));
    expect(first).toMatchObject({ tag: "N-GRAVURE-1-UNWIND", decayPosS: 4.2, decayNegS: 4.8, offsetV: 12, plateDistanceMm: 25 });
    expect(r.rows[2].offsetV).toBe(-41.5);
    expect(r.rejected).toEqual([
      { line: 8, reason: 'date "31/02/2026 10:00" is not a valid date' },
      { line: 9, reason: expect.stringMatching(/^missing decay time − .*offset.*\(the row has 3 of 6 columns\)$/) },
    ]);
  });

  it("a header without a required column is a file error, and nothing is read until it is mapped", () => {
    const noOffset = "Date,Neutralizer,Decay + (s),Decay - (s)\n2026-01-14 09:00,N-A,4.1,4.4\n";
    const r = parseCsv("check_log", noOffset, { timeZone: TZ });
    expect(r.analysis.missingRequired).toEqual(["offset"]);
    expect(r.analysis.fileErrors.join(" ")).toMatch(/Offset/);
    expect(r.rows).toEqual([]);
    // mapping the offset to a column by hand (here: re-using decay −, to show the override works)
    const mapped = parseCsv("check_log", noOffset, { timeZone: TZ, mapping: { offset: 3 } });
    expect(mapped.rows).toHaveLength(1);
    expect(mapped.rows[0].offsetV).toBe(4.4);
  });

  it("millisecond decay times are found from the header and converted to seconds", () => {
    const ms = "Timestamp,Tag,Decay+ [ms],Decay- [ms],Balance [mV]\n2026-03-02T10:00:00Z,N-A,4200,4900,-12000\n";
    const r = parseCsv("check_log", ms, { timeZone: TZ });
    expect(r.analysis.delimiter).toBe(",");
    expect(r.analysis.units).toMatchObject({ decayPos: "ms", decayNeg: "ms", offset: "mV" });
    expect(r.rows[0]).toMatchObject({ ts: Date.UTC(2026, 2, 2, 10), decayPosS: 4.2, decayNegS: 4.9, offsetV: -12 });
  });

  it("a decay column without a unit but values in the thousands is taken as milliseconds", () => {
    const r = parseCsv("check_log", "Date,Bar,Decay +,Decay -,Offset\n2026-03-02 10:00,N-A,3900,4100,5\n2026-03-02 11:00,N-B,5200,5000,5\n", { timeZone: TZ });
    expect(r.analysis.unitSources.decayPos).toBe("values");
    expect(r.rows[0].decayPosS).toBe(3.9);
  });
});

describe("humidity history from a standalone logger (separate date/time, °F, month/day)", () => {
  const text = fixture("humidity-logger-mdy-fahrenheit.csv");

  it("detects Fahrenheit, month/day order and leaves the dew-point column alone", () => {
    const a = analyzeCsv("humidity_log", text);
    expect(a.mapping).toMatchObject({ date: 0, time: 1, temp: 2, rh: 3 });
    expect(a.units.temp).toBe("°F");
    expect(a.dateOrder).toBe("mdy");
  });

  it("converts °F to °C and rejects bad hours, out-of-range RH and text", () => {
    const r = parseCsv("humidity_log", text, { timeZone: TZ });
    // 68 °F = 20 °C exactly ((68 − 32) × 5/9)
    expect(r.rows[0]).toEqual({ line: 3, ts: Date.UTC(2026, 0, 13, 6, 0), tempC: 20, rhPct: 41.5 });
    // a missing temperature is allowed (RH is what matters); the row still counts
    expect(r.rows[2]).toMatchObject({ line: 5, tempC: null, rhPct: 40.2 });
    expect(r.rejected.map((x) => x.line)).toEqual([6, 7, 8]);
    expect(r.rejected[0].reason).toMatch(/25:10:00.*not a valid date/);
    expect(r.rejected[1].reason).toMatch(/relative humidity 130 %RH is outside 0…100/);
    expect(r.rejected[2].reason).toMatch(/"abc" is not a number/);
  });

  it("a lone Time (UTC) column holds whole timestamps read as UTC", () => {
    const r = parseCsv("humidity_log", "Time (UTC)\t°C\t%RH\n2026-07-01 12:00\t23,5\t38,0\n", { timeZone: TZ });
    expect(r.analysis.delimiter).toBe("\t");
    expect(r.analysis.timesIn).toBe("utc");
    // summer: London would be UTC+1; the header says UTC, so 12:00 stays 12:00 Z
    expect(r.rows[0]).toMatchObject({ ts: Date.UTC(2026, 6, 1, 12), tempC: 23.5, rhPct: 38 });
  });
});

describe("cells", () => {
  it("numbers: decimal comma, typographic minus, thousands dots, unit suffix", () => {
    expect(parseNumberCell("12,5", true)).toBe(12.5);
    expect(parseNumberCell("\u22123,4", true)).toBe(-3.4);
    expect(parseNumberCell("1.234,5", true)).toBe(1234.5);
    expect(parseNumberCell("4.2 s", false)).toBe(4.2);
    expect(parseNumberCell("abc", false)).toBeNull();
    expect(parseNumberCell("", false)).toBeNull();
  });

  it("dates: local time follows the plant's zone, including summer time", () => {
    // 1 July 2026 08:00 in London is BST (UTC+1) → 07:00 Z
    const r = parseDateCell("2026-07-01 08:00", null, "dmy", TZ);
    expect(r).toEqual({ ok: true, ts: Date.UTC(2026, 6, 1, 7) });
    expect(parseDateCell("29/02/2026", null, "dmy", TZ).ok).toBe(false); // 2026 is not a leap year
    expect(parseDateCell("29/02/2028", null, "dmy", TZ).ok).toBe(true);
    expect(parseDateCell("03/04/2026 1:05 pm", null, "mdy", TZ)).toEqual({ ok: true, ts: Date.UTC(2026, 2, 4, 13, 5) });
    expect(parseDateCell("1767225600", null, "dmy", TZ)).toEqual({ ok: true, ts: 1767225600000 });
    expect(parseDateCell("yesterday", null, "dmy", TZ).ok).toBe(false);
  });
});
