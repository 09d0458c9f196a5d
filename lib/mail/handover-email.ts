/**
 * The shift handover as plain text for e-mail: the same sections as the printed report, with
 * the state codes as text symbols and words (lib/vocabulary STATE_SYMBOLS and STATE_WORDS,
 * passed in) so they read in any mail program and in black and white. Pure.
 */
import { describeShift } from "../plant-time";
import { formatDayTime, formatDuration, formatKv, formatPct, formatShare, formatTs } from "../reports/format";
import type { HandoverReport } from "../reports/handover";
import type { PointState } from "../vocabulary";

export type StateCodes = { symbols: Record<PointState, string>; words: Record<PointState, string> };

export function handoverSubject(report: HandoverReport): string {
  return `Shift handover — ${describeShift(report.window)} — ${report.plantName}`;
}

export function handoverText(report: HandoverReport, codes: StateCodes, opts: { fromName?: string; link?: string } = {}): string {
  const zone = report.window.timeZone;
  const code = (s: PointState) => `${codes.symbols[s]} ${codes.words[s]}`;
  const hhmm = (ts: number) => formatTs(ts, zone);
  const out: string[] = [];
  out.push(`${report.plantName} — shift handover`);
  out.push(describeShift(report.window) + ` (${zone})`);
  if (report.inProgress) out.push(`The shift was still running when this was written (${formatDayTime(report.generatedTs, zone)}).`);
  if (opts.fromName) out.push(`Sent by ${opts.fromName}.`);
  out.push("");

  const s = report.summary;
  out.push("SUMMARY");
  out.push(`- Alerts raised: ${s.alertsRaised}; still active at the end: ${s.alertsActiveAtEnd}; not acknowledged: ${s.unacknowledgedAtEnd}`);
  out.push(`- Points over their charge limit: ${s.pointsOverLimit} of ${s.pointsTotal} (${s.pointsWithData} with data)`);
  if (s.worst) out.push(`- Worst reading: ${formatKv(s.worst.sample.value)} at ${s.worst.where.label}, ${hhmm(s.worst.sample.ts)}`);
  if (s.lowestRh) out.push(`- Lowest humidity: ${formatPct(s.lowestRh.sample.value)} RH in ${s.lowestRh.areaName}, ${hhmm(s.lowestRh.sample.ts)}`);
  out.push(`- Neutralizers needing attention: ${s.neutralizersNeedingAttention}; line notes: ${s.notes}`);
  out.push("");

  out.push("ALERTS");
  if (report.alerts.length === 0) out.push("No alerts during this shift.");
  for (const a of report.alerts) {
    const end = a.endTs === null ? "still active" : `to ${hhmm(a.endTs)}`;
    out.push(`${code(a.code)}  ${hhmm(a.startTs)} ${end} — ${a.where.label}: ${a.message} (${a.status})`);
    if (a.ackedByName) out.push(`    Acknowledged by ${a.ackedByName}${a.ackedTs ? ` at ${hhmm(a.ackedTs)}` : ""}`);
    for (const e of a.events) if (e.comment) out.push(`    ${hhmm(e.ts)} ${e.personName ?? "Someone"}: ${e.comment}`);
  }
  out.push("");

  out.push("TIME OVER CHARGE LIMIT, WORST READINGS");
  for (const p of report.points) {
    const limit = p.limitKv === null ? "no limit" : `limit ${p.limitKv} kV`;
    const worst = p.worst ? `worst ${formatKv(p.worst.value)} at ${hhmm(p.worst.ts)}` : "no readings";
    const over = p.overMs > 0 ? `${formatDuration(p.overMs)} over (${formatShare(p.overMs, p.coveredMs)} of the time with data)` : "never over";
    out.push(`${code(p.code)}  ${p.where.label} — ${limit}; ${over}; ${worst}`);
  }
  out.push("");

  out.push("HALL HUMIDITY");
  for (const h of report.halls) {
    const low = h.lowest ? `lowest ${formatPct(h.lowest.value)} RH at ${hhmm(h.lowest.ts)}` : "no readings";
    const below = h.belowBandMs > 0 ? `; ${formatDuration(h.belowBandMs)} below ${h.rhMinPct} %` : "";
    out.push(`${code(h.code)}  ${h.areaName} — ${low}${below}`);
  }
  out.push("");

  out.push("NEUTRALIZERS THAT NEED ATTENTION");
  if (report.neutralizers.length === 0) out.push("None.");
  for (const n of report.neutralizers) out.push(`${code(n.code)}  ${n.tag} (${n.where.label}): ${n.reasons.join("; ")}`);
  out.push("");

  if (report.maintenance?.length) {
    out.push("PLANNED WORK (alerts it explained were recorded without telling on call)");
    for (const w of report.maintenance) {
      out.push(`${formatDayTime(w.startTs, zone)}–${hhmm(w.endTs)}  ${w.targetName} — ${w.reason} (owner ${w.ownerName})${w.endedEarlyTs !== null ? ", ended early" : ""}`);
      if (w.summary) out.push(`    ${w.summary}`);
    }
    out.push("");
  }

  out.push("LINE NOTES");
  if (report.notes.length === 0) out.push("No notes this shift.");
  for (const n of report.notes) out.push(`${hhmm(n.ts)}  ${n.where.label} — ${n.personName ?? "Someone"}: ${n.text}`);
  out.push("");

  out.push(`Codes: ${(["normal", "near", "over", "silent", "shelved"] as const).map(code).join("  ")}`);
  if (opts.link) out.push(`Full report: ${opts.link}`);
  out.push("Stillfield is a monitoring aid, not a safety system.");
  return out.join("\n");
}
