// The on-call message for a storm: alerts of one hall raised within a few minutes go out as one
// e-mail (and one text / push) listing them all, titled by lib/alerts/notification-groups.ts
// ("Press Hall: RH 23 % and 3 points over on Gravure Press 1"). Each alert in the list says what,
// where, since when and its peak, with a link to its page; the chart is the first alert's. Pure.
import { formatPlantTime } from "../plant-time";
import { RULE_KIND_WORDS, SEVERITY_WORDS, alertStateCode, formatAlertValue, formatDuration, stateCodeText, type Severity } from "../vocabulary";
import type { AlertMailInput } from "./alert-emails";
import { MONITORING_CAUTION, appLink, escapeHtml, lineLinkAt, type MailText } from "./render";

export type GroupMailItem = AlertMailInput & { worsenedTs: number | null };

export type GroupMailInput = {
  /** the group's title (notification-groups.ts groupTitle) */
  title: string;
  severity: Severity;
  items: readonly GroupMailItem[];
};

function whereOf(a: GroupMailItem): string {
  return a.where ?? ([a.areaName, a.lineName, a.pointName].filter(Boolean).join(" › ") || "the plant");
}

/** One line per alert: "◆ Over  08:02  Charge over limit — Gravure Press 1 › Unwind; peak −24.5 kV (high)". */
function itemLine(a: GroupMailItem, timeZone: string): string {
  const code = stateCodeText(alertStateCode({ kind: a.kind, state: a.state, shelved: false }));
  const t = formatPlantTime(a.worsenedTs ?? a.startTs, timeZone, "HH:mm");
  const worse = a.worsenedTs !== null ? "worse: " : "";
  return `${code}  ${t}  ${worse}${RULE_KIND_WORDS[a.kind]} — ${whereOf(a)}; peak ${formatAlertValue(a.kind, a.peakValue)} (${SEVERITY_WORDS[a.severity].toLowerCase()})`;
}

/** The e-mail to one on-call person for a group; `level` 2 and up say nobody acknowledged them. */
export function composeGroupEmail(
  g: GroupMailInput,
  opts: {
    level: number;
    recipientName: string;
    appUrl: string;
    timeZone: string;
    nowMs: number;
    /** the first alert's chart (drawn by the mailer) and its frozen link */
    chart?: { cid: string; frozenLink: string; alt: string };
  },
): MailText {
  const n = g.items.length;
  const escalation = opts.level > 1;
  const sevWord = SEVERITY_WORDS[g.severity].toLowerCase();
  const subject = `${escalation ? "[Escalated] " : ""}${g.title} (${n} alerts, ${sevWord})`;
  const first = g.items.reduce((a, b) => ((b.worsenedTs ?? b.startTs) < (a.worsenedTs ?? a.startTs) ? b : a));
  const waited = formatDuration(Math.max(0, opts.nowMs - (first.worsenedTs ?? first.startTs)));
  const intro = escalation
    ? `These ${n} alerts, raised together, have not been acknowledged for ${waited}; you are next on the on-call list (order ${opts.level}).`
    : `${n} alerts were raised together in ${first.areaName ?? "the plant"} and you are on call. They come as one message; each is listed below with its link.`;
  const alertsLink = appLink(opts.appUrl, "/alerts");
  const text = [
    `Hello ${opts.recipientName},`,
    "",
    intro,
    "",
    g.title,
    "",
    ...g.items.flatMap((a) => [itemLine(a, opts.timeZone), `      ${appLink(opts.appUrl, `/alerts/${a.alertId}`)}`]),
    "",
    ...(opts.chart ? [`The chart in this e-mail is the first alert's; to open it later at the same moment: ${opts.chart.frozenLink}`] : []),
    ...(first.linkLineId !== null ? [`Open the chart at that time: ${lineLinkAt(opts.appUrl, first.linkLineId, first.startTs)}`] : []),
    `Acknowledge them in Stillfield: ${alertsLink}`,
    "",
    MONITORING_CAUTION,
    "",
    `Alerts ${g.items.map((a) => a.alertId).join(", ")}. You get this e-mail because you are on the Stillfield on-call roster.`,
  ];
  const rows = g.items.map((a) => {
    const code = stateCodeText(alertStateCode({ kind: a.kind, state: a.state, shelved: false }));
    const t = formatPlantTime(a.worsenedTs ?? a.startTs, opts.timeZone, "HH:mm");
    const link = appLink(opts.appUrl, `/alerts/${a.alertId}`);
    const td = (v: string) => `<td style="padding:4px 8px 4px 0;vertical-align:top;border-top:1px solid #e4e2da">${v}</td>`;
    return `<tr>${td(escapeHtml(t))}${td(`<b>${escapeHtml(code)}</b>`)}${td(`<a href="${escapeHtml(link)}">${a.worsenedTs !== null ? "Worse: " : ""}${escapeHtml(RULE_KIND_WORDS[a.kind])}</a><br><span style="color:#555">${escapeHtml(whereOf(a))}</span>`)}${td(`${escapeHtml(formatAlertValue(a.kind, a.peakValue))}<br><span style="color:#555">${escapeHtml(SEVERITY_WORDS[a.severity])}</span>`)}</tr>`;
  });
  const html = [
    `<div style="font-family:sans-serif;font-size:14px;color:#23262b">`,
    `<p>Hello ${escapeHtml(opts.recipientName)},</p>`,
    `<p>${escapeHtml(intro)}</p>`,
    `<h2 style="font-size:16px;margin:12px 0 6px">${escapeHtml(g.title)}</h2>`,
    `<table style="border-collapse:collapse;font-size:14px"><tr style="color:#555;font-size:12px;text-align:left"><th style="padding:2px 8px 2px 0">Time</th><th style="padding:2px 8px 2px 0">State</th><th style="padding:2px 8px 2px 0">What and where</th><th style="padding:2px 8px 2px 0">Peak</th></tr>${rows.join("")}</table>`,
    ...(opts.chart
      ? [`<p><a href="${escapeHtml(opts.chart.frozenLink)}"><img src="cid:${escapeHtml(opts.chart.cid)}" width="600" style="max-width:100%;height:auto;border:1px solid #d9d7cf" alt="${escapeHtml(opts.chart.alt)}"></a><br><span style="font-size:12px;color:#555">The first alert's chart. Dashed red: the limit · purple line: when it was raised · <a href="${escapeHtml(opts.chart.frozenLink)}">open this view later</a></span></p>`]
      : []),
    `<p>${first.linkLineId !== null ? `<a href="${escapeHtml(lineLinkAt(opts.appUrl, first.linkLineId, first.startTs))}">Open the chart at that time</a> · ` : ""}<a href="${escapeHtml(alertsLink)}">Acknowledge in Stillfield</a></p>`,
    `<p style="font-size:12px;color:#555">${escapeHtml(MONITORING_CAUTION)}</p>`,
    `<p style="font-size:12px;color:#777">Alerts ${g.items.map((a) => a.alertId).join(", ")}. You get this e-mail because you are on the Stillfield on-call roster.</p>`,
    `</div>`,
  ].join("\n");
  return { subject, text: text.join("\n"), html };
}

/** The short text / push words for a group: the title, then one short line per alert (the text adds the link). */
export function composeGroupPhoneText(g: GroupMailInput, opts: { level: number }): { title: string; body: string } {
  const title = `${opts.level > 1 ? "Escalated: " : ""}${g.title}`;
  const body = `${g.items.length} alerts: ${g.items.map((a) => `${a.worsenedTs !== null ? "worse " : ""}${RULE_KIND_WORDS[a.kind]} ${a.pointName ?? a.lineName ?? a.areaName ?? ""} ${formatAlertValue(a.kind, a.peakValue)}`.replace(/\s+/g, " ").trim()).join("; ")}`;
  return { title, body };
}
