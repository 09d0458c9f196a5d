// Shift handover on seeded data in its own database: every figure is recomputed here by brute
// force (second by second) from the fixture's generators and compared with the report.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import Papa from "papaparse";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { getHandoverReport } from "@/db/use-cases/handover-report";
import { handoverCsv } from "@/lib/reports/csv-tables";
import { handoverText } from "@/lib/mail/handover-email";
import type { HandoverReport } from "@/lib/reports/handover";
import { STATE_SYMBOLS, STATE_WORDS } from "@/lib/vocabulary";
import { DEMO_PEOPLE } from "@/lib/demo-plant";
import { CHARGE_STEP_MS, chargeAt, MIN, RH_STEP_MS, rhAt, SEC, seedReportFixture, type ReportFixture } from "./reports-fixture";

let t: TestDatabase;
let fx: ReportFixture;
let report: HandoverReport;
const NOW = Date.now();
const HOLD_MS = 120 * SEC; // a reading stands for at most 2 min (the plant's sensor-silent time)

const nameOf = (role: string) => DEMO_PEOPLE.find((p) => p.role === role)!.name;

/** The fixture's samples of a meter, exactly as written. */
function chargeSamples(code: string) {
  const out: { ts: number; value: number }[] = [];
  for (let ts = fx.shift.startTs - 5 * MIN; ts < fx.shift.endTs + 5 * MIN; ts += CHARGE_STEP_MS) {
    const v = chargeAt(code, ts, fx.shift);
    if (v !== null) out.push({ ts, value: v });
  }
  return out;
}
function rhSamples(code: string) {
  const out: { ts: number; value: number }[] = [];
  for (let ts = fx.shift.startTs - 5 * MIN; ts < fx.shift.endTs + 5 * MIN; ts += RH_STEP_MS) out.push({ ts, value: rhAt(code, ts, fx.shift) });
  return out;
}

/** Walks the shift one second at a time: how long was a held reading beyond the limit, and how long was there a reading at all. */
function bruteForce(samples: { ts: number; value: number }[], beyond: (v: number) => boolean) {
  let over = 0;
  let covered = 0;
  let i = -1;
  for (let t = fx.shift.startTs; t < fx.shift.endTs; t += SEC) {
    while (i + 1 < samples.length && samples[i + 1].ts <= t) i++;
    if (i < 0 || t - samples[i].ts >= HOLD_MS) continue;
    covered += SEC;
    if (beyond(samples[i].value)) over += SEC;
  }
  return { over, covered };
}

const point = (line: string, pointName: string) => report.points.find((p) => p.where.lineName === line && p.where.pointName === pointName)!;

beforeAll(async () => {
  t = await createTestDatabase("reports_handover", { seed: true });
  fx = await seedReportFixture(t.db, NOW);
  report = (await getHandoverReport(t.db, { date: fx.day, shift: "Early" }, NOW))!;
});
afterAll(async () => {
  await t?.close();
});

describe("shift handover", () => {
  it("covers the Early shift, 06:00–14:00 in the plant's time zone", () => {
    expect(report.window.startTs).toBe(fx.shift.startTs);
    expect(report.window.endTs - report.window.startTs).toBe(8 * 60 * MIN);
    expect(report.inProgress).toBe(false);
  });

  it("time over limit of every point matches a second-by-second count", () => {
    const cases: Array<[string, string, string, number]> = [
      ["fm-gravure-1-unwind", "Gravure Press 1", "Unwind", 12],
      ["fm-gravure-1-infeed", "Gravure Press 1", "Infeed idlers", 12],
      ["fm-gravure-1-rewind", "Gravure Press 1", "Rewind", 8],
      ["fm-flexo-2-unwind", "Flexo Press 2", "Unwind", 15],
      ["fm-slitter-1-knife-exit", "Slitter-Rewinder S1", "Knife exit", 12],
    ];
    for (const [code, line, name, limit] of cases) {
      const expected = bruteForce(chargeSamples(code), (v) => Math.abs(v) > limit);
      const row = point(line, name);
      expect(row.limitKv, code).toBe(limit);
      expect(row.overMs, code).toBe(expected.over);
      expect(row.coveredMs, code).toBe(expected.covered);
    }
    // by hand: the unwind excursion lasts 60–90 min and 300–310 min into the shift = 40 min
    expect(point("Gravure Press 1", "Unwind").overMs).toBe(40 * MIN);
    expect(point("Gravure Press 1", "Unwind").excursions).toBe(2);
    // the knife-exit meter was silent from 120 to 150 min; its last reading (119 min 50 s) stands
    // for 2 min, to 121 min 50 s: covered = 480 − 30 min + 110 s
    expect(point("Slitter-Rewinder S1", "Knife exit").coveredMs).toBe((480 - 30) * MIN + 110 * SEC);
  });

  it("uses the most specific limit: the point's 8 kV at the rewind, the line's 15 kV on Flexo Press 2", () => {
    expect(point("Gravure Press 1", "Rewind").limitFrom).toBe("Rewind tighter limit (point)");
    expect(point("Gravure Press 1", "Rewind").code).toBe("over");
    const flexo = point("Flexo Press 2", "Unwind");
    expect(flexo.limitFrom).toBe("Flexo line limit (line)");
    expect(flexo.overMs).toBe(0);
    // 13.5 kV is at least 80 % of 15 kV: shown as near
    expect(flexo.code).toBe("near");
  });

  it("worst readings: the largest magnitude in the shift, with its time", () => {
    const samples = chargeSamples("fm-gravure-1-unwind").filter((x) => x.ts >= fx.shift.startTs && x.ts < fx.shift.endTs);
    const worst = samples.reduce((a, b) => (Math.abs(b.value) > Math.abs(a.value) ? b : a));
    expect(worst.value).toBe(-18);
    expect(point("Gravure Press 1", "Unwind").worst).toEqual(worst);
    expect(report.summary.worst?.sample).toEqual(worst);
    expect(report.worstReadings[0].where.pointName).toBe("Unwind");
    expect(report.worstReadings).toHaveLength(5);
  });

  it("a meter with no readings all shift is silent", () => {
    const p = point("Labeller LB1", "Label dispense edge");
    expect(p.code).toBe("silent");
    expect(p.coveredMs).toBe(0);
    expect(p.worst).toBeNull();
  });

  it("lowest RH per hall, and time below the band and the alert limit", () => {
    for (const [code, hall] of [["th-press-hall", "Press Hall"], ["th-converting-hall", "Converting Hall"], ["th-labelling-room", "Labelling Room"]] as const) {
      const inShift = rhSamples(code).filter((x) => x.ts >= fx.shift.startTs && x.ts < fx.shift.endTs);
      const lowest = inShift.reduce((a, b) => (b.value < a.value ? b : a));
      const row = report.halls.find((h) => h.areaName === hall)!;
      expect(row.lowest, hall).toEqual(lowest);
      expect(row.belowBandMs, hall).toBe(bruteForce(rhSamples(code), (v) => v < 40).over);
      expect(row.belowLimitMs, hall).toBe(bruteForce(rhSamples(code), (v) => v < 30).over);
    }
    const press = report.halls.find((h) => h.areaName === "Press Hall")!;
    expect(press.lowest).toEqual({ ts: fx.shift.startTs + 240 * MIN, value: 27 });
    expect(press.limitPct).toBe(30); // the plant-wide rh_low rule of the demo seed
    expect(press.code).toBe("over");
    expect(report.halls.find((h) => h.areaName === "Converting Hall")!.code).toBe("near");
    expect(report.halls.find((h) => h.areaName === "Labelling Room")!.code).toBe("normal");
    expect(report.summary.lowestRh?.areaName).toBe("Press Hall");
  });

  it("alerts of the shift, with who acknowledged them and what people wrote", () => {
    const expectedIds = fx.alerts
      .filter((a) => a.startTs < fx.shift.endTs && (a.endTs === null || a.endTs === undefined || a.endTs > fx.shift.startTs))
      .sort((a, b) => a.startTs - b.startTs)
      .map((a) => a.id);
    expect(report.alerts.map((a) => a.id)).toEqual(expectedIds);
    expect(expectedIds).toHaveLength(5);

    const unwind = report.alerts.find((a) => a.id === fx.alerts[2].id)!;
    expect(unwind.ackedByName).toBe(nameOf("shift_lead"));
    expect(unwind.events.filter((e) => e.comment).map((e) => [e.personName, e.comment])).toEqual([
      [nameOf("shift_lead"), "Cleaned bar at unwind"],
      [nameOf("engineer"), "Bar output checked, back to normal"],
    ]);
    expect(unwind.where.label).toBe("Press Hall › Gravure Press 1 › Unwind");
    expect(unwind.activeMsInShift).toBe(30 * MIN + 20 * SEC);

    const carried = report.alerts.find((a) => a.id === fx.alerts[1].id)!;
    expect(carried.raisedInShift).toBe(false);
    expect(carried.activeMsInShift).toBe(20 * MIN);
    // it cleared before the end of the shift, so its code reads normal, as on the alert list
    // (lib/vocabulary/alert-states.ts alertStateCodeAt); the status words say it closed
    const silent = report.alerts.find((a) => a.id === fx.alerts[5].id)!;
    expect(silent.code).toBe("normal");
    expect(silent.status).toBe("Closed");

    // raised in the shift: 2, 3, 4, 5; still active at the end and unacknowledged: 3
    expect(report.summary.alertsRaised).toBe(4);
    expect(report.summary.alertsActiveAtEnd).toBe(1);
    expect(report.summary.unacknowledgedAtEnd).toBe(1);
  });

  it("neutralizers that need attention, and why", () => {
    const byTag = new Map(report.neutralizers.map((n) => [n.tag, n]));
    expect([...byTag.keys()].sort()).toEqual(
      ["N-BAGGER-1-UNWIND", "N-FLEXO-2-PRINT-EXIT", "N-FLEXO-2-UNWIND", "N-GRAVURE-1-UNWIND", "N-LAMINATOR-1-REWIND", "N-SLITTER-1-UNWIND"].sort(),
    );
    expect(byTag.get("N-GRAVURE-1-UNWIND")!.reasons).toContain("Marked faulty");
    expect(byTag.get("N-FLEXO-2-PRINT-EXIT")!.reasons[0]).toMatch(/^Losing effect/);
    expect(byTag.get("N-SLITTER-1-UNWIND")!.reasons[0]).toMatch(/^Last check failed: Positive decay 31 s/);
    // last cleaned 30 days before the shift's end with a 14-day interval: 16 days overdue
    expect(byTag.get("N-LAMINATOR-1-REWIND")!.reasons).toContain("Cleaning overdue by 16 d");
    // a solvent line cleans every 7 days; last cleaned 6.5 days before the end
    expect(byTag.get("N-FLEXO-2-UNWIND")!.reasons).toContain("Cleaning due in 12 h");
    expect(byTag.get("N-BAGGER-1-UNWIND")!.reasons[0]).toMatch(/^Check overdue by \d+ d/);
    // a check failed two days after the shift does not appear in the shift's handover
    expect(byTag.has("N-GRAVURE-1-INFEED")).toBe(false);
    expect(report.neutralizers.slice(0, 3).every((n) => n.code === "over")).toBe(true);
  });

  it("line notes of the shift, oldest first, with who wrote them", () => {
    const expected = fx.notes.filter((n) => n.ts >= fx.shift.startTs && n.ts < fx.shift.endTs).sort((a, b) => a.ts - b.ts);
    expect(report.notes.map((n) => n.text)).toEqual(expected.map((n) => n.text));
    expect(report.notes[0].personName).toBe(nameOf("shift_lead"));
    expect(report.notes[1].where.label).toBe("Converting Hall › Laminator L1");
  });

  it("CSV downloads escape formula-like cells (OWASP) and quote per RFC 4180", () => {
    const notes = handoverCsv(report, "notes", STATE_WORDS);
    expect(notes.filename).toBe(`handover-${fx.day}-early-notes.csv`);
    expect(notes.csv).toContain(`"'-3 kV after cleaning, =looks fine"`);
    const parsed = Papa.parse<string[]>(notes.csv.replace(/^\uFEFF/, "").trimEnd(), { newline: "\r\n" });
    expect(parsed.errors).toEqual([]);
    expect(parsed.data.map((r) => r[4])).toEqual(["Note", "Changed to new roll of film", "Humidifier output raised", "'-3 kV after cleaning, =looks fine"]);

    const points = Papa.parse<string[]>(handoverCsv(report, "points", STATE_WORDS).csv.replace(/^\uFEFF/, "").trimEnd(), { newline: "\r\n" });
    const unwind = points.data.find((r) => r[2] === "Gravure Press 1" && r[3] === "Unwind")!;
    expect(unwind[0]).toBe("Over");
    expect(Number(unwind[5])).toBe(40); // minutes over
    expect(unwind[8]).toBe("-18"); // a negative charge stays a number
  });

  it("the e-mail text carries the codes as symbols and words", () => {
    const text = handoverText(report, { symbols: STATE_SYMBOLS, words: STATE_WORDS });
    expect(text).toContain("◆ Over  Press Hall › Gravure Press 1 › Unwind — limit 12 kV; 40 min over");
    expect(text).toContain("Cleaned bar at unwind");
    expect(text).toContain("◌ Silent  Converting Hall › Slitter-Rewinder S1");
  });
});
