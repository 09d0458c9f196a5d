// Checks, cleaning, limits per kind, decay projection, neutralizer effect, the due list and its
// weekly e-mail, against the real test database; and the 403s of every equipment write action.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, eq, inArray, like } from "drizzle-orm";
import { closeDb, getDb } from "@/db/client";
import { checks, devices, equipmentEvents, neutralizers, outbox, people, rollup1m, settings } from "@/db/schema";
import { CHECK_LIMIT_SOURCES, getCheckLimits, recordCheck } from "@/db/queries/checks";
import { NEUTRALIZER_KINDS } from "@/lib/physics/neutralizer-kinds";
import { computeNeutralizerEffects, getNeutralizerDetail } from "@/db/queries/equipment";
import { lastCompletedShift } from "@/lib/plant-time";
import { getDueList } from "@/db/queries/due-list";
import { queueWeeklyDueListEmail } from "@/db/use-cases/due-list-email";
import { isoWeekKey } from "@/lib/mail/due-list-email";
import { addEquipmentNoteAction, createNeutralizerAction, markCleanedAction, updateNeutralizerAction, uploadFileAction } from "@/app/_server/actions/equipment";
import { recordCheckAction, saveCheckLimitsAction, sendDueListNowAction } from "@/app/_server/actions/checks";
import { createDeviceAction, rotateDeviceSecretAction, setDeviceEnabledAction, updateDeviceAction } from "@/app/_server/actions/devices";
import { previewImportAction, runImportAction } from "@/app/_server/actions/imports";
import type { SessionPerson } from "@/app/_server/session";
import { DEMO_PEOPLE } from "@/lib/demo-plant";
import { TZDate } from "@date-fns/tz";

const DAY = 86_400_000;
const TZ = "Europe/London";

async function sessionOf(role: string): Promise<SessionPerson> {
  const p = DEMO_PEOPLE.find((x) => x.role === role)!;
  const row = (await getDb().select({ id: people.id }).from(people).where(eq(people.email, p.email)))[0];
  return { personId: row.id, role: p.role, name: p.name, email: p.email };
}

async function neutralizerId(tag: string): Promise<number> {
  return (await getDb().select({ id: neutralizers.id }).from(neutralizers).where(eq(neutralizers.tag, tag)))[0].id;
}

/** "YYYY-MM-DDTHH:MM" in plant time, as a datetime-local input sends it. */
function localInput(ts: number): string {
  const d = new TZDate(ts, TZ);
  const p = (n: number) => String(n).padStart(2, "0");
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())}T${p(d.getHours())}:${p(d.getMinutes())}`;
}

let engineer: SessionPerson;

beforeAll(async () => {
  engineer = await sessionOf("engineer");
  await getDb().delete(settings).where(eq(settings.key, "check_limits"));
});
afterAll(async () => {
  await closeDb();
});

describe("verification limits per neutralizer kind", () => {
  it("each kind has its own decay default (common practice) and ±35 V offset (ANSI/ESD S20.20-2021), with editions named", async () => {
    const limits = await getCheckLimits(getDb());
    // lib/physics/neutralizer-kinds.ts: AC 2 s, pulsed/steady DC, air-assisted and nozzle 5 s, blower 10 s, passive cord 30 s, other 20 s
    const want = { ac_bar: 2, pulsed_dc_bar: 5, steady_dc_bar: 5, air_assisted_bar: 5, blower: 10, nozzle: 5, passive_cord: 30, other: 20 } as const;
    for (const [k, s] of Object.entries(want) as [keyof typeof want, number][]) {
      expect(limits.byKind[k]).toEqual({ maxDecayS: s, maxOffsetAbsV: 35, source: "default" });
    }
    // decay-time limits are user-defined in the test methods, with their editions
    expect(CHECK_LIMIT_SOURCES.maxDecayS).toMatch(/ANSI\/ESD STM3\.1-2015/);
    expect(CHECK_LIMIT_SOURCES.maxDecayS).toMatch(/IEC 61340-4-7:2017/);
    expect(CHECK_LIMIT_SOURCES.maxDecayS).toMatch(/user-defined/);
    // ±35 V offset from ANSI/ESD S20.20, written for electronics handling
    expect(CHECK_LIMIT_SOURCES.maxOffsetAbsV).toMatch(/±35 V.*ANSI\/ESD S20\.20-2021/);
    expect(CHECK_LIMIT_SOURCES.maxOffsetAbsV).toMatch(/electronic parts/);
    expect(CHECK_LIMIT_SOURCES.plate).toMatch(/20 pF on a 150 × 150 mm plate/);
  });

  it("a stored limit of a kind that no longer exists is ignored, the others are kept", async () => {
    const db = getDb();
    await db.insert(settings).values({ key: "check_limits", value: { byKind: { ionizing_bar: { maxDecayS: 20, maxOffsetAbsV: 35 }, blower: { maxDecayS: 8, maxOffsetAbsV: 30 }, nozzle: null } }, updatedAt: Date.now() });
    const limits = await getCheckLimits(db);
    expect(limits.byKind.blower).toEqual({ maxDecayS: 8, maxOffsetAbsV: 30, source: "plant" });
    expect(limits.byKind.nozzle.source).toBe("default");
    expect(limits.byKind.ac_bar).toEqual({ maxDecayS: 2, maxOffsetAbsV: 35, source: "default" });
    await db.delete(settings).where(eq(settings.key, "check_limits"));
  });
});

describe("recording a charged-plate check", () => {
  const base = { method: "charged_plate", plateDistanceMm: "25", plateCapacitancePf: "20", plateWidthMm: "150", plateLengthMm: "150", instrument: "Plate monitor PM-7", instrumentCalibratedOn: "2026-06-01" };

  it("passes when both decay times and the offset are within the AC bar's limits (2 s, ±35 V), and keeps the plate", async () => {
    const id = await neutralizerId("N-FLEXO-2-PRINT-EXIT");
    const r = await recordCheckAction.run(engineer, { ...base, neutralizerId: String(id), checkedAt: localInput(Date.now() - 3_600_000), decayPosS: "0,8", decayNegS: "1.1", offsetV: "-12" });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.data).toMatchObject({ passed: true, limits: { maxDecayS: 2, maxOffsetAbsV: 35, source: "default" }, stateChanged: false, plateNonStandard: false });
    expect(r.data!.parts.map((p) => p.pass)).toEqual([true, true, true]);
    const row = (await getDb().select().from(checks).where(eq(checks.id, r.data!.id)))[0];
    expect(row).toMatchObject({ passed: true, decayPosS: 0.8, decayNegS: 1.1, offsetV: -12, personId: engineer.personId, plateCapacitancePf: 20, plateWidthMm: 150, plateLengthMm: 150, plateDistanceMm: 25 });
    const ev = await getDb().select().from(equipmentEvents).where(eq(equipmentEvents.checkId, r.data!.id));
    expect(ev.map((e) => e.kind)).toEqual(["check"]);
  });

  it("fails on the positive polarity alone, and marks the bar as needing cleaning", async () => {
    const id = await neutralizerId("N-FLEXO-2-UNWIND");
    // an air-assisted bar: 5 s default
    const r = await recordCheckAction.run(engineer, { ...base, neutralizerId: id, checkedAt: localInput(Date.now() - 60_000), decayPosS: 6.5, decayNegS: 3, offsetV: 10 });
    expect(r.ok && r.data).toMatchObject({ passed: false, stateChanged: true });
    if (!r.ok) return;
    expect(r.data!.parts.map((p) => p.pass)).toEqual([false, true, true]);
    expect(r.data!.parts[0].reason).toBe("Positive decay 6.5 s is over the 5 s limit.");
    const n = (await getDb().select({ state: neutralizers.state }).from(neutralizers).where(eq(neutralizers.id, id)))[0];
    expect(n.state).toBe("needs_cleaning");
  });

  it("fails on the negative polarity alone", async () => {
    const id = await neutralizerId("N-FLEXO-2-REWIND");
    const r = await recordCheckAction.run(engineer, { ...base, neutralizerId: id, checkedAt: localInput(Date.now() - 60_000), decayPosS: 3, decayNegS: 25, offsetV: 0 });
    expect(r.ok && r.data!.parts.map((p) => p.pass)).toEqual([true, false, true]);
  });

  it("fails on the offset alone: −36 V is outside ±35 V, −35 V is inside", async () => {
    const id = await neutralizerId("N-LABELLER-1-DISPENSE");
    const out = await recordCheckAction.run(engineer, { ...base, neutralizerId: id, checkedAt: localInput(Date.now() - 120_000), decayPosS: 3, decayNegS: 3, offsetV: -36 });
    expect(out.ok && out.data!.parts.map((p) => p.pass)).toEqual([true, true, false]);
    expect(out.ok && out.data!.parts[2].reason).toBe("Offset -36 V is outside ±35 V.");
    const edge = await recordCheckAction.run(engineer, { ...base, neutralizerId: id, checkedAt: localInput(Date.now() - 60_000), decayPosS: 3, decayNegS: 3, offsetV: -35 });
    expect(edge.ok && edge.data!.passed).toBe(true);
  });

  it("refuses a check in the future and missing readings with field errors", async () => {
    const id = await neutralizerId("N-LABELLER-1-DISPENSE");
    const future = await recordCheckAction.run(engineer, { ...base, neutralizerId: id, checkedAt: localInput(Date.now() + 2 * DAY), decayPosS: 3, decayNegS: 3, offsetV: 0 });
    expect(future).toMatchObject({ ok: false, status: 400, fieldErrors: { checkedAt: ["The check cannot be in the future"] } });
    const missing = await recordCheckAction.run(engineer, { ...base, neutralizerId: id, checkedAt: localInput(Date.now()), decayPosS: "", decayNegS: "abc", offsetV: "" });
    expect(missing.ok).toBe(false);
    if (!missing.ok) expect(Object.keys(missing.fieldErrors ?? {}).sort()).toEqual(["decayNegS", "decayPosS", "offsetV"]);
  });

  it("limits are per kind: a blower limit of 10 s fails a blower at 12 s while a passive cord at 12 s passes", async () => {
    const form: Record<string, string> = {};
    for (const k of NEUTRALIZER_KINDS) Object.assign(form, { [`${k}.maxDecayS`]: "20", [`${k}.maxOffsetAbsV`]: "35" });
    Object.assign(form, { "blower.maxDecayS": "10", "blower.maxOffsetAbsV": "25" });
    expect((await saveCheckLimitsAction.run(engineer, form)).ok).toBe(true);
    const limits = await getCheckLimits(getDb());
    expect(limits.byKind.blower).toEqual({ maxDecayS: 10, maxOffsetAbsV: 25, source: "plant" });
    expect(limits.updatedByName).toBe(engineer.name);

    const blower = await neutralizerId("N-BAGGER-1-SEAL-EXIT");
    const bar = await neutralizerId("N-BAGGER-1-UNWIND");
    const b = await recordCheckAction.run(engineer, { ...base, neutralizerId: blower, checkedAt: localInput(Date.now() - 60_000), decayPosS: 12, decayNegS: 9, offsetV: 5 });
    expect(b.ok && b.data).toMatchObject({ passed: false, limits: { maxDecayS: 10, source: "plant" } });
    const ok = await recordCheckAction.run(engineer, { ...base, neutralizerId: bar, checkedAt: localInput(Date.now() - 60_000), decayPosS: 12, decayNegS: 9, offsetV: 5 });
    expect(ok.ok && ok.data!.passed).toBe(true);
    await getDb().delete(settings).where(eq(settings.key, "check_limits"));
  });
});

describe("cleaning", () => {
  it("the cleaned action resets the cleaning clock and puts a bar that needed cleaning back in service", async () => {
    const id = await neutralizerId("N-FLEXO-2-UNWIND");
    const before = (await getDb().select({ state: neutralizers.state }).from(neutralizers).where(eq(neutralizers.id, id)))[0];
    expect(before.state).toBe("needs_cleaning");
    const t0 = Date.now();
    const r = await markCleanedAction.run(engineer, { id: String(id), note: "Wiped emitters with IPA" });
    expect(r.ok && r.data).toMatchObject({ stateChanged: true });
    const n = (await getDb().select({ state: neutralizers.state, lastCleanedTs: neutralizers.lastCleanedTs }).from(neutralizers).where(eq(neutralizers.id, id)))[0];
    expect(n.state).toBe("in_service");
    expect(n.lastCleanedTs).toBeGreaterThanOrEqual(t0);
    const detail = await getNeutralizerDetail(getDb(), id);
    // the next cleaning is due one interval (7 days on a solvent press) after now
    expect(detail!.neutralizer.cleaningDueTs! - n.lastCleanedTs!).toBe(7 * DAY);
    expect(detail!.events.slice(0, 2).map((e) => e.kind).sort()).toEqual(["cleaned", "state_changed"]);
    expect(detail!.events.find((e) => e.kind === "cleaned")!.text).toBe("Cleaned. Wiped emitters with IPA");
  });
});

describe("decay-time trend and projection", () => {
  it("matches a hand-computed least-squares line", async () => {
    const id = await neutralizerId("N-SLITTER-1-KNIFE-EXIT");
    const now = Date.now();
    const t0 = now - 40 * DAY;
    // kind "other": its default decay limit is 20 s (lib/physics/neutralizer-kinds.ts)
    await getDb().update(neutralizers).set({ lastCleanedTs: t0 - DAY, kind: "other" }).where(eq(neutralizers.id, id));
    // checks at day 0, 10, 20, 30; the longer decay of each is 5, 7, 8, 11 s
    const pts: Array<[number, number, number]> = [
      [0, 5, 4.5],
      [10, 6.5, 7],
      [20, 8, 7.9],
      [30, 11, 10],
    ];
    for (const [day, pos, neg] of pts) {
      await recordCheck(getDb(), { neutralizerId: id, ts: t0 + day * DAY, method: "charged_plate", plateDistanceMm: 25, decayPosS: pos, decayNegS: neg, offsetV: 3, instrument: null, instrumentCalibratedOn: null, notes: null, personId: engineer.personId });
    }
    const detail = await getNeutralizerDetail(getDb(), id, now);
    const p = detail!.projection;
    // by hand: x̄ = 15 d, ȳ = 7.75 s; Sxy = (−15)(−2.75) + (−5)(−0.75) + 5(0.25) + 15(3.25) = 95;
    // Sxx = 225 + 25 + 25 + 225 = 500; slope = 95/500 = 0.19 s/day; intercept = 7.75 − 0.19·15 = 4.9 s
    expect(p.basis).toBe("since_cleaning");
    expect(p.points).toHaveLength(4);
    expect(p.slopeSPerDay).toBeCloseTo(0.19, 10);
    expect(p.interceptS).toBeCloseTo(4.9, 10);
    // the 20 s limit is reached (20 − 4.9) / 0.19 = 79.4737 days after the first check
    expect(p.dueTs! - t0).toBeCloseTo(((20 - 4.9) / 0.19) * DAY, -3);
    expect(new Date(p.dueTs!).toISOString().slice(0, 10)).toBe(new Date(t0 + 79.4737 * DAY).toISOString().slice(0, 10));
  });
});

describe("neutralizer effect from line data", () => {
  it("is 1 − |after|/|before| over the minutes the line ran, ignoring stopped minutes", async () => {
    const db = getDb();
    const id = await neutralizerId("N-GRAVURE-1-INFEED");
    const code = (c: string) => db.select({ id: devices.id }).from(devices).where(eq(devices.code, c)).then((r) => r[0].id);
    const [before, after, gateway] = await Promise.all([code("fm-gravure-1-unwind"), code("fm-gravure-1-infeed"), code("sg-gravure-1")]);
    const start = Math.floor((Date.now() - 3 * DAY) / 60_000) * 60_000;
    const rows: (typeof rollup1m.$inferInsert)[] = [];
    const add = (deviceId: number, channel: string, bucketTs: number, values: number[]) =>
      rows.push({ deviceId, channel, bucketTs, min: Math.min(...values), max: Math.max(...values), count: values.length, sum: values.reduce((s, v) => s + v, 0), sumSq: values.reduce((s, v) => s + v * v, 0) });
    // 60 running minutes: −10 kV before (the unwind), −2 kV after; then 30 stopped minutes at −1 kV / −1 kV
    for (let m = 0; m < 90; m++) {
      const ts = start + m * 60_000;
      const running = m < 60;
      add(before, "charge_kv", ts, running ? [-9, -11] : [-1]);
      add(after, "charge_kv", ts, running ? [-2.5, -1.5] : [-1]);
      add(gateway, "running", ts, running ? [1, 1] : [0, 0]);
    }
    await db.delete(rollup1m).where(and(inArray(rollup1m.deviceId, [before, after, gateway]), inArray(rollup1m.bucketTs, rows.map((r) => r.bucketTs))));
    await db.insert(rollup1m).values(rows);
    const window = { key: "test", label: "test", fromTs: start, toTs: start + 90 * 60_000 };
    const fig = (await computeNeutralizerEffects(db, [id], [window])).get(id)![0];
    // 1 − 2/10 = 0.8 (were the stopped minutes counted it would be 1 − 1.667/7 = 0.762)
    expect(fig.effect).toBeCloseTo(0.8, 12);
    expect(fig.runningMinutes).toBe(60);
    expect(fig.meanBeforeKv).toBeCloseTo(10, 12);
    expect(fig.meanAfterKv).toBeCloseTo(2, 12);

    // the first point of a line has no point before it
    const first = await neutralizerId("N-GRAVURE-1-UNWIND");
    expect((await computeNeutralizerEffects(db, [first], [window])).get(first)![0]).toMatchObject({ effect: null, reason: "No measuring point before it on the line." });
  });

  it("the last shift is the last complete one in plant time", () => {
    // 2026-07-01 15:30 BST = 14:30 Z; shifts 06/14/22 local → last complete: Early 06:00–14:00 BST
    const w = lastCompletedShift(Date.UTC(2026, 6, 1, 14, 30), { timeZone: TZ, shifts: [
      { name: "Early", start: "06:00" },
      { name: "Late", start: "14:00" },
      { name: "Night", start: "22:00" },
    ] });
    expect(w).toMatchObject({ name: "Early", startTs: Date.UTC(2026, 6, 1, 5), endTs: Date.UTC(2026, 6, 1, 13) });
    // 03:00 in winter: last complete is Late of the previous day (14:00–22:00 GMT)
    const n = lastCompletedShift(Date.UTC(2026, 0, 10, 3), { timeZone: TZ, shifts: [
      { name: "Early", start: "06:00" },
      { name: "Late", start: "14:00" },
      { name: "Night", start: "22:00" },
    ] });
    expect(n).toMatchObject({ name: "Late", startTs: Date.UTC(2026, 0, 9, 14), endTs: Date.UTC(2026, 0, 9, 22) });
  });
});

describe("due list and the weekly e-mail", () => {
  it("lists overdue and due-within-14-days items by hall, with the decay projection and effect columns", async () => {
    const db = getDb();
    const now = Date.now();
    const overdue = await neutralizerId("N-LAMINATOR-1-REWIND");
    const later = await neutralizerId("N-LAMINATOR-1-PRIMARY-UNWIND");
    // 14-day interval: cleaned 20 days ago → 6 days overdue; cleaned today → due in 14 days... and one far off
    await db.update(neutralizers).set({ lastCleanedTs: now - 20 * DAY, cleaningIntervalDays: 14 }).where(eq(neutralizers.id, overdue));
    await db.update(neutralizers).set({ lastCleanedTs: now, cleaningIntervalDays: 30 }).where(eq(neutralizers.id, later));
    const list = await getDueList(db, now);
    const items = list.halls.flatMap((h) => h.items);
    const item = items.find((i) => i.subjectId === overdue && i.what === "cleaning")!;
    expect(item).toMatchObject({ overdue: true, daysLeft: -6, areaName: "Converting Hall" });
    expect(items.find((i) => i.subjectId === later && i.what === "cleaning")).toBeUndefined();
    // every item is overdue or due within the horizon
    for (const i of items) expect(i.dueTs).toBeLessThanOrEqual(now + 14 * DAY);
    // halls in plant order, no hall twice
    const hallNames = list.halls.map((h) => h.areaName);
    expect(new Set(hallNames).size).toBe(hallNames.length);
    // the knife-exit bar from the projection test (cleaned 41 days ago, 14-day interval) is
    // overdue and carries its projected date
    const knife = items.find((i) => i.label === "N-SLITTER-1-KNIFE-EXIT" && i.what === "cleaning");
    expect(knife).toMatchObject({ overdue: true, areaName: "Converting Hall" });
    expect(knife!.projectedTs).toEqual(expect.any(Number));
    expect(list.overdueCount).toBe(items.filter((i) => i.overdue).length);
  });

  it("queues one e-mail per person on the maintenance list per ISO week, never twice", async () => {
    const db = getDb();
    const now = Date.now();
    await db.delete(outbox).where(like(outbox.dedupeKey, "due-list%"));
    const onList = await db.select({ id: people.id, email: people.email }).from(people).where(eq(people.onMaintenanceList, true));
    expect(onList.length).toBeGreaterThan(0);
    const first = await queueWeeklyDueListEmail(db, now);
    expect(first.queued).toBe(onList.length);
    const week = isoWeekKey(now, TZ);
    expect(week).toMatch(/^\d{4}-W\d{2}$/);
    const rows = await db.select().from(outbox).where(like(outbox.dedupeKey, "due-list:%"));
    expect(rows.map((r) => r.dedupeKey).sort()).toEqual(onList.map((p) => `due-list:${week}:${p.id}`).sort());
    expect(rows[0]).toMatchObject({ state: "pending", nextAttemptTs: now, toAddress: onList.find((p) => rows[0].dedupeKey.endsWith(`:${p.id}`))!.email });
    expect(rows[0].subject).toMatch(/^Stillfield due list: \d+ overdue, \d+ due within 14 days$/);
    expect(rows[0].bodyText).toContain("N-LAMINATOR-1-REWIND");
    expect(rows[0].bodyText).toMatch(/isolate the power unit/i);
    expect(rows[0].bodyHtml).toContain("Converting Hall");
    // the same week again: nothing new
    expect((await queueWeeklyDueListEmail(db, now + 3_600_000)).queued).toBe(0);
    // ISO week 2026-W01 starts on Monday 29 Dec 2025 (ISO 8601)
    expect(isoWeekKey(Date.UTC(2025, 11, 29, 12), TZ)).toBe("2026-W01");
  });

  it("'Send due list now' queues it at once for engineers", async () => {
    const r = await sendDueListNowAction.run(engineer, {});
    expect(r.ok && r.data).toMatchObject({ queued: expect.any(Number) });
    const rows = await getDb().select().from(outbox).where(like(outbox.dedupeKey, "due-list-now:%"));
    expect(rows.length).toBeGreaterThan(0);
  });
});

describe("decay slower than the unit's own baseline", () => {
  it("the laminator's rewind bar (seeded 1.3 s after cleaning, now 3.6 s) warns ×2.8 though it passes its 5 s limit", async () => {
    const db = getDb();
    const id = await neutralizerId("N-LAMINATOR-1-REWIND");
    const detail = (await getNeutralizerDetail(db, id))!;
    expect(detail.neutralizer.kind).toBe("pulsed_dc_bar");
    expect(detail.projection.basis).toBe("since_cleaning");
    // demo checks (lib/demo-plant.ts): baseline = first of four = max(1.2, 1.3) = 1.3 s; latest max(3.2, 3.6) = 3.6 s
    expect(detail.projection.slowdown).toMatchObject({ baselineS: 1.3, currentS: 3.6, warn: true });
    expect(detail.projection.slowdown!.factor).toBeCloseTo(3.6 / 1.3, 12);
    expect(detail.checks.every((c) => c.passed)).toBe(true);
    expect(detail.checks[0]).toMatchObject({ plateCapacitancePf: 20, plateWidthMm: 150, plateLengthMm: 150, plateDistanceMm: 300 });

    // a new check at 4.2 s: still a pass against 5 s. Five checks now → baseline = median of the first
    // ⌊4/2⌋ = 2 (1.3 and 1.7 s) = 1.5 s; 4.2 / 1.5 = ×2.8, said so on the result; a 12 pF plate is flagged
    const r = await recordCheckAction.run(engineer, {
      neutralizerId: id,
      checkedAt: localInput(Date.now() - 30_000),
      method: "charged_plate",
      plateCapacitancePf: "12",
      plateWidthMm: "100",
      plateLengthMm: "100",
      plateDistanceMm: "300",
      decayPosS: "3.9",
      decayNegS: "4.2",
      offsetV: "15",
    });
    expect(r.ok && r.data).toMatchObject({ passed: true, plateNonStandard: true, slowdown: { warn: true, currentS: 4.2, baselineS: 1.5 } });
  });
});

describe("editing a neutralizer", () => {
  it("an engineer adds an AC bar at 80 mm, gets the too-far warning (its 10–50 mm range), moves it and reports a fault; each is in its history", async () => {
    const db = getDb();
    const created = await createNeutralizerAction.run(engineer, {
      tag: "N-TEST-PASSIVE",
      kind: "ac_bar",
      lengthMm: "1200",
      powerUnit: "HV unit 7 kV",
      outputKv: "7",
      mountingDistanceMm: "80",
      pointId: "",
      installedOn: "2026-11-02",
      cleaningIntervalDays: "14",
      checkIntervalDays: "90",
      state: "in_service",
      notes: "",
    });
    expect(created.ok).toBe(true);
    if (!created.ok) return;
    expect(created.data!.warnings.map((w) => w.code).sort()).toEqual(["no_point", "too_far"]);
    const id = created.data!.id;
    const dup = await createNeutralizerAction.run(engineer, { tag: "N-TEST-PASSIVE", kind: "ac_bar", cleaningIntervalDays: 14, checkIntervalDays: 90, state: "in_service" });
    expect(dup).toMatchObject({ ok: false, status: 409 });

    const pointId = (await db.select({ pointId: neutralizers.pointId }).from(neutralizers).where(eq(neutralizers.tag, "N-LABELLER-1-LINER-UNWIND")))[0].pointId;
    const moved = await updateNeutralizerAction.run(engineer, {
      id,
      tag: "N-TEST-PASSIVE",
      kind: "ac_bar",
      airAssisted: "on",
      mountingDistanceMm: "80",
      pointId: String(pointId),
      installedOn: "2026-11-02",
      cleaningIntervalDays: "14",
      checkIntervalDays: "90",
      state: "faulty",
    });
    expect(moved.ok && moved.data).toMatchObject({ warnings: [] });
    expect((await addEquipmentNoteAction.run(engineer, { subjectType: "neutralizer", subjectId: id, text: "Arcing seen at the left end", kind: "fault" })).ok).toBe(true);
    const detail = await getNeutralizerDetail(db, id);
    expect(detail!.neutralizer).toMatchObject({ airAssisted: true, state: "faulty", pointId });
    expect(detail!.events.map((e) => e.kind).sort()).toEqual(["created", "edited", "fault", "fault", "moved"]);
    const due = await getDueList(db, Date.now());
    expect(due.halls.flatMap((h) => h.items).find((i) => i.subjectId === id && i.what === "repair")).toMatchObject({ overdue: false, daysLeft: 0 });
  });
});

describe("every write is refused to viewers and shift leads (403), device secrets to engineers", () => {
  const png = () => new File([new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])], "a.png", { type: "image/png" });
  const csv = () => new File(["Date,Tag,Decay +,Decay -,Offset\n2026-01-01 10:00,N-X,1,1,1\n"], "a.csv", { type: "text/csv" });

  for (const role of ["viewer", "shift_lead"]) {
    it(`${role}: every equipment, check, device, upload and import action answers 403 and changes nothing`, async () => {
      const s = await sessionOf(role);
      const id = await neutralizerId("N-GRAVURE-1-UNWIND");
      const deviceId = (await getDb().select({ id: devices.id }).from(devices).limit(1))[0].id;
      const before = await getDb().select({ n: checks.id }).from(checks);
      const results = [
        await createNeutralizerAction.run(s, { tag: `N-403-${role}`, kind: "ac_bar", cleaningIntervalDays: 14, checkIntervalDays: 90, state: "in_service" }),
        await updateNeutralizerAction.run(s, { id, tag: "N-GRAVURE-1-UNWIND", kind: "other", cleaningIntervalDays: 1, checkIntervalDays: 1, state: "removed" }),
        await markCleanedAction.run(s, { id }),
        await addEquipmentNoteAction.run(s, { subjectType: "neutralizer", subjectId: id, text: "x" }),
        await uploadFileAction.run(s, { file: png(), subjectType: "neutralizer", subjectId: id }),
        await recordCheckAction.run(s, { neutralizerId: id, checkedAt: localInput(Date.now()), decayPosS: 1, decayNegS: 1, offsetV: 1 }),
        await saveCheckLimitsAction.run(s, {}),
        await sendDueListNowAction.run(s, {}),
        await createDeviceAction.run(s, { code: `dev-403-${role}`, kind: "field_meter", label: "x" }),
        await rotateDeviceSecretAction.run(s, { id: deviceId }),
        await setDeviceEnabledAction.run(s, { id: deviceId, enabled: "false" }),
        await updateDeviceAction.run(s, { id: deviceId, label: "hijacked" }),
        await previewImportAction.run(s, { kind: "check_log", file: csv() }),
        await runImportAction.run(s, { kind: "check_log", file: csv() }),
      ];
      for (const r of results) expect(r).toMatchObject({ ok: false, status: 403 });
      expect(await getDb().select({ n: checks.id }).from(checks)).toHaveLength(before.length);
      expect((await getDb().select({ id: neutralizers.id }).from(neutralizers).where(eq(neutralizers.tag, `N-403-${role}`))).length).toBe(0);
      const d = (await getDb().select({ label: devices.label, enabled: devices.enabled }).from(devices).where(eq(devices.id, deviceId)))[0];
      expect(d.label).not.toBe("hijacked");
      expect(d.enabled).toBe(true);
    });
  }

  it("engineers may edit a device but not create one, rotate its secret or disable it", async () => {
    const deviceId = (await getDb().select({ id: devices.id }).from(devices).where(eq(devices.code, "fm-gravure-1-unwind")))[0].id;
    expect(await createDeviceAction.run(engineer, { code: "dev-eng", kind: "field_meter", label: "x" })).toMatchObject({ ok: false, status: 403 });
    expect(await rotateDeviceSecretAction.run(engineer, { id: deviceId })).toMatchObject({ ok: false, status: 403 });
    expect(await setDeviceEnabledAction.run(engineer, { id: deviceId, enabled: "false" })).toMatchObject({ ok: false, status: 403 });
    expect(await recordCheckAction.run(null, {})).toMatchObject({ ok: false, status: 401 });
  });
});
