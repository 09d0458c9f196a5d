// Storms and worse alerts on call, through the real escalation round (ingest/alerts-escalation.ts)
// and a real MariaDB: four alerts of one hall raised within three minutes go out as one e-mail
// per on-call person and one text, each alert told once with its own event; the group escalates
// as one; an alert that got worse is told again at once, in an e-mail beginning "Worse:".
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, asc, eq, inArray, like, ne } from "drizzle-orm";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { alertEvents, alerts, areas, lines, oncallShifts, outbox, people, phoneOutbox, points, rules } from "@/db/schema";
import { addShift, saveAlertingSettings } from "@/db/queries/oncall";
import { loadPlantTopology, type AlertSubject } from "@/db/queries/topology";
import { runEscalation } from "@/ingest/alerts-escalation";
import { listAlertDeliveries } from "@/db/queries/alert-chart";
import { applyWorsened } from "@/db/queries/alert-transitions";
import { DEMO_PEOPLE } from "@/lib/demo-plant";

const NAME = "alerts_storm";
const MIN = 60_000;
let tdb: TestDatabase;
let subjects: ReadonlyMap<string, AlertSubject>;
let T0 = 0;
const ids: Record<string, number> = {};
const storm: number[] = [];
let otherHallAlert = 0;

const emailOf = (role: string) => DEMO_PEOPLE.find((p) => p.role === role)!.email;

async function personId(role: string) {
  return (await tdb.db.select({ id: people.id }).from(people).where(eq(people.email, DEMO_PEOPLE.find((p) => p.role === role)!.email)))[0].id;
}

const run = (nowMs: number) => runEscalation(tdb.db, nowMs, { appUrl: "https://stillfield.example.com", timeZone: "Europe/London", subjects });

async function raise(a: { kind: "charge_high" | "rh_low"; severity: "medium" | "high"; areaId: number; lineId: number | null; pointId: number | null; ts: number; peak: number }): Promise<number> {
  const [rule] = await tdb.db.select({ id: rules.id }).from(rules).where(eq(rules.kind, a.kind)).limit(1);
  const subjectKey = a.pointId !== null ? `point:${a.pointId}` : `area:${a.areaId}`;
  const [res] = await tdb.db.insert(alerts).values({ ruleId: rule.id, ruleVersion: 1, kind: a.kind, severity: a.severity, subjectKey, areaId: a.areaId, lineId: a.lineId, pointId: a.pointId, message: `test ${a.kind} ${a.peak}`, startTs: a.ts, peakValue: a.peak });
  return Number(res.insertId);
}

async function mails(prefix: string) {
  return tdb.db.select().from(outbox).where(like(outbox.dedupeKey, `${prefix}%`)).orderBy(asc(outbox.id));
}

beforeAll(async () => {
  tdb = await createTestDatabase(NAME, { seed: true });
  subjects = (await loadPlantTopology(tdb.db)).subjects;
  ids.engineer = await personId("engineer");
  ids.lead = await personId("shift_lead");
  ids.admin = await personId("admin");
  T0 = Math.floor(Date.now() / MIN) * MIN;
  // our own roster: two people at order 1 (the lead takes medium texts), one at order 2
  await tdb.db.delete(oncallShifts);
  for (const [who, order] of [["engineer", 1], ["lead", 1], ["admin", 2]] as const) {
    await addShift(tdb.db, { personId: ids[who], startTs: T0 - 3_600_000, endTs: T0 + 3 * 3_600_000, escalationOrder: order }, ids.admin);
  }
  await tdb.db.update(people).set({ phoneE164: null, smsSeverities: "", pushSeverities: "" });
  await tdb.db.update(people).set({ phoneE164: "+447700900131", smsSeverities: "high,medium" }).where(eq(people.id, ids.lead));
  await saveAlertingSettings(tdb.db, { notifyMinSeverity: "medium", notifyAfterS: 300, escalateAfterS: 300, digestHourLocal: 6 }, ids.admin);

  // a hall with a line of at least three points, and another hall
  const [press] = await tdb.db.select({ id: areas.id }).from(areas).orderBy(asc(areas.id)).limit(1);
  const [line] = await tdb.db.select({ id: lines.id }).from(lines).where(eq(lines.areaId, press.id)).orderBy(asc(lines.id)).limit(1);
  const pts = await tdb.db.select({ id: points.id }).from(points).where(eq(points.lineId, line.id)).orderBy(asc(points.id)).limit(3);
  expect(pts).toHaveLength(3);
  storm.push(await raise({ kind: "rh_low", severity: "medium", areaId: press.id, lineId: null, pointId: null, ts: T0, peak: 23.4 }));
  storm.push(await raise({ kind: "charge_high", severity: "medium", areaId: press.id, lineId: line.id, pointId: pts[0].id, ts: T0 + 40_000, peak: -14.2 }));
  storm.push(await raise({ kind: "charge_high", severity: "high", areaId: press.id, lineId: line.id, pointId: pts[1].id, ts: T0 + 80_000, peak: -21.5 }));
  storm.push(await raise({ kind: "charge_high", severity: "medium", areaId: press.id, lineId: line.id, pointId: pts[2].id, ts: T0 + 170_000, peak: 13.1 }));
  const [other] = await tdb.db.select({ id: areas.id }).from(areas).where(ne(areas.id, press.id)).limit(1);
  otherHallAlert = await raise({ kind: "rh_low", severity: "medium", areaId: other.id, lineId: null, pointId: null, ts: T0, peak: 24.9 });
}, 120_000);

afterAll(async () => {
  await tdb?.close();
});

describe("a storm on call", () => {
  it("four alerts of one hall within three minutes: one e-mail per on-call person and one text; each alert told once", async () => {
    expect((await run(T0 + 5 * MIN - 1000)).notified).toEqual([]);
    const r = await run(T0 + 5 * MIN);
    expect(new Set(r.notified.filter((n) => storm.includes(n.alertId)).map((n) => n.group)).size).toBe(1);

    const groupMails = await mails("group:");
    expect(groupMails.map((m) => m.toAddress).sort()).toEqual([emailOf("engineer"), emailOf("shift_lead")].sort());
    for (const m of groupMails) {
      expect(m.subject).toMatch(/^.+: RH 23 % and 3 points over on .+ \(4 alerts, high\)$/);
      for (const id of storm) expect(m.bodyText).toContain(`https://stillfield.example.com/alerts/${id}`);
      expect(m.bodyText).not.toContain(`/alerts/${otherHallAlert}`);
    }
    // no single e-mails for the storm's alerts; the other hall's alert on its own
    for (const id of storm) expect(await mails(`alert:${id}:`)).toEqual([]);
    expect(await mails(`alert:${otherHallAlert}:order:1:`)).toHaveLength(2);
    // one text, to the one person who takes medium texts
    const texts = await tdb.db.select().from(phoneOutbox).where(like(phoneOutbox.dedupeKey, "group:%"));
    expect(texts.map((t) => [t.channel, t.toAddress])).toEqual([["sms", "+447700900131"]]);
    expect(texts[0].body).toMatch(/^.+: RH 23 % and 3 points over on .+: 4 alerts: /);

    const rows = await tdb.db.select().from(alerts).where(inArray(alerts.id, storm));
    expect(rows.map((a) => a.notifiedLevel)).toEqual([1, 1, 1, 1]);
    expect(new Set(rows.map((a) => a.notifyGroup)).size).toBe(1);
    expect(rows[0].notifyGroup).toBe(groupMails[0].dedupeKey.split(":order:")[0].slice("group:".length));
    const events = await tdb.db.select().from(alertEvents).where(and(inArray(alertEvents.alertId, storm), eq(alertEvents.kind, "notified")));
    expect(events.map((e) => e.alertId).sort()).toEqual([...storm].sort());
    for (const e of events) expect(e.comment).toMatch(/sent together with 3 other alerts as ".+: RH 23 % and 3 points over on .+"$/);

    // the alert page's "who was told" of any alert of the group lists the group's messages
    const told = await listAlertDeliveries(tdb.db, storm[2], rows[0].notifyGroup);
    expect(told.map((d) => d.channel).sort()).toEqual(["email", "email", "sms"]);
    expect(await listAlertDeliveries(tdb.db, storm[2])).toEqual([]);

    // later rounds send nothing again
    expect((await run(T0 + 5 * MIN + 3000)).notified).toEqual([]);
    expect(await mails("group:")).toHaveLength(2);
  });

  it("escalates the group as one, to order 2, after escalateAfterS", async () => {
    expect((await run(T0 + 10 * MIN - 1000)).notified).toEqual([]);
    await run(T0 + 10 * MIN);
    const escalated = (await mails("group:")).filter((m) => m.dedupeKey.includes(":order:2:"));
    expect(escalated.map((m) => m.toAddress)).toEqual([emailOf("admin")]);
    expect(escalated[0].subject.startsWith("[Escalated] ")).toBe(true);
    const events = await tdb.db.select().from(alertEvents).where(and(inArray(alertEvents.alertId, storm), eq(alertEvents.kind, "escalated")));
    expect(events).toHaveLength(4);
  });

  it("an alert that got worse is told again at once, in an e-mail beginning 'Worse:'", async () => {
    const worsenedTs = T0 + 12 * MIN + 5000;
    const id = storm[1];
    // the live runner's step when a condition gets worse
    await tdb.db.transaction((tx) => applyWorsened(tx, id, { type: "escalate", ts: worsenedTs, kind: "charge_high", severity: "high", previousSeverity: "medium", peakValue: -22.8, message: "test charge_high -22.8" }));
    const r = await run(worsenedTs); // no notifyAfterS wait
    expect(r.notified.map((n) => n.alertId)).toEqual([id]);
    const worse = await mails(`alert:${id}:w${worsenedTs}:order:1:`);
    expect(worse.map((m) => m.toAddress).sort()).toEqual([emailOf("engineer"), emailOf("shift_lead")].sort());
    for (const m of worse) {
      expect(m.subject).toMatch(/^Worse: .+ \(now high, peak −22\.8 kV\)$/);
      expect(m.bodyText).toContain("now high, peak −22.8 kV");
    }
    const texts = await tdb.db.select().from(phoneOutbox).where(like(phoneOutbox.dedupeKey, `alert:${id}:w${worsenedTs}:%`));
    expect(texts).toHaveLength(1);
    expect(texts[0].title.startsWith("Worse: ")).toBe(true);
    const [row] = await tdb.db.select().from(alerts).where(eq(alerts.id, id));
    expect(row.notifiedLevel).toBe(1);
    // the rest of the storm is not told again
    const rest = await tdb.db.select({ level: alerts.notifiedLevel }).from(alerts).where(inArray(alerts.id, storm.filter((x) => x !== id)));
    expect(rest.map((x) => x.level)).toEqual([2, 2, 2]);
    // and its escalation counts from worsened_ts: order 2 five minutes later, not before
    expect((await run(worsenedTs + 5 * MIN - 1000)).notified.filter((n) => n.alertId === id)).toEqual([]);
    await run(worsenedTs + 5 * MIN);
    expect(await mails(`alert:${id}:w${worsenedTs}:order:2:`)).toHaveLength(1);
  });

  it("an alert that got worse before anybody was told is told at once, as itself, not 'Worse:'", async () => {
    const [third] = await tdb.db.select({ id: areas.id }).from(areas).orderBy(asc(areas.id)).limit(1).offset(2);
    const raisedTs = T0 + 30 * MIN;
    const id = await raise({ kind: "rh_low", severity: "medium", areaId: third.id, lineId: null, pointId: null, ts: raisedTs, peak: 28.9 });
    const worsenedTs = raisedTs + MIN; // four minutes before its first message would be due
    await tdb.db.transaction((tx) => applyWorsened(tx, id, { type: "escalate", ts: worsenedTs, kind: "rh_low", severity: "high", previousSeverity: "medium", peakValue: 24.1, message: "test rh_low 24.1" }));
    expect((await run(worsenedTs - 1000)).notified).toEqual([]);
    expect((await run(worsenedTs)).notified.map((n) => n.alertId)).toEqual([id]);
    const first = await mails(`alert:${id}:`);
    expect(first.map((m) => m.dedupeKey.replace(/:person:\d+$/, ""))).toEqual([`alert:${id}:order:1`, `alert:${id}:order:1`]);
    for (const m of first) expect(m.subject).toMatch(/^◆ Over: Humidity low — .+ \(high\)$/);
    // its escalation is not a "Worse:" message either: the first message already said how bad it was
    await run(worsenedTs + 5 * MIN);
    const second = await mails(`alert:${id}:`);
    expect(second.map((m) => m.dedupeKey.replace(/:person:\d+$/, ""))).toEqual([`alert:${id}:order:1`, `alert:${id}:order:1`, `alert:${id}:order:2`]);
    expect(second[2].subject).toMatch(/^\[Escalated\] ◆ Over: Humidity low/);
  });
});
