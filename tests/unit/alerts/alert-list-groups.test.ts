// The Alerts board's storm groups (lib/alerts/alert-list-groups.ts): alerts that share a notify
// group fold into one entry where the first of them stands in the list; alerts told alone, or the
// only listed one of their group, stay single; the title is the message's own.
import { describe, expect, it } from "vitest";
import { groupAlertList, groupKeyTs, groupSpanText } from "../../../lib/alerts/alert-list-groups";
import type { AlertListItem } from "../../../lib/views/alerts";

const T0 = Date.UTC(2026, 0, 12, 8, 0);
let nextId = 1;
function item(over: Partial<AlertListItem>): AlertListItem {
  return {
    id: nextId++,
    ruleId: 1,
    ruleVersion: 1,
    ruleName: null,
    kind: "charge_high",
    severity: "medium",
    subjectKey: "point:1",
    areaId: 1,
    lineId: 1,
    pointId: 1,
    deviceId: null,
    neutralizerId: null,
    areaName: "Press Hall",
    lineName: "Gravure Press 1",
    pointName: "Unwind",
    state: "active_unacked",
    message: "m",
    startTs: T0,
    endTs: null,
    closedTs: null,
    peakValue: -14,
    expectedCrossingTs: null,
    chattering: false,
    shelvedUntilTs: null,
    shelvedReason: null,
    ackedBy: null,
    ackedByName: null,
    ackedTs: null,
    notifiedLevel: 1,
    linkLineId: 1,
    notifyGroup: null,
    worsenedTs: null,
    ...over,
  };
}

describe("storm groups on the board", () => {
  const key = `area:1:${T0}:1`;

  it("folds a group's alerts into one entry where its first stands, keeping the others in place", () => {
    const high = item({ severity: "high", notifyGroup: null });
    const a = item({ kind: "rh_low", lineId: null, lineName: null, pointName: null, peakValue: 23.4, notifyGroup: key });
    const lone = item({ notifyGroup: `area:2:${T0}:9`, areaName: "Converting Hall" });
    const b = item({ startTs: T0 + 40_000, pointName: "Infeed idlers", notifyGroup: key, state: "active_acked" });
    const c = item({ startTs: T0 + 170_000, pointName: "Dryer exit", notifyGroup: key });
    const entries = groupAlertList([high, a, lone, b, c]);
    expect(entries.map((e) => (e.type === "alert" ? e.alert.id : e.group.alerts.map((x) => x.id)))).toEqual([high.id, [a.id, b.id, c.id], lone.id]);
    const g = entries[1].type === "group" ? entries[1].group : null;
    expect(g?.title).toBe("Press Hall: RH 23 % and 2 points over on Gravure Press 1");
    expect(g?.unacked).toBe(2);
    expect([g?.firstTs, g?.lastTs]).toEqual([T0, T0 + 170_000]);
  });

  it("a group with only one alert in the list (the rest filtered out) is that alert alone", () => {
    const only = item({ notifyGroup: key });
    expect(groupAlertList([only])).toEqual([{ type: "alert", alert: only }]);
  });

  it("titles a group told again because its alerts got worse 'Worse:'", () => {
    const worseKey = `area:1:${T0 + 600_000}:5`;
    const entries = groupAlertList([item({ notifyGroup: worseKey, worsenedTs: T0 + 600_000 }), item({ notifyGroup: worseKey, worsenedTs: T0 + 600_000, pointName: "Rewind" })]);
    expect(entries[0].type === "group" && entries[0].group.title).toBe("Worse: Press Hall: 2 points over on Gravure Press 1");
    expect(groupKeyTs(worseKey)).toBe(T0 + 600_000);
    expect(groupKeyTs("nonsense")).toBeNull();
  });

  it("says the span in plant time (08:00 UTC is 08:00 in London in January)", () => {
    expect(groupSpanText({ firstTs: T0, lastTs: T0 + 170_000 }, "Europe/London")).toBe("12 Jan 08:00–08:02, within 2 min 50 s");
    expect(groupSpanText({ firstTs: T0, lastTs: T0 + 20_000 }, "Europe/London")).toBe("12 Jan 08:00, together");
  });
});
