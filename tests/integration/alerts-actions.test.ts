// Responding to alerts, editing limits and the roster through the server actions' .run with real
// sessions of the demo people, against the real test database: roles (403 for a viewer, 401
// signed out), the ISA-18.2 lifecycle (acknowledge, clear, shelve with a reason for a stated
// time, its expiry), every action recorded with who and when, and a limit change saved as a
// new version with its audit entry (old → new).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, desc, eq } from "drizzle-orm";
import { closeDb, getDb } from "@/db/client";
import { alertEvents, alerts, auditLog, oncallShifts, people, ruleVersions, rules } from "@/db/schema";
import { ackAlertAction, closeAlertPublisher, commentAlertAction, shelveAlertAction, unshelveAlertAction } from "@/app/_server/actions/alerts";
import { replayRuleAction, saveRuleAction } from "@/app/_server/actions/rules";
import { addShiftAction, removeShiftAction, saveAlertingSettingsAction } from "@/app/_server/actions/oncall";
import type { SessionPerson } from "@/app/_server/session";
import { applyClearTransition, expireShelving, insertRaisedAlert } from "@/db/queries/alert-transitions";
import { getAlertDetail } from "@/db/queries/alert-list";
import { getAlertingSettings } from "@/db/queries/oncall";
import { loadPlantTopology } from "@/db/queries/topology";
import { DEMO_PEOPLE } from "@/lib/demo-plant";
import type { AlertTransition } from "@/lib/rules";

async function sessionOf(role: string): Promise<SessionPerson> {
  const p = DEMO_PEOPLE.find((d) => d.role === role)!;
  const row = (await getDb().select({ id: people.id }).from(people).where(eq(people.email, p.email)))[0];
  return { personId: row.id, role: p.role, name: p.name, email: p.email };
}

let viewer: SessionPerson;
let lead: SessionPerson;
let engineer: SessionPerson;
let admin: SessionPerson;

async function raise(ts = Date.now() - 60_000, subjectKey = "point:1"): Promise<number> {
  const topo = await loadPlantTopology(getDb());
  const t: AlertTransition = {
    ruleId: 1,
    ruleVersion: 1,
    subjectKey,
    kind: "charge_high",
    severity: "medium",
    type: "raise",
    ts,
    raisedTs: ts,
    conditionSinceTs: ts - 10_000,
    value: -13.2,
    peakValue: -13.2,
    unit: "kV",
    message: "Charge −13.2 kV at Unwind on Gravure Press 1, over the 12 kV limit",
    chattering: false,
  };
  return getDb().transaction(async (tx) => (await insertRaisedAlert(tx, t, topo.subjects.get(subjectKey), Date.now())).id);
}

async function row(id: number) {
  return (await getDb().select().from(alerts).where(eq(alerts.id, id)))[0];
}

beforeAll(async () => {
  [viewer, lead, engineer, admin] = await Promise.all(["viewer", "shift_lead", "engineer", "admin"].map(sessionOf));
});
afterAll(async () => {
  await closeAlertPublisher();
  await closeDb();
});

describe("who may respond to an alert", () => {
  it("a viewer gets 403 for acknowledge, comment, shelve and unshelve, and nothing changes", async () => {
    const id = await raise();
    for (const r of [
      await ackAlertAction.run(viewer, { alertId: id }),
      await commentAlertAction.run(viewer, { alertId: id, comment: "seen" }),
      await shelveAlertAction.run(viewer, { alertId: id, durationMin: 60, reason: "nuisance" }),
      await unshelveAlertAction.run(viewer, { alertId: id }),
    ]) {
      expect(r.ok).toBe(false);
      expect(!r.ok && r.status).toBe(403);
    }
    const a = await row(id);
    expect(a.state).toBe("active_unacked");
    expect(a.shelvedUntilTs).toBeNull();
    const events = await getDb().select().from(alertEvents).where(eq(alertEvents.alertId, id));
    expect(events.map((e) => e.kind)).toEqual(["raised"]);
  });

  it("signed out gets 401", async () => {
    const id = await raise();
    const r = await ackAlertAction.run(null, { alertId: id });
    expect(!r.ok && r.status).toBe(401);
  });
});

describe("the alert lifecycle (ISA-18.2 / IEC 62682)", () => {
  it("active, unacknowledged → acknowledged by a shift lead → closed when it clears", async () => {
    const id = await raise();
    const r = await ackAlertAction.run(lead, { alertId: id, comment: "cleaned the bar" });
    expect(r.ok).toBe(true);
    let a = await row(id);
    expect(a.state).toBe("active_acked");
    expect(a.ackedBy).toBe(lead.personId);
    expect(a.ackedTs).toBeGreaterThan(0);
    const again = await ackAlertAction.run(lead, { alertId: id });
    expect(!again.ok && again.status).toBe(409);
    await getDb().transaction((tx) => applyClearTransition(tx, id, { ts: Date.now() }));
    a = await row(id);
    expect(a.state).toBe("closed");
    expect(a.endTs).not.toBeNull();
    expect(a.closedTs).not.toBeNull();
    const detail = await getAlertDetail(getDb(), id);
    expect(detail?.events.map((e) => [e.kind, e.personName])).toEqual([
      ["raised", null],
      ["acknowledged", lead.name],
      ["cleared", null],
      ["closed", null],
    ]);
    expect(detail?.events[1].comment).toBe("cleaned the bar");
  });

  it("active → cleared, unacknowledged → closed on acknowledgement", async () => {
    const id = await raise();
    await getDb().transaction((tx) => applyClearTransition(tx, id, { ts: Date.now() }));
    expect((await row(id)).state).toBe("cleared_unacked");
    const r = await ackAlertAction.run(engineer, { alertId: id });
    expect(r.ok).toBe(true);
    const a = await row(id);
    expect(a.state).toBe("closed");
    expect(a.closedTs).not.toBeNull();
    const closedAgain = await commentAlertAction.run(lead, { alertId: id, comment: "for the record" });
    expect(closedAgain.ok).toBe(true); // comments are welcome on a closed alert
    const shelveClosed = await shelveAlertAction.run(lead, { alertId: id, durationMin: 30, reason: "too late" });
    expect(!shelveClosed.ok && shelveClosed.status).toBe(409);
  });

  it("shelving needs a reason and a stated time (at most 7 days), and can be ended early", async () => {
    const id = await raise();
    const noReason = await shelveAlertAction.run(lead, { alertId: id, durationMin: 60, reason: " " });
    expect(!noReason.ok && noReason.status).toBe(400);
    expect(!noReason.ok && noReason.fieldErrors?.reason?.length).toBeGreaterThan(0);
    const tooLong = await shelveAlertAction.run(lead, { alertId: id, durationMin: 8 * 1440, reason: "holiday" });
    expect(!tooLong.ok && tooLong.status).toBe(400);
    const noTime = await shelveAlertAction.run(lead, { alertId: id, reason: "nuisance" });
    expect(!noTime.ok && noTime.status).toBe(400);

    const before = Date.now();
    const ok = await shelveAlertAction.run(lead, { alertId: id, durationMin: 120, reason: "Bar being cleaned this afternoon" });
    expect(ok.ok).toBe(true);
    let a = await row(id);
    expect(a.shelvedReason).toBe("Bar being cleaned this afternoon");
    expect(a.shelvedUntilTs! - before).toBeGreaterThanOrEqual(120 * 60_000);
    expect(a.shelvedUntilTs! - before).toBeLessThan(121 * 60_000);
    expect(a.state).toBe("active_unacked"); // shelving is beside the state, not a state

    const un = await unshelveAlertAction.run(lead, { alertId: id });
    expect(un.ok).toBe(true);
    a = await row(id);
    expect(a.shelvedUntilTs).toBeNull();
    const kinds = (await getDb().select().from(alertEvents).where(eq(alertEvents.alertId, id))).map((e) => [e.kind, e.personId]);
    expect(kinds).toEqual([
      ["raised", null],
      ["shelved", lead.personId],
      ["unshelved", lead.personId],
    ]);
  });

  it("a shelving runs out on its own", async () => {
    const id = await raise();
    await getDb().update(alerts).set({ shelvedUntilTs: Date.now() - 1000, shelvedReason: "short test" }).where(eq(alerts.id, id));
    const changes = await expireShelving(getDb(), Date.now());
    expect(changes.map((c) => c.alertId)).toContain(id);
    const a = await row(id);
    expect(a.shelvedUntilTs).toBeNull();
    const last = (await getDb().select().from(alertEvents).where(eq(alertEvents.alertId, id)).orderBy(desc(alertEvents.id)))[0];
    expect(last.kind).toBe("unshelved");
    expect(last.comment).toBe("Shelving ran out");
  });

  it("a new alert of a rule and place that is shelved now inherits the shelving", async () => {
    const first = await raise(Date.now() - 120_000, "point:3");
    await shelveAlertAction.run(lead, { alertId: first, durationMin: 60, reason: "new film, known to charge" });
    await getDb().transaction((tx) => applyClearTransition(tx, first, { ts: Date.now() - 60_000 }));
    const second = await raise(Date.now() - 30_000, "point:3");
    const a = await row(second);
    expect(a.shelvedReason).toBe("new film, known to charge");
    expect(a.shelvedUntilTs).toBe((await row(first)).shelvedUntilTs);
  });

  it("an unknown alert is a 404", async () => {
    const r = await ackAlertAction.run(lead, { alertId: 99_999_999 });
    expect(!r.ok && r.status).toBe(404);
  });
});

describe("limits: who may change them, and the audit trail", () => {
  it("a viewer and a shift lead get 403 for saving and replaying a rule", async () => {
    const body = { ruleId: 1, baseVersion: 1, kind: "charge_high", scope: { pointId: null, lineId: null, areaId: null }, severity: "medium", onDelayS: 10, offDelayS: 30, onlyWhileRunning: true, params: { limitKv: 11, clearKv: 9 } };
    for (const s of [viewer, lead]) {
      const save = await saveRuleAction.run(s, body);
      expect(!save.ok && save.status).toBe(403);
      const rep = await replayRuleAction.run(s, body);
      expect(!rep.ok && rep.status).toBe(403);
    }
  });

  it("refuses a clear level on the unsafe side and a negative delay, with the field named", async () => {
    const bad = await saveRuleAction.run(engineer, { kind: "charge_high", scope: { pointId: 2, lineId: null, areaId: null }, severity: "medium", onDelayS: -1, offDelayS: 30, onlyWhileRunning: true, params: { limitKv: 10, clearKv: 12 } });
    expect(!bad.ok && bad.status).toBe(400);
    expect(!bad.ok && bad.fieldErrors?.["params.clearKv"]?.[0]).toMatch(/below the limit/);
    expect(!bad.ok && bad.fieldErrors?.onDelayS?.[0]).toMatch(/negative/);
  });

  it("an engineer's change is a new version with an audit entry saying old → new", async () => {
    const [before] = await getDb().select().from(rules).where(eq(rules.id, 1));
    const r = await saveRuleAction.run(engineer, {
      ruleId: 1,
      baseVersion: before.currentVersion,
      kind: "charge_high",
      scope: { pointId: null, lineId: null, areaId: null },
      severity: "medium",
      onDelayS: 15,
      offDelayS: 30,
      onlyWhileRunning: true,
      params: { limitKv: 13, clearKv: 11 },
      comment: "fewer nuisance alerts",
    });
    expect(r.ok).toBe(true);
    const [after] = await getDb().select().from(rules).where(eq(rules.id, 1));
    expect(after.currentVersion).toBe(before.currentVersion + 1);
    const versions = await getDb().select().from(ruleVersions).where(eq(ruleVersions.ruleId, 1));
    expect(versions.map((v) => v.version).sort()).toEqual(Array.from({ length: after.currentVersion }, (_, i) => i + 1));
    const [audit] = await getDb().select().from(auditLog).where(and(eq(auditLog.subjectType, "rule"), eq(auditLog.subjectId, "1"))).orderBy(desc(auditLog.id)).limit(1);
    expect(audit.personId).toBe(engineer.personId);
    expect(audit.summary).toContain(`version ${before.currentVersion} → ${after.currentVersion}`);
    expect(audit.summary).toContain("limitKv 12");
    expect(audit.summary).toContain("limitKv 13");
    expect(audit.summary).toContain("fewer nuisance alerts");

    // saving over a version someone else saved meanwhile is refused
    const stale = await saveRuleAction.run(engineer, { ruleId: 1, baseVersion: before.currentVersion, kind: "charge_high", scope: { pointId: null, lineId: null, areaId: null }, severity: "medium", onDelayS: 10, offDelayS: 30, onlyWhileRunning: true, params: { limitKv: 12, clearKv: 10 } });
    expect(!stale.ok && stale.status).toBe(409);
  });

  it("an override at a point is a new rule, and a second one of the same kind and severity there is refused", async () => {
    const body = { kind: "charge_high", scope: { pointId: 4, lineId: null, areaId: null }, severity: "high", onDelayS: 5, offDelayS: 20, onlyWhileRunning: true, params: { limitKv: 25, clearKv: 22 } };
    const r = await saveRuleAction.run(engineer, body);
    expect(r.ok).toBe(true);
    const created = r.ok ? r.data : null;
    expect(created?.created).toBe(true);
    const [rule] = await getDb().select().from(rules).where(eq(rules.id, created!.ruleId));
    expect(rule.pointId).toBe(4);
    const dup = await saveRuleAction.run(engineer, body);
    expect(!dup.ok && dup.status).toBe(409);
  });
});

describe("the on-call roster", () => {
  it("only an admin may change it", async () => {
    const shift = { personId: engineer.personId, start: Date.now(), end: Date.now() + 3_600_000, escalationOrder: 4 };
    for (const s of [viewer, lead, engineer]) {
      const r = await addShiftAction.run(s, shift);
      expect(!r.ok && r.status).toBe(403);
      const set = await saveAlertingSettingsAction.run(s, { notifyMinSeverity: "high", notifyAfterMin: 1, escalateAfterMin: 1, digestHourLocal: 6 });
      expect(!set.ok && set.status).toBe(403);
    }
    const ok = await addShiftAction.run(admin, { ...shift, start: "2031-01-06T06:00", end: "2031-01-13T06:00", note: "test" });
    expect(ok.ok).toBe(true);
    const id = ok.ok ? (ok.data as { id: number }).id : 0;
    const [row] = await getDb().select().from(oncallShifts).where(eq(oncallShifts.id, id));
    // 2031-01-06 06:00 in London (UTC+0 in January)
    expect(row.startTs).toBe(Date.UTC(2031, 0, 6, 6, 0));
    const bad = await addShiftAction.run(admin, { ...shift, start: "2031-01-13T06:00", end: "2031-01-06T06:00" });
    expect(!bad.ok && bad.status).toBe(400);
    expect(!bad.ok && bad.fieldErrors?.end?.[0]).toMatch(/end after it starts/);
    const rm = await removeShiftAction.run(lead, { id });
    expect(!rm.ok && rm.status).toBe(403);
    expect((await removeShiftAction.run(admin, { id })).ok).toBe(true);
  });

  it("an admin sets when alerts are e-mailed (stored in seconds)", async () => {
    const r = await saveAlertingSettingsAction.run(admin, { notifyMinSeverity: "high", notifyAfterMin: "7", escalateAfterMin: "3", digestHourLocal: "5" });
    expect(r.ok).toBe(true);
    expect(await getAlertingSettings(getDb())).toEqual({ notifyMinSeverity: "high", notifyAfterS: 420, escalateAfterS: 180, digestHourLocal: 5 });
    await saveAlertingSettingsAction.run(admin, { notifyMinSeverity: "medium", notifyAfterMin: 5, escalateAfterMin: 5, digestHourLocal: 6 });
  });
});
