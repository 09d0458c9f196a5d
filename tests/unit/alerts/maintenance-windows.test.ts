// Maintenance windows (lib/alerts/maintenance-windows.ts): at most 12 h unless extended with a
// reason; which alerts a window explains; the summary and re-check at its end.
import { describe, expect, it } from "vitest";
import { checkExtension, explainingWindow, MAX_WINDOW_MS, openWindowSchema, summarizeWindow, windowExplains, type MaintenanceWindow } from "../../../lib/alerts/maintenance-windows";

const T0 = Date.UTC(2026, 0, 12, 8, 0);
const H = 3_600_000;
const w = (over: Partial<MaintenanceWindow>): MaintenanceWindow => ({ id: 1, targetKind: "line", targetId: 2, ownerId: 3, reason: "Cleaning", startTs: T0, endTs: T0 + 2 * H, extendReason: null, ...over });

describe("maintenance windows", () => {
  it("accepts up to 12 h with a reason and refuses longer, backwards or reasonless windows", () => {
    expect(MAX_WINDOW_MS).toBe(12 * H);
    expect(openWindowSchema.safeParse({ targetKind: "neutralizer", targetId: 4, reason: "Clean the bar", startTs: T0, endTs: T0 + 12 * H }).success).toBe(true);
    expect(openWindowSchema.safeParse({ targetKind: "neutralizer", targetId: 4, reason: "Clean the bar", startTs: T0, endTs: T0 + 12 * H + 1 }).success).toBe(false);
    expect(openWindowSchema.safeParse({ targetKind: "line", targetId: 4, reason: "Clean", startTs: T0, endTs: T0 }).success).toBe(false);
    expect(openWindowSchema.safeParse({ targetKind: "line", targetId: 4, reason: " ", startTs: T0, endTs: T0 + H }).success).toBe(false);
    expect(openWindowSchema.safeParse({ targetKind: "shelf", targetId: 4, reason: "Clean", startTs: T0, endTs: T0 + H }).success).toBe(false);
  });

  it("extends only to a later, future end", () => {
    expect(checkExtension(w({}), T0 + H, T0)).toEqual({ ok: false, message: expect.stringContaining("later") });
    expect(checkExtension(w({}), T0 + 14 * H, T0 + 15 * H)).toEqual({ ok: false, message: expect.stringContaining("future") });
    expect(checkExtension(w({}), T0 + 14 * H, T0 + H)).toEqual({ ok: true });
  });

  it("explains alerts of its hall, line, point, or the bar and the point it serves", () => {
    const place = { areaId: 1, lineId: 2, pointId: 7, neutralizerId: null };
    expect(windowExplains({ targetKind: "area", targetId: 1 }, place)).toBe(true);
    expect(windowExplains({ targetKind: "line", targetId: 2 }, place)).toBe(true);
    expect(windowExplains({ targetKind: "line", targetId: 3 }, place)).toBe(false);
    expect(windowExplains({ targetKind: "point", targetId: 7 }, place)).toBe(true);
    expect(windowExplains({ targetKind: "neutralizer", targetId: 9 }, place, 7)).toBe(true);
    expect(windowExplains({ targetKind: "neutralizer", targetId: 9 }, place, 8)).toBe(false);
    expect(windowExplains({ targetKind: "neutralizer", targetId: 9 }, { ...place, pointId: null, neutralizerId: 9 })).toBe(true);
    // only while it runs
    expect(explainingWindow([w({})], place, T0 + H)?.id).toBe(1);
    expect(explainingWindow([w({})], place, T0 + 2 * H)).toBeNull();
  });

  it("sums up what happened and hands the still-active alerts back for notice", () => {
    const s = summarizeWindow(w({}), "Gravure Press 1", [
      { id: 10, message: "a", startTs: T0 + 10 * 60_000, endTs: T0 + 20 * 60_000 },
      { id: 11, message: "b", startTs: T0 + H, endTs: null },
      { id: 12, message: "before", startTs: T0 - H, endTs: T0 - 1 },
    ]);
    expect(s).toMatchObject({ raised: 2, cleared: 1, stillActive: [11] });
    expect(s.text).toBe("Maintenance on Gravure Press 1 (Cleaning) ran 2 h: 2 alerts were recorded without notice, 1 cleared by its end; 1 still active, so it is now notified as usual.");
  });
});
