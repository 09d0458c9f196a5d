// The due list: neutralizer cleanings and verifications, repairs and sensor calibrations that
// are overdue or due within the horizon (14 days), by hall. The view types are in
// lib/views/due-list.ts; the weekly e-mail of it is db/use-cases/due-list-email.ts.
import { and, eq, gte, inArray } from "drizzle-orm";
import type { Db } from "../client";
import { areas, checks } from "../schema";
import { DAY_MS } from "../../lib/vocabulary";
import { localDateOf } from "../../lib/plant-time";
import type { DueItem, DueList, DueWhat } from "../../lib/views/due-list";
import { getCheckLimits, projectDecay } from "./checks";
import { computeNeutralizerEffects, dateOnlyMs, getPlantSettings, listDevices, listNeutralizers, DEVICE_KIND_LABELS } from "./equipment";

export const DUE_HORIZON_DAYS = 14;

export async function getDueList(db: Db, nowMs: number, opts: { horizonDays?: number; withEffect?: boolean } = {}): Promise<DueList> {
  const horizonDays = opts.horizonDays ?? DUE_HORIZON_DAYS;
  const until = nowMs + horizonDays * DAY_MS;
  const plant = await getPlantSettings(db);
  const [ns, devs, limits] = await Promise.all([listNeutralizers(db), listDevices(db, nowMs), getCheckLimits(db)]);
  const items: DueItem[] = [];
  const push = (i: Omit<DueItem, "key" | "overdue" | "daysLeft" | "projectedTs" | "effectDay" | "neverDone"> & { neverDone?: boolean }) => {
    if (i.dueTs > until) return;
    items.push({
      ...i,
      neverDone: i.neverDone ?? false,
      key: `${i.subjectType}:${i.subjectId}:${i.what}`,
      overdue: i.dueTs < nowMs,
      daysLeft: i.dueTs >= nowMs ? Math.floor((i.dueTs - nowMs) / DAY_MS) : -Math.floor((nowMs - i.dueTs) / DAY_MS),
      projectedTs: null,
      effectDay: null,
    });
  };

  for (const n of ns) {
    if (n.state === "removed") continue;
    const where = n.lineName ? `${n.lineName} — ${n.pointName}` : "Not placed";
    const base = { subjectType: "neutralizer" as const, subjectId: n.id, label: n.tag, where, areaId: n.areaId, areaName: n.areaName ?? "Not placed" };
    if (n.state === "faulty") push({ ...base, what: "repair", dueTs: nowMs, reason: "Marked faulty." });
    const cleaningDue = n.state === "needs_cleaning" ? Math.min(n.cleaningDueTs ?? nowMs, nowMs) : (n.cleaningDueTs ?? nowMs);
    push({
      ...base,
      what: "cleaning",
      dueTs: cleaningDue,
      neverDone: n.state !== "needs_cleaning" && n.lastCleanedTs === null,
      reason:
        n.state === "needs_cleaning"
          ? "Marked as needing cleaning."
          : n.lastCleanedTs !== null
            ? `Every ${n.cleaningIntervalDays} days; last cleaned ${localDateOf(n.lastCleanedTs, plant.timeZone)}.`
            : `Every ${n.cleaningIntervalDays} days; no cleaning recorded.`,
    });
    push({
      ...base,
      what: "check",
      dueTs: n.checkDueTs ?? nowMs,
      neverDone: n.lastCheck === null,
      reason: n.lastCheck ? `Every ${n.checkIntervalDays} days; last checked ${localDateOf(n.lastCheck.ts, plant.timeZone)} (${n.lastCheck.passed ? "passed" : "failed"}).` : `Every ${n.checkIntervalDays} days; no check recorded.`,
    });
  }

  for (const d of devs) {
    if (!d.enabled || !d.calibrationDue) continue;
    const dueTs = dateOnlyMs(d.calibrationDue);
    if (dueTs === null) continue;
    const areaName = d.areaId !== null ? (ns.find((n) => n.areaId === d.areaId)?.areaName ?? null) : null;
    push({
      subjectType: "device",
      subjectId: d.id,
      label: d.code,
      where: `${DEVICE_KIND_LABELS[d.kind]} · ${d.placeLabel}`,
      areaId: d.areaId,
      areaName: areaName ?? (await hallName(db, d.areaId)),
      what: "calibration",
      dueTs,
      reason: `Calibration due ${d.calibrationDue}.`,
    });
  }

  // decay-time projection and the last day's effect for the neutralizers on the list
  const nIds = [...new Set(items.filter((i) => i.subjectType === "neutralizer").map((i) => i.subjectId))];
  if (nIds.length) {
    const checkRows = await db
      .select({ neutralizerId: checks.neutralizerId, ts: checks.ts, decayPosS: checks.decayPosS, decayNegS: checks.decayNegS })
      .from(checks)
      .where(and(inArray(checks.neutralizerId, nIds), gte(checks.ts, nowMs - 365 * DAY_MS)));
    const effects =
      opts.withEffect === false ? new Map() : await computeNeutralizerEffects(db, nIds, [{ key: "day", label: "Last 24 h", fromTs: nowMs - DAY_MS, toTs: nowMs }]);
    for (const id of nIds) {
      const n = ns.find((x) => x.id === id)!;
      const proj = projectDecay(
        checkRows.filter((c) => c.neutralizerId === id),
        limits.byKind[n.kind].maxDecayS,
        n.lastCleanedTs,
        nowMs,
      );
      const effect = effects.get(id)?.[0]?.effect ?? null;
      for (const item of items) {
        if (item.subjectType !== "neutralizer" || item.subjectId !== id) continue;
        item.projectedTs = proj.dueTs;
        item.effectDay = effect;
      }
    }
  }

  const order: DueWhat[] = ["repair", "cleaning", "check", "calibration"];
  items.sort((a, b) => a.dueTs - b.dueTs || order.indexOf(a.what) - order.indexOf(b.what) || a.label.localeCompare(b.label));
  const hallOrder = new Map<string, number>();
  ns.forEach((n) => {
    if (n.areaName && !hallOrder.has(n.areaName)) hallOrder.set(n.areaName, hallOrder.size);
  });
  const halls = new Map<string, DueList["halls"][number]>();
  for (const i of items) {
    let h = halls.get(i.areaName);
    if (!h) halls.set(i.areaName, (h = { areaId: i.areaId, areaName: i.areaName, items: [] }));
    h.items.push(i);
  }
  return {
    generatedTs: nowMs,
    horizonDays,
    halls: [...halls.values()].sort((a, b) => (hallOrder.get(a.areaName) ?? 99) - (hallOrder.get(b.areaName) ?? 99)),
    overdueCount: items.filter((i) => i.overdue).length,
    dueSoonCount: items.filter((i) => !i.overdue).length,
  };
}

async function hallName(db: Db, areaId: number | null): Promise<string> {
  if (areaId === null) return "Not placed";
  const row = (await db.select({ name: areas.name }).from(areas).where(eq(areas.id, areaId)).limit(1))[0];
  return row?.name ?? "Not placed";
}
