// Who is told together, and when (lib/alerts/notification-groups.ts planGroupMessages), and the
// words of the group and "Worse:" messages (lib/mail/alert-group-emails.ts, alert-emails.ts).
// Expected times are worked by hand from the rule in notification-groups.ts: untold alerts of a
// hall within STORM_WINDOW_MS (3 min) of the first form a group, sent when its first member is
// due (notifyAfterS after the raise, at once from worsened_ts); told groups escalate as one,
// escalateAfterS per step.
import { describe, expect, it } from "vitest";
import { firstDueTs, groupNotifications, planGroupMessages, STORM_WINDOW_MS, type PendingNotifyItem } from "../../../lib/alerts/notification-groups";
import { composeGroupEmail, composeGroupPhoneText } from "../../../lib/mail/alert-group-emails";
import { composeAlertEmail } from "../../../lib/mail/alert-emails";
import { planNotification } from "../../../ingest/alerts-escalation";

const T0 = Date.UTC(2026, 0, 12, 8, 0);
const MIN = 60_000;
const NOTIFY_S = 300;
const ESCALATE_S = 300;
let nextId = 100;

function pending(over: Partial<PendingNotifyItem> & { ts: number }): PendingNotifyItem {
  const base = { alertId: nextId++, kind: "charge_high" as const, severity: "medium" as const, areaId: 1, areaName: "Press Hall", lineId: 1, lineName: "Gravure Press 1", pointName: "Unwind", value: 14, message: "m", notifiedLevel: 0, notifyGroup: null };
  const item = { ...base, ...over };
  return { ...item, dueTs: over.dueTs ?? (item.worsened ? item.ts : item.ts + NOTIFY_S * 1000) };
}

describe("who goes together", () => {
  const storm = [
    pending({ ts: T0, kind: "rh_low", lineId: null, lineName: null, pointName: null, value: 23.4 }),
    pending({ ts: T0 + 40_000 }),
    pending({ ts: T0 + 80_000, pointName: "Infeed idlers", severity: "high" }),
    pending({ ts: T0 + 2 * MIN + 50_000, pointName: "Rewind" }),
  ];

  it("sends nothing before the hall's first alert is due", () => {
    expect(planGroupMessages(storm, [1, 2], ESCALATE_S, T0 + 5 * MIN - 1)).toEqual([]);
  });

  it("when the first is due, sends the whole hall's window as one message, those not yet due included", () => {
    const plans = planGroupMessages(storm, [1, 2], ESCALATE_S, T0 + 5 * MIN);
    expect(plans).toHaveLength(1);
    expect(plans[0].order).toBe(1);
    expect(plans[0].dueTs).toBe(T0 + 5 * MIN);
    // the last was raised at T0 + 2:50, so alone it would be due only at T0 + 7:50
    expect(plans[0].items.map((i) => i.alertId)).toEqual(storm.map((i) => i.alertId));
    expect(plans[0].group.title).toBe("Press Hall: RH 23 % and 3 points over on Gravure Press 1");
    expect(plans[0].group.severity).toBe("high");
    expect(plans[0].key).toBe(`area:1:${T0}:${storm[0].alertId}`);
    expect(plans[0].key.length).toBeLessThanOrEqual(80);
  });

  it("keeps another hall apart, and an alert past the window starts its own group", () => {
    const other = pending({ ts: T0 + MIN, areaId: 2, areaName: "Converting Hall", lineId: 3, lineName: "Laminator L1", kind: "effect_loss" });
    const late = pending({ ts: T0 + STORM_WINDOW_MS + 1 });
    const plans = planGroupMessages([...storm, other, late], [1], ESCALATE_S, T0 + 30 * MIN);
    expect(plans.map((p) => p.items.length)).toEqual([4, 1, 1]);
    expect(plans[1].items[0].alertId).toBe(other.alertId);
    expect(plans[2].items[0].alertId).toBe(late.alertId);
  });

  it("an alert raised after its hall's group went out is told in a follow-up group, and the told group escalates as one", () => {
    const sentKey = `area:1:${T0}:${storm[0].alertId}`;
    const told = storm.map((i) => ({ ...i, notifiedLevel: 1, notifyGroup: sentKey }));
    // raised at T0 + 6 min, inside no open group; due at T0 + 11 min
    const followUp = pending({ ts: T0 + 6 * MIN, pointName: "Coater" });
    // at T0 + 10 min: the group escalates to order 2 (5 min after its first step), the follow-up is not due
    const at10 = planGroupMessages([...told, followUp], [1, 2], ESCALATE_S, T0 + 10 * MIN);
    expect(at10).toHaveLength(1);
    expect(at10[0]).toMatchObject({ key: sentKey, order: 2, dueTs: T0 + 10 * MIN });
    expect(at10[0].items).toHaveLength(4);
    // at T0 + 11 min the follow-up goes to order 1 on its own, under a new key
    const at11 = planGroupMessages([...told.map((i) => ({ ...i, notifiedLevel: 2 })), followUp], [1, 2], ESCALATE_S, T0 + 11 * MIN);
    expect(at11).toHaveLength(1);
    expect(at11[0].order).toBe(1);
    expect(at11[0].items.map((i) => i.alertId)).toEqual([followUp.alertId]);
    expect(at11[0].key).not.toBe(sentKey);
  });

  it("with no wait before the first message, a hall-mate raised a minute after the group went out is a follow-up", () => {
    const first = pending({ ts: T0, dueTs: T0 });
    const plans = planGroupMessages([first], [1], ESCALATE_S, T0);
    expect(plans).toHaveLength(1);
    const told = { ...first, notifiedLevel: 1, notifyGroup: plans[0].key };
    const second = pending({ ts: T0 + MIN, dueTs: T0 + MIN });
    const next = planGroupMessages([told, second], [1], ESCALATE_S, T0 + MIN);
    expect(next.map((p) => p.items.map((i) => i.alertId))).toEqual([[second.alertId]]);
  });

  it("calls nobody when nobody is on call", () => {
    expect(planGroupMessages(storm, [], ESCALATE_S, T0 + 60 * MIN)).toEqual([]);
  });
});

describe("told again when worse", () => {
  it("is due at once from worsened_ts, not notifyAfterS later", () => {
    const worsenedTs = T0 + 20 * MIN;
    expect(firstDueTs({ startTs: T0, worsenedTs }, NOTIFY_S)).toBe(worsenedTs);
    expect(firstDueTs({ startTs: T0, worsenedTs: null }, NOTIFY_S)).toBe(T0 + 5 * MIN);
    // got worse before anybody was told: the earlier of the two
    expect(firstDueTs({ startTs: T0, worsenedTs: T0 + MIN, toldBefore: false }, NOTIFY_S)).toBe(T0 + MIN);
    expect(firstDueTs({ startTs: T0, worsenedTs: T0 + 20 * MIN, toldBefore: false }, NOTIFY_S)).toBe(T0 + 5 * MIN);
    expect(planNotification({ startTs: T0, notifiedLevel: 0, worsenedTs }, [1, 2], { notifyAfterS: NOTIFY_S, escalateAfterS: ESCALATE_S }, worsenedTs)).toEqual({ order: 1, dueTs: worsenedTs });
  });

  it("counts escalation steps from worsened_ts", () => {
    const worsenedTs = T0 + 20 * MIN;
    const s = { notifyAfterS: NOTIFY_S, escalateAfterS: ESCALATE_S };
    expect(planNotification({ startTs: T0, notifiedLevel: 1, worsenedTs }, [1, 2], s, worsenedTs + 5 * MIN - 1)).toBeNull();
    expect(planNotification({ startTs: T0, notifiedLevel: 1, worsenedTs }, [1, 2], s, worsenedTs + 5 * MIN)).toEqual({ order: 2, dueTs: worsenedTs + 5 * MIN });
  });

  it("a worsened alert forms a new group keyed by its worsened time, titled 'Worse:'", () => {
    const worsenedTs = T0 + 20 * MIN;
    const w = pending({ ts: worsenedTs, worsened: true, severity: "high", value: 24.5, notifyGroup: `area:1:${T0}:7` });
    const plans = planGroupMessages([w], [1], ESCALATE_S, worsenedTs);
    expect(plans).toHaveLength(1);
    expect(plans[0].key).toBe(`area:1:${worsenedTs}:${w.alertId}`);
    expect(plans[0].group.title).toBe("Worse: Press Hall: 1 point over on Gravure Press 1");
  });
});

describe("the words", () => {
  const mailItem = (id: number, pointName: string, worsenedTs: number | null = null) => ({
    alertId: id,
    kind: "charge_high" as const,
    severity: "high" as const,
    state: "active_unacked" as const,
    message: "Charge −24.5 kV over the 20 kV limit",
    startTs: T0,
    peakValue: -24.5,
    expectedCrossingTs: null,
    areaName: "Press Hall",
    lineName: "Gravure Press 1",
    pointName,
    where: `Press Hall › Gravure Press 1 › ${pointName}`,
    linkLineId: 1,
    worsenedTs,
  });
  const opts = { level: 1, recipientName: "Dana", appUrl: "https://stillfield.example.com/", timeZone: "Europe/London", nowMs: T0 + 5 * MIN };

  it("the group e-mail has the title in its subject and lists every alert with its link", () => {
    const [g] = groupNotifications([pending({ ts: T0, alertId: 1 }), pending({ ts: T0 + MIN, alertId: 2, pointName: "Rewind" })]);
    const mail = composeGroupEmail({ title: g.title, severity: "high", items: [mailItem(1, "Unwind"), mailItem(2, "Rewind")] }, opts);
    expect(mail.subject).toBe("Press Hall: 2 points over on Gravure Press 1 (2 alerts, high)");
    for (const id of [1, 2]) {
      expect(mail.text).toContain(`https://stillfield.example.com/alerts/${id}`);
      expect(mail.html).toContain(`href="https://stillfield.example.com/alerts/${id}"`);
    }
    expect(mail.text).toContain("Press Hall › Gravure Press 1 › Rewind; peak −24.5 kV (high)");
    expect(composeGroupEmail({ title: g.title, severity: "high", items: [mailItem(1, "Unwind"), mailItem(2, "Rewind")] }, { ...opts, level: 2 }).subject.startsWith("[Escalated] ")).toBe(true);
    const phone = composeGroupPhoneText({ title: g.title, severity: "high", items: [mailItem(1, "Unwind"), mailItem(2, "Rewind")] }, { level: 1 });
    expect(phone.title).toBe("Press Hall: 2 points over on Gravure Press 1");
    expect(phone.body).toBe("2 alerts: Charge over limit Unwind −24.5 kV; Charge over limit Rewind −24.5 kV");
  });

  it("the e-mail of an alert told again begins 'Worse:' and gives the new severity and peak", () => {
    const mail = composeAlertEmail(mailItem(5, "Unwind"), { ...opts, unackedForMs: 0, worsenedTs: T0 + 20 * MIN });
    expect(mail.subject).toMatch(/^Worse: .*Charge over limit — Press Hall › Gravure Press 1 › Unwind \(now high, peak −24\.5 kV\)$/);
    // 08:20 UTC is 08:20 in London in January (GMT)
    expect(mail.text).toContain("This alert got worse at 08:20 (plant time): now high, peak −24.5 kV.");
    expect(composeAlertEmail(mailItem(5, "Unwind"), { ...opts, unackedForMs: 0 }).subject.startsWith("Worse:")).toBe(false);
  });
});
