// Shift boundaries and plant clock times (lib/plant-time.ts). UK clock changes: last Sunday of
// March and of October at 01:00 UTC (UK Summer Time rules, from memory); 2026: 29 March and
// 25 October.
import { describe, expect, it } from "vitest";
import { formatPlantSince, formatPlantTime, fromPlantLocalInput, isValidTimeZone, shiftAt, shiftsBetween, toPlantLocalInput } from "@/lib/plant-time";
import { DEFAULT_PLANT_SETTINGS } from "@/lib/plant-settings";

const london = { timeZone: "Europe/London", shifts: DEFAULT_PLANT_SETTINGS.shifts };
const H = 3_600_000;

describe("default three 8-hour shifts in London", () => {
  it("finds the shift in winter (GMT = UTC)", () => {
    const s = shiftAt(Date.UTC(2026, 0, 14, 15, 30), london);
    expect(s.name).toBe("Late");
    expect(s.startTs).toBe(Date.UTC(2026, 0, 14, 14, 0));
    expect(s.endTs).toBe(Date.UTC(2026, 0, 14, 22, 0));
  });

  it("uses local time in summer (BST = UTC+1)", () => {
    const s = shiftAt(Date.UTC(2026, 6, 1, 5, 30), london); // 06:30 BST
    expect(s.name).toBe("Early");
    expect(s.startTs).toBe(Date.UTC(2026, 6, 1, 5, 0));
    expect(s.endTs - s.startTs).toBe(8 * H);
  });

  it("puts the small hours in the night shift that began the evening before", () => {
    const s = shiftAt(Date.UTC(2026, 0, 15, 2, 0), london);
    expect(s.name).toBe("Night");
    expect(s.startTs).toBe(Date.UTC(2026, 0, 14, 22, 0));
    expect(s.endTs).toBe(Date.UTC(2026, 0, 15, 6, 0));
  });

  it("gives the night the clocks go forward 7 hours and the night they go back 9", () => {
    const spring = shiftAt(Date.UTC(2026, 2, 29, 3, 0), london);
    expect(spring.name).toBe("Night");
    expect(spring.endTs - spring.startTs).toBe(7 * H);
    const autumn = shiftAt(Date.UTC(2026, 9, 25, 3, 0), london);
    expect(autumn.endTs - autumn.startTs).toBe(9 * H);
  });

  it("lists the shifts of a day in order", () => {
    const list = shiftsBetween(Date.UTC(2026, 0, 14, 0, 0), Date.UTC(2026, 0, 15, 0, 0), london);
    expect(list.map((s) => s.name)).toEqual(["Night", "Early", "Late", "Night"]);
    for (let i = 1; i < list.length; i++) expect(list[i].startTs).toBe(list[i - 1].endTs);
  });
});

describe("other settings", () => {
  it("handles two 12-hour shifts in New York (EST = UTC−5)", () => {
    const spec = { timeZone: "America/New_York", shifts: [{ name: "Days", start: "07:00" }, { name: "Nights", start: "19:00" }] };
    const s = shiftAt(Date.UTC(2026, 0, 14, 23, 0), spec); // 18:00 local
    expect(s.name).toBe("Days");
    expect(s.startTs).toBe(Date.UTC(2026, 0, 14, 12, 0));
    expect(s.endTs).toBe(Date.UTC(2026, 0, 15, 0, 0));
  });

  it("runs a single daily shift from its start to the same time the next day", () => {
    const s = shiftAt(Date.UTC(2026, 0, 14, 3, 0), { timeZone: "UTC", shifts: [{ name: "Day", start: "06:00" }] });
    expect(s.startTs).toBe(Date.UTC(2026, 0, 13, 6, 0));
    expect(s.endTs).toBe(Date.UTC(2026, 0, 14, 6, 0));
  });

  it("accepts shifts listed out of time order", () => {
    const spec = { timeZone: "UTC", shifts: [{ name: "B", start: "18:00" }, { name: "A", start: "06:00" }] };
    expect(shiftAt(Date.UTC(2026, 0, 14, 12, 0), spec).name).toBe("A");
    expect(shiftAt(Date.UTC(2026, 0, 14, 20, 0), spec).name).toBe("B");
  });
});

describe("plant clock", () => {
  it("formats in the plant's zone, not the server's", () => {
    expect(formatPlantTime(Date.UTC(2026, 6, 1, 13, 2), "Europe/London")).toBe("14:02");
    expect(formatPlantTime(Date.UTC(2026, 6, 1, 13, 2), "Asia/Tokyo")).toBe("22:02");
  });

  it("says a time of today plainly and adds the date otherwise", () => {
    const now = Date.UTC(2026, 0, 14, 16, 0);
    expect(formatPlantSince(Date.UTC(2026, 0, 14, 14, 2), now, "Europe/London")).toBe("14:02");
    expect(formatPlantSince(Date.UTC(2026, 0, 13, 14, 2), now, "Europe/London")).toBe("13 Jan 14:02");
  });

  it("reads a typed local time back to the same instant", () => {
    const ts = Date.UTC(2026, 6, 1, 13, 2);
    expect(toPlantLocalInput(ts, "Europe/London")).toBe("2026-07-01T14:02");
    expect(fromPlantLocalInput("2026-07-01T14:02", "Europe/London")).toBe(ts);
    expect(fromPlantLocalInput("2026-13-01T14:02", "Europe/London")).toBeNull();
    expect(fromPlantLocalInput("yesterday", "Europe/London")).toBeNull();
  });

  it("knows real zones from made-up ones", () => {
    expect(isValidTimeZone("Europe/London")).toBe(true);
    expect(isValidTimeZone("Mars/Olympus")).toBe(false);
  });
});
