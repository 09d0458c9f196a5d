// The due list: neutralizer cleanings and verifications, repairs and sensor calibrations that
// are overdue or due within the horizon (14 days), by hall; and the weekly e-mail of it to the
// people on the maintenance list, queued in the outbox (the mailer loop sends it).
import { and, eq, gte, inArray } from "drizzle-orm";
import { getISOWeek, getISOWeekYear } from "date-fns";
import { TZDate } from "@date-fns/tz";
import type { Db } from "../client";
import { getEnv } from "../env";
import { areas, checks, outbox, people } from "../schema";
import { getCheckLimits, projectDecay } from "./checks";
import { computeNeutralizerEffects, dateOnlyMs, getPlantSettings, listDevices, listNeutralizers, DEVICE_KIND_LABELS } from "./equipment";

const DAY_MS = 86_400_000;
export const DUE_HORIZON_DAYS = 14;

export type DueWhat = "cleaning" | "check" | "repair" | "calibration";

export const DUE_WHAT_LABELS: Record<DueWhat, string> = {
  cleaning: "Cleaning",
  check: "Verification (charged plate)",
  repair: "Repair (marked faulty)",
  calibration: "Sensor calibration",
};

export type DueItem = {
  key: string;
  subjectType: "neutralizer" | "device";
  subjectId: number;
  label: string;
  where: string;
  areaId: number | null;
  areaName: string;
  what: DueWhat;
  dueTs: number;
  overdue: boolean;
  /** whole days until due (negative: whole days overdue; 0 with overdue = less than a day late) */
  daysLeft: number;
  reason: string;
  /** never done since installation (or never recorded): due from the installation date */
  neverDone: boolean;
  /** decay-time projection: when the trend reaches the limit ("cleaning likely due around …") */
  projectedTs: number | null;
  /** effect over the last 24 h (1 − |after|/|before|), null when unknown */
  effectDay: number | null;
};

export type DueList = {
  generatedTs: number;
  horizonDays: number;
  halls: { areaId: number | null; areaName: string; items: DueItem[] }[];
  overdueCount: number;
  dueSoonCount: number;
};

function fmtDate(ts: number, timeZone: string): string {
  const d = new TZDate(ts, timeZone);
  return `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, "0")}-${String(d.getDate()).padStart(2, "0")}`;
}

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
            ? `Every ${n.cleaningIntervalDays} days; last cleaned ${fmtDate(n.lastCleanedTs, plant.timeZone)}.`
            : `Every ${n.cleaningIntervalDays} days; no cleaning recorded.`,
    });
    push({
      ...base,
      what: "check",
      dueTs: n.checkDueTs ?? nowMs,
      neverDone: n.lastCheck === null,
      reason: n.lastCheck ? `Every ${n.checkIntervalDays} days; last checked ${fmtDate(n.lastCheck.ts, plant.timeZone)} (${n.lastCheck.passed ? "passed" : "failed"}).` : `Every ${n.checkIntervalDays} days; no check recorded.`,
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

// ---------------------------------------------------------------------------------------------
// the e-mail

/** ISO 8601 week of `nowMs` in the plant's time zone, e.g. "2026-W49". */
export function isoWeekKey(nowMs: number, timeZone: string): string {
  const d = new TZDate(nowMs, timeZone);
  return `${getISOWeekYear(d)}-W${String(getISOWeek(d)).padStart(2, "0")}`;
}

function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);
}

const CAUTION =
  "Caution: neutralizer power units carry several kilovolts. Isolate the power unit and follow the plant's lockout procedure before cleaning or touching emitters. Stillfield is a record-keeping aid, not a safety system.";

export function formatDueListEmail(list: DueList, timeZone: string, appUrl: string): { subject: string; text: string; html: string } {
  const total = list.overdueCount + list.dueSoonCount;
  const subject =
    total === 0
      ? "Stillfield due list: nothing due in the next 14 days"
      : `Stillfield due list: ${list.overdueCount} overdue, ${list.dueSoonCount} due within ${list.horizonDays} days`;
  const link = `${appUrl.replace(/\/$/, "")}/checks`;
  const status = (i: DueItem) =>
    i.overdue ? (i.neverDone ? "◆ NEVER DONE" : i.daysLeft < 0 ? `◆ OVERDUE ${-i.daysLeft} d` : "◆ OVERDUE") : i.daysLeft === 0 ? "▲ due today" : `▲ due in ${i.daysLeft} d`;
  const textLines: string[] = [subject, "", `Generated ${fmtDate(list.generatedTs, timeZone)}. Open the list: ${link}`, ""];
  const htmlParts: string[] = [
    `<p style="font-family:sans-serif">${escapeHtml(subject)}.<br>Generated ${fmtDate(list.generatedTs, timeZone)}. <a href="${escapeHtml(link)}">Open the due list in Stillfield</a>.</p>`,
  ];
  if (total === 0) {
    textLines.push("Nothing is overdue or due within the next 14 days.");
    htmlParts.push(`<p style="font-family:sans-serif">Nothing is overdue or due within the next 14 days.</p>`);
  }
  for (const h of list.halls) {
    textLines.push(h.areaName.toUpperCase());
    htmlParts.push(`<h3 style="font-family:sans-serif;margin:16px 0 4px">${escapeHtml(h.areaName)}</h3>`);
    htmlParts.push(`<table style="font-family:sans-serif;font-size:13px;border-collapse:collapse">`);
    for (const i of h.items) {
      const proj = i.projectedTs !== null ? `; cleaning likely due around ${fmtDate(i.projectedTs, timeZone)}` : "";
      const eff = i.effectDay !== null ? `; effect 24 h ${Math.round(i.effectDay * 100)} %` : "";
      textLines.push(`  ${status(i)}  ${fmtDate(i.dueTs, timeZone)}  ${DUE_WHAT_LABELS[i.what]}  ${i.label} (${i.where})  ${i.reason}${proj}${eff}`);
      htmlParts.push(
        `<tr><td style="padding:2px 8px 2px 0;white-space:nowrap"><b>${escapeHtml(status(i))}</b></td><td style="padding:2px 8px">${fmtDate(i.dueTs, timeZone)}</td><td style="padding:2px 8px">${escapeHtml(DUE_WHAT_LABELS[i.what])}</td><td style="padding:2px 8px">${escapeHtml(i.label)}<br><span style="color:#666">${escapeHtml(i.where)}</span></td><td style="padding:2px 8px;color:#444">${escapeHtml(i.reason + proj + eff)}</td></tr>`,
      );
    }
    htmlParts.push(`</table>`);
    textLines.push("");
  }
  textLines.push("", CAUTION, "", "You get this because you are on the maintenance list in Stillfield.");
  htmlParts.push(`<p style="font-family:sans-serif;font-size:12px;color:#555">${escapeHtml(CAUTION)}</p>`);
  htmlParts.push(`<p style="font-family:sans-serif;font-size:12px;color:#777">You get this because you are on the maintenance list in Stillfield.</p>`);
  return { subject, text: textLines.join("\n"), html: htmlParts.join("\n") };
}

/**
 * Queues the due list for everyone active on the maintenance list, one outbox row each, with
 * dedupeKey "due-list:<ISO week>:<personId>" so a week's list is queued once however often this
 * runs. `manual` (the "Send due list now" button) uses a per-minute key instead, so a second
 * click within the minute adds nothing.
 */
export async function queueWeeklyDueListEmail(db: Db, nowMs: number, opts: { manual?: boolean } = {}): Promise<{ queued: number; recipients: number; weekKey: string }> {
  const plant = await getPlantSettings(db);
  const weekKey = isoWeekKey(nowMs, plant.timeZone);
  const recipients = await db
    .select({ id: people.id, email: people.email })
    .from(people)
    .where(and(eq(people.onMaintenanceList, true), eq(people.active, true)));
  if (!recipients.length) return { queued: 0, recipients: 0, weekKey };
  const list = await getDueList(db, nowMs);
  const mail = formatDueListEmail(list, plant.timeZone, getEnv().APP_URL);
  let queued = 0;
  for (const r of recipients) {
    const dedupeKey = opts.manual ? `due-list-now:${Math.floor(nowMs / 60_000)}:${r.id}` : `due-list:${weekKey}:${r.id}`;
    const [res] = await db
      .insert(outbox)
      .ignore()
      .values({ dedupeKey, toAddress: r.email, subject: mail.subject, bodyText: mail.text, bodyHtml: mail.html, state: "pending", attempts: 0, nextAttemptTs: nowMs, createdTs: nowMs });
    queued += res.affectedRows;
  }
  return { queued, recipients: recipients.length, weekKey };
}
