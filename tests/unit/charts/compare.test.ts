// Compare overlays: offsets worked by hand from the shift patterns, and the alignment of the
// earlier window's buckets onto the shown time points (hand-made series).
import { describe, expect, it } from "vitest";
import { alignCompare, compareOffsetMs, frozenViewQuery, parseCompare } from "@/lib/charts/compare";

const H = 3_600_000;
const three = { timeZone: "Europe/London", shifts: [{ name: "Early", start: "06:00" }, { name: "Late", start: "14:00" }, { name: "Night", start: "22:00" }] };
const uneven = { timeZone: "Europe/London", shifts: [{ name: "Days", start: "07:00" }, { name: "Nights", start: "19:00" }, { name: "Twilight", start: "15:00" }] };

describe("compare", () => {
  it("reads only the three kinds from the URL", () => {
    expect(parseCompare("day")).toBe("day");
    expect(parseCompare("week")).toBe("week");
    expect(parseCompare("shift")).toBe("shift");
    expect(parseCompare("month")).toBeNull();
    expect(parseCompare(null)).toBeNull();
  });

  it("moves back 24 h, 7 × 24 h, or the previous shift's length", () => {
    const wedLate = Date.UTC(2026, 0, 14, 15, 0); // Wed 15:00 in London (UTC in January): the Late shift
    expect(compareOffsetMs("day", wedLate, three)).toBe(24 * H);
    expect(compareOffsetMs("week", wedLate, three)).toBe(168 * H);
    expect(compareOffsetMs("shift", wedLate, three)).toBe(8 * H); // Early 06:00–14:00
    // Twilight (15:00) follows Days (07:00–15:00, 8 h); Nights (19:00) follows Twilight (15:00–19:00, 4 h)
    expect(compareOffsetMs("shift", Date.UTC(2026, 0, 14, 16, 0), uneven)).toBe(8 * H);
    expect(compareOffsetMs("shift", Date.UTC(2026, 0, 14, 20, 0), uneven)).toBe(4 * H);
  });

  it("lays the earlier buckets on the shown time points, with gaps where the earlier window has none", () => {
    const xs = [100, 160, 220, 280];
    // earlier window 1000 earlier: samples at -900 (→ 100), -840 (→ 160), none near 220, -720 (→ 280)
    const earlier: Array<[number, number | null]> = [
      [-900, 1.5],
      [-840, 2.5],
      [-720, -3],
    ];
    expect(alignCompare(xs, earlier, 1000, 59)).toEqual([1.5, 2.5, null, -3]);
    // a wider tolerance carries the previous bucket over the hole
    expect(alignCompare(xs, earlier, 1000, 60)).toEqual([1.5, 2.5, 2.5, -3]);
    expect(alignCompare(xs, [], 1000, 60)).toEqual([null, null, null, null]);
  });

  it("freezes the shown window and the overlay in the link", () => {
    expect(frozenViewQuery(1000.4, 2000, "week")).toBe("?range=custom&from=1000&to=2000&compare=week");
    expect(frozenViewQuery(1000, 2000, null)).toBe("?range=custom&from=1000&to=2000");
  });
});
