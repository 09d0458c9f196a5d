// CSV writer: RFC 4180 quoting and the OWASP "CSV Injection" escaping of formula-like cells.
import { describe, expect, it } from "vitest";
import Papa from "papaparse";
import { formatCsvCell, recordsToCsv, toCsv, UTF8_BOM } from "@/lib/csv";

describe("CSV injection (OWASP CSV Injection guidance: prefix =, +, -, @, tab, CR with ')", () => {
  const cases: Array<[string, string]> = [
    ["=HYPERLINK(\"http://x\",\"y\")", `"'=HYPERLINK(""http://x"",""y"")"`],
    ["+1+1", "'+1+1"],
    ["-2+3", "'-2+3"],
    ["@SUM(A1:A2)", "'@SUM(A1:A2)"],
    ["\tcmd", "'\tcmd"],
    ["\rcmd", `"'\rcmd"`],
  ];
  for (const [input, expected] of cases) {
    it(`escapes ${JSON.stringify(input)}`, () => {
      expect(formatCsvCell(input)).toBe(expected);
    });
  }

  it("leaves ordinary text alone and does not escape a trigger that is not the first character", () => {
    expect(formatCsvCell("cleaned bar at unwind")).toBe("cleaned bar at unwind");
    expect(formatCsvCell("a=b")).toBe("a=b");
    expect(formatCsvCell(" =1")).toBe(" =1");
  });

  it("writes negative numbers as numbers (a charge of −3.4 kV is data, not a formula)", () => {
    expect(formatCsvCell(-3.4)).toBe("-3.4");
    expect(formatCsvCell(0)).toBe("0");
    // the same figure as text is escaped, because text can come from a person
    expect(formatCsvCell("-3.4")).toBe("'-3.4");
  });

  it("writes nothing for missing and non-finite values", () => {
    expect(formatCsvCell(null)).toBe("");
    expect(formatCsvCell(undefined)).toBe("");
    expect(formatCsvCell(Number.NaN)).toBe("");
    expect(formatCsvCell(Number.POSITIVE_INFINITY)).toBe("");
  });
});

describe("RFC 4180 quoting", () => {
  it("quotes commas, quotes and line breaks, doubling inner quotes", () => {
    expect(formatCsvCell("a,b")).toBe('"a,b"');
    expect(formatCsvCell('say "hi"')).toBe('"say ""hi"""');
    expect(formatCsvCell("two\nlines")).toBe('"two\nlines"');
  });

  it("ends every row with CRLF and round-trips through a CSV parser", () => {
    const rows = [
      ["Unwind, left", -12.5, 'note "quoted"'],
      ["=cmd|' /C calc'!A0", 3, "line\nbreak"],
    ];
    const csv = toCsv(["Point", "Charge kV", "Note"], rows);
    expect(csv.endsWith("\r\n")).toBe(true);
    expect(csv.split("\r\n")[0]).toBe("Point,Charge kV,Note");
    const parsed = Papa.parse<string[]>(csv.trimEnd(), { newline: "\r\n" });
    expect(parsed.errors).toEqual([]);
    expect(parsed.data[1]).toEqual(["Unwind, left", "-12.5", 'note "quoted"']);
    // the formula arrives as text with the protective quote
    expect(parsed.data[2][0]).toBe("'=cmd|' /C calc'!A0");
    expect(parsed.data[2][2]).toBe("line\nbreak");
  });

  it("adds a UTF-8 byte-order mark only when asked", () => {
    expect(toCsv(["a"], [], { bom: true }).startsWith(UTF8_BOM)).toBe(true);
    expect(toCsv(["a"], []).startsWith(UTF8_BOM)).toBe(false);
  });

  it("builds from records and column definitions", () => {
    const csv = recordsToCsv(
      [
        { header: "Name", value: (r: { name: string; kv: number }) => r.name },
        { header: "kV", value: (r) => r.kv },
      ],
      [{ name: "@Rewind", kv: 14 }],
    );
    expect(csv).toBe("Name,kV\r\n'@Rewind,14\r\n");
  });
});
