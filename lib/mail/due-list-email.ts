// The weekly due-list e-mail (pure: the list in, subject/text/html out) and the ISO week key
// that makes it go out once a week.
import { TZDate } from "@date-fns/tz";
import { getISOWeek, getISOWeekYear } from "date-fns";
import { DUE_WHAT_WORDS, type DueItem, type DueList } from "../views/due-list";
import { MAINTENANCE_CAUTION, escapeHtml, mailDate, type MailText } from "./render";

/** ISO 8601 week of `nowMs` in the plant's time zone, e.g. "2026-W49". */
export function isoWeekKey(nowMs: number, timeZone: string): string {
  const d = new TZDate(nowMs, timeZone);
  return `${getISOWeekYear(d)}-W${String(getISOWeek(d)).padStart(2, "0")}`;
}

export function formatDueListEmail(list: DueList, timeZone: string, appUrl: string): MailText {
  const total = list.overdueCount + list.dueSoonCount;
  const subject =
    total === 0
      ? "Stillfield due list: nothing due in the next 14 days"
      : `Stillfield due list: ${list.overdueCount} overdue, ${list.dueSoonCount} due within ${list.horizonDays} days`;
  const link = `${appUrl.replace(/\/$/, "")}/checks`;
  const status = (i: DueItem) =>
    i.overdue ? (i.neverDone ? "◆ NEVER DONE" : i.daysLeft < 0 ? `◆ OVERDUE ${-i.daysLeft} d` : "◆ OVERDUE") : i.daysLeft === 0 ? "▲ due today" : `▲ due in ${i.daysLeft} d`;
  const textLines: string[] = [subject, "", `Generated ${mailDate(list.generatedTs, timeZone)}. Open the list: ${link}`, ""];
  const htmlParts: string[] = [
    `<p style="font-family:sans-serif">${escapeHtml(subject)}.<br>Generated ${mailDate(list.generatedTs, timeZone)}. <a href="${escapeHtml(link)}">Open the due list in Stillfield</a>.</p>`,
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
      const proj = i.projectedTs !== null ? `; cleaning likely due around ${mailDate(i.projectedTs, timeZone)}` : "";
      const eff = i.effectDay !== null ? `; effect 24 h ${Math.round(i.effectDay * 100)} %` : "";
      textLines.push(`  ${status(i)}  ${mailDate(i.dueTs, timeZone)}  ${DUE_WHAT_WORDS[i.what]}  ${i.label} (${i.where})  ${i.reason}${proj}${eff}`);
      htmlParts.push(
        `<tr><td style="padding:2px 8px 2px 0;white-space:nowrap"><b>${escapeHtml(status(i))}</b></td><td style="padding:2px 8px">${mailDate(i.dueTs, timeZone)}</td><td style="padding:2px 8px">${escapeHtml(DUE_WHAT_WORDS[i.what])}</td><td style="padding:2px 8px">${escapeHtml(i.label)}<br><span style="color:#666">${escapeHtml(i.where)}</span></td><td style="padding:2px 8px;color:#444">${escapeHtml(i.reason + proj + eff)}</td></tr>`,
      );
    }
    htmlParts.push(`</table>`);
    textLines.push("");
  }
  textLines.push("", MAINTENANCE_CAUTION, "", "You get this because you are on the maintenance list in Stillfield.");
  htmlParts.push(`<p style="font-family:sans-serif;font-size:12px;color:#555">${escapeHtml(MAINTENANCE_CAUTION)}</p>`);
  htmlParts.push(`<p style="font-family:sans-serif;font-size:12px;color:#777">You get this because you are on the maintenance list in Stillfield.</p>`);
  return { subject, text: textLines.join("\n"), html: htmlParts.join("\n") };
}
