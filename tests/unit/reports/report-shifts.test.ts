// Shift and week boundaries in the plant's time zone (Europe/London: GMT in winter, BST = UTC+1
// from the last Sunday of March 01:00 UTC to the last Sunday of October 01:00 UTC — UK Summer
// Time Order, from memory; 2026 changes on 29 March and 25 October).
import { describe, expect, it } from "vitest";
import {
  addDaysToDate,
  dateRangeWindow,
  describeShift,
  lastCompletedShift,
  mondayOf,
  nextShift,
  previousShift,
  shiftAt,
  shiftsOfDate,
  shiftWindowFor,
  weekWindow,
} from "@/lib/plant-time";
import { DEFAULT_PLANT_SETTINGS } from "@/lib/plant-settings";

const settings = { timeZone: "Europe/London", shifts: DEFAULT_PLANT_SETTINGS.shifts };
const H = 3_600_000;

describe("shifts of a winter day (GMT = UTC)", () => {
  it("Early 06–14, Late 14–22, Night 22–06 next day", () => {
    const [early, late, night] = shiftsOfDate("2026-01-12", settings);
    expect(early).toMatchObject({ name: "Early", startTs: Date.UTC(2026, 0, 12, 6), endTs: Date.UTC(2026, 0, 12, 14) });
    expect(late).toMatchObject({ name: "Late", startTs: Date.UTC(2026, 0, 12, 14), endTs: Date.UTC(2026, 0, 12, 22) });
    expect(night).toMatchObject({ name: "Night", startTs: Date.UTC(2026, 0, 12, 22), endTs: Date.UTC(2026, 0, 13, 6) });
    expect(describeShift(night)).toBe("Night · Mon 12 Jan 2026, 22:00–06:00 next day");
  });

  it("finds a shift by name, and the shift containing an instant", () => {
    expect(shiftWindowFor("2026-01-12", "Late", settings)?.startTs).toBe(Date.UTC(2026, 0, 12, 14));
    expect(shiftWindowFor("2026-01-12", "Weekend", settings)).toBeNull();
    // 03:00 on the 13th belongs to the night shift that started on the 12th
    const s = shiftAt(Date.UTC(2026, 0, 13, 3), settings);
    expect(s.name).toBe("Night");
    expect(s.date).toBe("2026-01-12");
    // a shift's start belongs to it, its end to the next one
    expect(shiftAt(Date.UTC(2026, 0, 12, 14), settings).name).toBe("Late");
  });

  it("steps to the previous and next shift and finds the last completed one", () => {
    const early = shiftWindowFor("2026-01-12", "Early", settings)!;
    expect(previousShift(early, settings)).toMatchObject({ name: "Night", date: "2026-01-11" });
    expect(nextShift(early, settings)).toMatchObject({ name: "Late", date: "2026-01-12" });
    expect(lastCompletedShift(Date.UTC(2026, 0, 12, 15), settings)).toMatchObject({ name: "Early", date: "2026-01-12" });
  });
});

describe("daylight saving (Europe/London)", () => {
  it("summer shifts start at 06:00 BST = 05:00 UTC", () => {
    const early = shiftWindowFor("2026-07-01", "Early", settings)!;
    expect(early.startTs).toBe(Date.UTC(2026, 6, 1, 5));
  });

  it("the night the clocks go forward (29 Mar 2026) the night shift lasts 7 h", () => {
    const night = shiftWindowFor("2026-03-28", "Night", settings)!;
    expect((night.endTs - night.startTs) / H).toBe(7);
  });

  it("the night the clocks go back (25 Oct 2026) the night shift lasts 9 h", () => {
    const night = shiftWindowFor("2026-10-24", "Night", settings)!;
    expect((night.endTs - night.startTs) / H).toBe(9);
  });
});

describe("weeks and date ranges", () => {
  it("the ISO week runs Monday 00:00 local to the next Monday", () => {
    expect(mondayOf("2026-01-14")).toBe("2026-01-12");
    expect(mondayOf("2026-01-18")).toBe("2026-01-12"); // a Sunday
    expect(mondayOf("2026-01-12")).toBe("2026-01-12");
    const w = weekWindow("2026-01-14", "Europe/London");
    expect(w.startTs).toBe(Date.UTC(2026, 0, 12));
    expect(w.endTs).toBe(Date.UTC(2026, 0, 19));
    expect(w.lastDate).toBe("2026-01-18");
  });

  it("the week in which summer time starts is 167 h long", () => {
    const w = weekWindow("2026-03-25", "Europe/London");
    expect((w.endTs - w.startTs) / H).toBe(167);
  });

  it("date arithmetic crosses month and year ends", () => {
    expect(addDaysToDate("2025-12-31", 1)).toBe("2026-01-01");
    expect(addDaysToDate("2026-03-01", -1)).toBe("2026-02-28");
  });

  it("refuses bad dates, reversed ranges and a plant without shifts", () => {
    expect(() => shiftsOfDate("2026-02-30", settings)).toThrow(RangeError);
    expect(() => dateRangeWindow("2026-02-10", "2026-02-01", "Europe/London")).toThrow(RangeError);
    expect(() => shiftsOfDate("2026-01-12", { timeZone: "Europe/London", shifts: [] })).toThrow(RangeError);
  });

  it("a plant with two 12-hour shifts", () => {
    const two = { timeZone: "Europe/London", shifts: [{ name: "Nights", start: "19:00" }, { name: "Days", start: "07:00" }] };
    const [days, nights] = shiftsOfDate("2026-01-12", two);
    expect(days.name).toBe("Days");
    expect((days.endTs - days.startTs) / H).toBe(12);
    expect(nights.endTs).toBe(Date.UTC(2026, 0, 13, 7));
  });
});

describe("two shifts listed with the same start time", () => {
  // The Floor's clock and the reports used to disagree here (one took the later shift, the
  // other refused the settings); lib/plant-time.ts keeps the Floor's meaning for both, so a
  // report never names a different shift from the one the Floor showed.
  it("the later one in the list wins, and the shift still runs to the next start", () => {
    const clash = { timeZone: "Europe/London", shifts: [{ name: "A", start: "06:00" }, { name: "B", start: "06:00" }, { name: "C", start: "18:00" }] };
    const day = shiftsOfDate("2026-01-12", clash);
    expect(day.map((s) => s.name)).toEqual(["B", "C"]);
    // 12 Jan 2026 is GMT (UTC+0), so 06:00 local = 06:00 Z (Europe/London rules)
    expect(shiftAt(Date.UTC(2026, 0, 12, 9), clash)).toMatchObject({ name: "B", index: 1, startTs: Date.UTC(2026, 0, 12, 6), endTs: Date.UTC(2026, 0, 12, 18) });
  });
});
