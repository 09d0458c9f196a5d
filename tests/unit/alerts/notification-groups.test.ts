// Storms as one message (lib/alerts/notification-groups.ts): alerts of one hall within a few
// minutes are one notification listing them; other halls and later alerts are their own.
import { describe, expect, it } from "vitest";
import { groupNotifications, isGroupClosed, STORM_WINDOW_MS, type NotifyItem } from "../../../lib/alerts/notification-groups";

const T0 = Date.UTC(2026, 0, 12, 8, 0);
const MIN = 60_000;
let id = 1;
function item(over: Partial<NotifyItem>): NotifyItem {
  return { alertId: id++, ts: T0, kind: "charge_high", severity: "medium", areaId: 1, areaName: "Press Hall", lineId: 1, lineName: "Gravure Press 1", pointName: "Unwind", value: 14, message: "m", ...over };
}

describe("storm grouping", () => {
  it("sends a hall's alerts within a few minutes as one notification with the list inside", () => {
    const groups = groupNotifications([
      item({ kind: "rh_low", ts: T0, lineId: null, lineName: null, pointName: null, value: 23.4, severity: "medium" }),
      item({ ts: T0 + 30_000 }),
      item({ ts: T0 + MIN, pointName: "Infeed idlers", severity: "high" }),
      item({ ts: T0 + 2 * MIN, pointName: "Rewind" }),
    ]);
    expect(groups).toHaveLength(1);
    expect(groups[0].title).toBe("Press Hall: RH 23 % and 3 points over on Gravure Press 1");
    expect(groups[0].items).toHaveLength(4);
    expect(groups[0].severity).toBe("high");
  });

  it("keeps halls apart and starts a new group after the window", () => {
    const groups = groupNotifications([
      item({ ts: T0 }),
      item({ ts: T0 + MIN, areaId: 2, areaName: "Converting Hall", lineId: 3, lineName: "Laminator L1", kind: "effect_loss" }),
      item({ ts: T0 + STORM_WINDOW_MS + 1 }),
    ]);
    expect(groups.map((g) => g.title)).toEqual(["Press Hall: 1 point over on Gravure Press 1", "Converting Hall: 1 bar losing effect on Laminator L1", "Press Hall: 1 point over on Gravure Press 1"]);
    expect(isGroupClosed(groups[0], T0 + STORM_WINDOW_MS, STORM_WINDOW_MS)).toBe(false);
    expect(isGroupClosed(groups[0], T0 + STORM_WINDOW_MS + 1, STORM_WINDOW_MS)).toBe(true);
  });

  it("puts an alert without a hall on its own", () => {
    const groups = groupNotifications([item({ areaId: null, areaName: null, lineId: null, lineName: null, kind: "sensor_silent", value: 300 }), item({ areaId: null, areaName: null, lineId: null, lineName: null, kind: "sensor_silent", value: 300 })]);
    expect(groups).toHaveLength(2);
    expect(groups[0].title).toBe("Plant: 1 sensor silent on the plant");
  });
});
