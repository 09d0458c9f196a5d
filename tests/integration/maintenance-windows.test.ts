// Planned work against a real MariaDB (seeded demo plant, its on-call roster): an alert raised
// inside a running maintenance window gets one "held" event and no mail; once the window ends,
// the alert that is still active is mailed as usual (the re-check) and the window's summary is
// stored; a bar's window holds the alerts of the point it serves and nothing else.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, eq, like, ne } from "drizzle-orm";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { alertEvents, alerts, lines, maintenanceWindows, neutralizers, outbox, people, points, rules } from "@/db/schema";
import { endMaintenanceWindow, extendMaintenanceWindow, listLineWindows, listMaintenanceWindows, openMaintenanceWindow } from "@/db/queries/maintenance-windows";
import { listNotifyCandidates } from "@/db/queries/alert-notify-candidates";
import { heldByWindowValue, runMaintenanceRound } from "@/db/queries/maintenance-round";
import { loadPlantTopology, type AlertSubject } from "@/db/queries/topology";
import { runEscalation } from "@/ingest/alerts-escalation";
import { buildHandoverForWindow } from "@/db/use-cases/handover-report";
import { handoverText } from "@/lib/mail/handover-email";
import { STATE_SYMBOLS, STATE_WORDS } from "@/lib/vocabulary";

const MIN = 60_000;
const HOUR = 60 * MIN;
let tdb: TestDatabase;
let subjects: ReadonlyMap<string, AlertSubject>;
let engineerId = 0;
let ruleId = 0;
let seq = 0;

beforeAll(async () => {
  tdb = await createTestDatabase("maintenance", { seed: true });
  subjects = (await loadPlantTopology(tdb.db)).subjects;
  [{ id: engineerId }] = await tdb.db.select({ id: people.id }).from(people).where(eq(people.email, "engineer@harrowfen.example"));
  [{ id: ruleId }] = await tdb.db.select({ id: rules.id }).from(rules).limit(1);
}, 120_000);

afterAll(async () => {
  await tdb?.close();
});

/** A high alert at a point (its hall and line filled in as the engine does), with a message we can find in mail bodies. */
async function raiseAt(pointId: number, startTs: number, opts: { endTs?: number } = {}): Promise<{ id: number; marker: string }> {
  const [p] = await tdb.db.select({ lineId: points.lineId, areaId: lines.areaId }).from(points).innerJoin(lines, eq(lines.id, points.lineId)).where(eq(points.id, pointId));
  const marker = `Charge 31 kV marker-${++seq}-${Date.now() % 100_000}`;
  const [res] = await tdb.db.insert(alerts).values({
    ruleId,
    ruleVersion: 1,
    kind: "charge_high",
    severity: "high",
    subjectKey: `point:${pointId}`,
    areaId: p.areaId,
    lineId: p.lineId,
    pointId,
    state: opts.endTs ? "cleared_unacked" : "active_unacked",
    message: marker,
    startTs,
    endTs: opts.endTs ?? null,
    peakValue: 31,
  });
  return { id: Number(res.insertId), marker };
}

const mailsAbout = async (marker: string) => (await tdb.db.select({ id: outbox.id }).from(outbox).where(like(outbox.bodyText, `%${marker}%`))).length;
const heldEvents = async (alertId: number) => tdb.db.select({ comment: alertEvents.comment, value: alertEvents.value }).from(alertEvents).where(and(eq(alertEvents.alertId, alertId), eq(alertEvents.kind, "held")));
const escalate = (nowMs: number) => runEscalation(tdb.db, nowMs, { appUrl: "http://stillfield.test", timeZone: "Europe/London", subjects });

describe("maintenance windows", () => {
  it("holds an alert raised inside a running window (one held event, no mail), then mails it after the end and stores the summary", async () => {
    const [line, other] = await tdb.db.select({ id: lines.id, areaId: lines.areaId }).from(lines).orderBy(lines.id).limit(2);
    const [inside] = await tdb.db.select({ id: points.id }).from(points).where(eq(points.lineId, line.id)).limit(1);
    const [outside] = await tdb.db.select({ id: points.id }).from(points).where(eq(points.lineId, other.id)).limit(1);
    expect(other.id).not.toBe(line.id);

    const t0 = Math.ceil(Date.now() / MIN) * MIN;
    const windowId = await openMaintenanceWindow(tdb.db, { targetKind: "line", targetId: line.id, ownerId: engineerId, reason: "Cleaning bars at the unwind", startTs: t0, endTs: t0 + 2 * HOUR, extendReason: null }, engineerId, t0);
    const held = await raiseAt(inside.id, t0 + MIN);
    const cleared = await raiseAt(inside.id, t0 + 2 * MIN, { endTs: t0 + 20 * MIN });
    const control = await raiseAt(outside.id, t0 + MIN);

    // 30 min in: well past the 5 min before on call is told (db/queries/oncall.ts defaults)
    const r1 = await escalate(t0 + 30 * MIN);
    expect(r1.notified.map((n) => n.alertId)).toContain(control.id);
    expect(r1.notified.map((n) => n.alertId)).not.toContain(held.id);
    expect(await mailsAbout(control.marker)).toBeGreaterThan(0);
    expect(await mailsAbout(held.marker)).toBe(0);
    const events = await heldEvents(held.id);
    expect(events).toHaveLength(1);
    expect(events[0].value).toBe(heldByWindowValue(windowId));
    expect(events[0].comment).toContain("Planned work: Cleaning bars at the unwind");
    expect(events[0].comment).toMatch(/until \d\d:\d\d/);
    expect(await heldEvents(control.id)).toHaveLength(0);

    // a second round adds nothing: held once
    await escalate(t0 + 31 * MIN);
    expect(await heldEvents(held.id)).toHaveLength(1);
    expect(await mailsAbout(held.marker)).toBe(0);
    const [w] = await tdb.db.select({ summary: maintenanceWindows.summary }).from(maintenanceWindows).where(eq(maintenanceWindows.id, windowId));
    expect(w.summary).toBeNull();

    // after the end: the still-active alert is mailed as usual, the summary is stored
    const r2 = await escalate(t0 + 2 * HOUR + MIN);
    expect(r2.notified.map((n) => n.alertId)).toContain(held.id);
    expect(await mailsAbout(held.marker)).toBeGreaterThan(0);
    expect(await mailsAbout(cleared.marker)).toBe(0);
    const [after] = await tdb.db.select({ summary: maintenanceWindows.summary, summarizedTs: maintenanceWindows.summarizedTs }).from(maintenanceWindows).where(eq(maintenanceWindows.id, windowId));
    expect(after.summarizedTs).toBe(t0 + 2 * HOUR + MIN);
    expect(after.summary).toContain("Cleaning bars at the unwind");
    expect(after.summary).toContain("2 alerts were recorded without notice, 1 cleared by its end; 1 still active");

    // the handover of a shift overlapping it lists it, with owner, reason and summary
    const shift = { name: "Test", index: 0, date: "2026-01-01", startTs: t0 - HOUR, endTs: t0 + 7 * HOUR, timeZone: "Europe/London" };
    const handover = await buildHandoverForWindow(tdb.db, shift, "Harrow Fen Packaging", t0 + 3 * HOUR);
    const listed = handover.maintenance?.find((m) => m.id === windowId);
    expect(listed).toMatchObject({ reason: "Cleaning bars at the unwind", ownerName: expect.any(String), summary: after.summary, targetName: expect.any(String) });
    const mail = handoverText(handover, { symbols: STATE_SYMBOLS, words: STATE_WORDS });
    expect(mail).toContain("PLANNED WORK");
    expect(mail).toContain(`Cleaning bars at the unwind (owner ${listed!.ownerName})`);
    expect(mail).toContain(after.summary!);
    const outsideShift = await buildHandoverForWindow(tdb.db, { ...shift, startTs: t0 + 3 * HOUR, endTs: t0 + 11 * HOUR }, "Harrow Fen Packaging", t0 + 12 * HOUR);
    expect(outsideShift.maintenance?.some((m) => m.id === windowId)).toBe(false);
    expect(handoverText(outsideShift, { symbols: STATE_SYMBOLS, words: STATE_WORDS })).not.toContain("Cleaning bars at the unwind");
  });

  it("a bar's window holds the alerts of the point it serves, not those of the line's other points; ending it early lets them through", async () => {
    const [bar] = await tdb.db.select({ id: neutralizers.id, pointId: neutralizers.pointId }).from(neutralizers).where(ne(neutralizers.state, "removed")).limit(1);
    expect(bar.pointId).not.toBeNull();
    const [served] = await tdb.db.select({ lineId: points.lineId }).from(points).where(eq(points.id, bar.pointId!));
    const [otherPoint] = await tdb.db.select({ id: points.id }).from(points).where(and(eq(points.lineId, served.lineId), ne(points.id, bar.pointId!))).limit(1);

    const t0 = Math.ceil(Date.now() / MIN) * MIN + 10 * HOUR; // clear of the first test's window
    const windowId = await openMaintenanceWindow(tdb.db, { targetKind: "neutralizer", targetId: bar.id, ownerId: engineerId, reason: "Replacing emitter pins", startTs: t0, endTs: t0 + HOUR, extendReason: null }, engineerId, t0);
    const atBar = await raiseAt(bar.pointId!, t0 + MIN);
    const elsewhere = await raiseAt(otherPoint.id, t0 + MIN);
    const ids = async (nowMs: number) => (await listNotifyCandidates(tdb.db, ["high"], nowMs, nowMs)).map((c) => c.id);

    expect(await ids(t0 + 10 * MIN)).toContain(elsewhere.id);
    expect(await ids(t0 + 10 * MIN)).not.toContain(atBar.id);
    const round = await runMaintenanceRound(tdb.db, t0 + 10 * MIN);
    expect(round.held).toContainEqual({ alertId: atBar.id, windowId });
    expect(round.held.map((h) => h.alertId)).not.toContain(elsewhere.id);

    // the line chart's query finds the bar's window, with the point it serves
    const onLine = await listLineWindows(tdb.db, { lineId: served.lineId, fromTs: t0, toTs: t0 + HOUR });
    expect(onLine.find((w) => w.id === windowId)?.pointId).toBe(bar.pointId);

    await endMaintenanceWindow(tdb.db, windowId, engineerId, t0 + 15 * MIN);
    expect(await ids(t0 + 16 * MIN)).toContain(atBar.id);
    const { recent } = await listMaintenanceWindows(tdb.db, t0 + 16 * MIN);
    expect(recent.find((w) => w.id === windowId)?.endedEarlyTs).toBe(t0 + 15 * MIN);
  });

  it("refuses a window longer than 12 h without a reason, and an extension that does not end later", async () => {
    const [line] = await tdb.db.select({ id: lines.id }).from(lines).limit(1);
    const t0 = Math.ceil(Date.now() / MIN) * MIN + 40 * HOUR;
    const base = { targetKind: "line" as const, targetId: line.id, ownerId: engineerId, reason: "Press rebuild", startTs: t0 };
    await expect(openMaintenanceWindow(tdb.db, { ...base, endTs: t0 + 13 * HOUR, extendReason: null }, engineerId, t0)).rejects.toMatchObject({ status: 400, fieldErrors: { extendReason: [expect.any(String)] } });
    await expect(openMaintenanceWindow(tdb.db, { ...base, startTs: t0 - HOUR, endTs: t0 + HOUR, extendReason: null }, engineerId, t0)).rejects.toMatchObject({ status: 400 });
    const id = await openMaintenanceWindow(tdb.db, { ...base, endTs: t0 + 13 * HOUR, extendReason: "Two shifts of work" }, engineerId, t0);
    await expect(extendMaintenanceWindow(tdb.db, id, t0 + 12 * HOUR, "Not longer", engineerId, t0 + HOUR)).rejects.toMatchObject({ status: 400 });
    await extendMaintenanceWindow(tdb.db, id, t0 + 20 * HOUR, "Parts arrive late", engineerId, t0 + HOUR);
    const [w] = await tdb.db.select({ endTs: maintenanceWindows.endTs, extendReason: maintenanceWindows.extendReason }).from(maintenanceWindows).where(eq(maintenanceWindows.id, id));
    expect(w).toEqual({ endTs: t0 + 20 * HOUR, extendReason: "Parts arrive late" });
  });
});
