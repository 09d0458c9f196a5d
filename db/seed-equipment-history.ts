// A few months of maintenance records for the demo neutralizers (invented, like the plant), so
// the due list and the equipment compliance report look like a running plant's:
// - cleanings on each bar's schedule going back HISTORY_DAYS, ending at the cleaning the seed
//   recorded (db/seed.ts), by the engineer or the on-call engineer;
// - a passing charged-plate check on each bar the seed gave none (lib/demo-plant.ts DEMO_CHECKS
//   tells the story of the others), two of them over their 90-day interval, so the report has
//   something overdue;
// - one bar, the Slitter-Rewinder's rewind, failing its check (slow decay), cleaned the same
//   morning and passing the re-check.
// Written once per database (marker in settings), the demo plant only. Checks are judged
// against their kind's default limits (lib/physics/neutralizer.ts), like a check recorded in the app.
import { eq, inArray } from "drizzle-orm";
import type { Db } from "./client";
import { checks, equipmentEvents, neutralizers, settings } from "./schema";
import { DEMO_CHECKS, DEMO_LINES, neutralizerTag } from "../lib/demo-plant";
import { defaultCheckLimits, judgeCheck, STANDARD_PLATE } from "../lib/physics/neutralizer";
import { DAY_MS } from "../lib/vocabulary/time";
import { loadDemoResponders } from "./seed-alert-history";

const MARKER = "seed.demo_equipment_history";
const HISTORY_DAYS = 120;
const HOUR = 3_600_000;
const INSTRUMENT = "Charged-plate monitor CPM-1 (demo)";

/** The bar that fails its check and is fixed by a cleaning, and how many days ago. */
export const FAILED_THEN_FIXED = { tag: neutralizerTag("slitter-1", "rewind"), daysAgo: 18 } as const;

type CheckValues = { decayPosS: number; decayNegS: number; offsetV: number; plateDistanceMm: number };

export async function seedDemoEquipmentHistory(db: Db, nowMs: number): Promise<{ seeded: boolean; checks: number; cleanings: number }> {
  const none = { seeded: false, checks: 0, cleanings: 0 };
  if ((await db.select({ key: settings.key }).from(settings).where(eq(settings.key, MARKER))).length > 0) return none;
  const tags = DEMO_LINES.flatMap((l) => l.points.map((p) => ({ tag: neutralizerTag(l.slug, p.slug), key: `${l.slug}/${p.slug}` })));
  const rows = await db
    .select({ id: neutralizers.id, tag: neutralizers.tag, kind: neutralizers.kind, mountingDistanceMm: neutralizers.mountingDistanceMm, cleaningIntervalDays: neutralizers.cleaningIntervalDays, lastCleanedTs: neutralizers.lastCleanedTs })
    .from(neutralizers)
    .where(inArray(neutralizers.tag, tags.map((t) => t.tag)));
  const people = await loadDemoResponders(db);
  if (rows.length === 0 || people === null) return none; // not the demo plant
  const keyOfTag = new Map(tags.map((t) => [t.tag, t.key]));

  let nChecks = 0;
  let nCleanings = 0;
  await db.transaction(async (tx) => {
    const addCheck = async (n: (typeof rows)[number], ts: number, v: CheckValues, personId: number, notes: string | null) => {
      const limits = defaultCheckLimits(n.kind);
      const j = judgeCheck(v, limits);
      const [res] = await tx.insert(checks).values({
        neutralizerId: n.id,
        ts,
        method: "charged_plate",
        plateDistanceMm: v.plateDistanceMm,
        plateCapacitancePf: STANDARD_PLATE.capacitancePf,
        plateWidthMm: STANDARD_PLATE.widthMm,
        plateLengthMm: STANDARD_PLATE.lengthMm,
        decayPosS: v.decayPosS,
        decayNegS: v.decayNegS,
        offsetV: v.offsetV,
        instrument: INSTRUMENT,
        passed: j.pass,
        failReasons: j.failures.join(" ").slice(0, 300) || null,
        limitsUsed: JSON.stringify({ ...limits, source: "default" }),
        personId,
        notes,
      });
      await tx.insert(equipmentEvents).values({ subjectType: "neutralizer", subjectId: n.id, ts, kind: "check", personId, text: `${j.pass ? "Passed" : "Failed"} charged-plate check.`, checkId: res.insertId });
      nChecks++;
      return { pass: j.pass, checkId: res.insertId };
    };
    const cleanings: (typeof equipmentEvents.$inferInsert)[] = [];

    for (const [i, n] of rows.entries()) {
      const limits = defaultCheckLimits(n.kind);
      // cleanings on schedule, back from the one the seed recorded
      const last = n.lastCleanedTs ?? nowMs;
      for (let k = 1, ts = last - n.cleaningIntervalDays * DAY_MS; ts > nowMs - HISTORY_DAYS * DAY_MS; k++, ts -= n.cleaningIntervalDays * DAY_MS) {
        const at = ts + ((i * 7 + k * 3) % 9) * HOUR; // not every clean at the same hour
        cleanings.push({ subjectType: "neutralizer", subjectId: n.id, ts: at, kind: "cleaned", personId: k % 3 === 0 ? people.oncall : people.engineer, text: "Cleaned." });
      }
      if (n.tag === FAILED_THEN_FIXED.tag) continue;
      if ((DEMO_CHECKS[keyOfTag.get(n.tag) ?? ""] ?? []).length > 0) continue; // the seed's own checks tell its story
      // a passing check at a comfortable share of the kind's limit; two bars over their interval
      const daysAgo = i % 7 === 3 ? 96 + i : 12 + ((i * 17) % 70);
      const share = 0.3 + ((i * 13) % 20) / 100;
      await addCheck(
        n,
        nowMs - daysAgo * DAY_MS + 10 * HOUR,
        { decayPosS: round(limits.maxDecayS * share), decayNegS: round(limits.maxDecayS * (share + 0.05)), offsetV: ((i * 7) % 23) - 11, plateDistanceMm: n.mountingDistanceMm ?? 30 },
        i % 2 === 0 ? people.engineer : people.oncall,
        null,
      );
    }

    // the failing check, the cleaning that fixed it, the passing re-check
    const bad = rows.find((n) => n.tag === FAILED_THEN_FIXED.tag);
    if (bad) {
      const limits = defaultCheckLimits(bad.kind);
      const t0 = nowMs - FAILED_THEN_FIXED.daysAgo * DAY_MS + 9 * HOUR;
      const distance = bad.mountingDistanceMm ?? 30;
      const failed = await addCheck(
        bad,
        t0,
        { decayPosS: round(limits.maxDecayS * 1.6), decayNegS: round(limits.maxDecayS * 1.8), offsetV: 19, plateDistanceMm: distance },
        people.engineer,
        "Slow both ways. Emitter pins furred with slitting dust.",
      );
      await tx.insert(equipmentEvents).values({ subjectType: "neutralizer", subjectId: bad.id, ts: t0, kind: "state_changed", personId: people.engineer, text: "In service → needs cleaning (failed check).", checkId: failed.checkId });
      cleanings.push({ subjectType: "neutralizer", subjectId: bad.id, ts: t0 + 2 * HOUR, kind: "cleaned", personId: people.engineer, text: "Cleaned. Brushed the pins and wiped the bar down; earth lead re-tightened." });
      cleanings.push({ subjectType: "neutralizer", subjectId: bad.id, ts: t0 + 2 * HOUR, kind: "state_changed", personId: people.engineer, text: "Needs cleaning → in service (cleaned)." });
      await addCheck(bad, t0 + 3 * HOUR, { decayPosS: round(limits.maxDecayS * 0.4), decayNegS: round(limits.maxDecayS * 0.45), offsetV: 4, plateDistanceMm: distance }, people.engineer, "Re-check after cleaning.");
    }
    for (let k = 0; k < cleanings.length; k += 500) await tx.insert(equipmentEvents).values(cleanings.slice(k, k + 500));
    nCleanings = cleanings.filter((c) => c.kind === "cleaned").length;
    await tx.insert(settings).values({ key: MARKER, value: { at: nowMs }, updatedAt: nowMs });
  });
  return { seeded: true, checks: nChecks, cleanings: nCleanings };
}

const round = (v: number) => Math.round(v * 100) / 100;
