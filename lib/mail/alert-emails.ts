// The words of Stillfield's alert e-mails (pure: data in, subject/text/html out): the on-call
// e-mail for one alert and the daily digest of a day's alerts. Each alert e-mail says what,
// where, since when, the peak, and links to the line page at the alert's time; the state code is
// the same shape-and-word set the screens use (STATE_SYMBOLS / STATE_WORDS).
import { formatPlantTime } from "../plant-time";
import { ALERT_STATE_WORDS, RULE_KIND_WORDS, SEVERITY_WORDS, alertStateCode, formatAlertValue, formatDuration, stateCodeText, type AlertState, type RuleKind, type Severity } from "../vocabulary";
import { MONITORING_CAUTION, escapeHtml, lineLinkAt, type MailText } from "./render";

export type AlertMailInput = {
  alertId: number;
  kind: RuleKind;
  severity: Severity;
  state: AlertState;
  message: string;
  startTs: number;
  peakValue: number | null;
  expectedCrossingTs: number | null;
  areaName: string | null;
  lineName: string | null;
  pointName: string | null;
  /** the place words from the subject directory, when known ("Press Hall › Gravure Press 1 › Unwind") */
  where: string | null;
  /** the line page to link to (the alert's line, or the first line of its hall) */
  linkLineId: number | null;
};

/** An alert row (with its hall, line and point names) and its place in the subject directory, as a mail sees it. */
export function alertMailInput(
  a: Omit<AlertMailInput, "alertId" | "where" | "linkLineId"> & { id: number; lineId: number | null },
  subject: { where: string; linkLineId: number | null } | undefined,
): AlertMailInput {
  return {
    alertId: a.id,
    kind: a.kind,
    severity: a.severity,
    state: a.state,
    message: a.message,
    startTs: a.startTs,
    peakValue: a.peakValue,
    expectedCrossingTs: a.expectedCrossingTs,
    areaName: a.areaName,
    lineName: a.lineName,
    pointName: a.pointName,
    where: subject?.where ?? null,
    linkLineId: a.lineId ?? subject?.linkLineId ?? null,
  };
}

function whereText(a: AlertMailInput): string {
  return a.where ?? ([a.areaName, a.lineName, a.pointName].filter(Boolean).join(" › ") || "the plant");
}

/**
 * The e-mail to an on-call person. `level` 1 is the first call; 2 and up say it is an
 * escalation because nobody acknowledged.
 */
export function composeAlertEmail(
  a: AlertMailInput,
  opts: {
    level: number;
    recipientName: string;
    appUrl: string;
    timeZone: string;
    nowMs: number;
    unackedForMs: number;
    /** the inline chart (drawn by the mailer) and the link frozen to its span */
    chart?: { cid: string; frozenLink: string; alt: string };
    /** it got worse (higher severity or a clearly worse peak) at this time: on call is told again */
    worsenedTs?: number | null;
  },
): MailText {
  const code = alertStateCode({ kind: a.kind, state: a.state, shelved: false });
  const codeText = stateCodeText(code);
  const where = whereText(a);
  const what = RULE_KIND_WORDS[a.kind];
  const since = formatPlantTime(a.startTs, opts.timeZone, "EEE d MMM yyyy, HH:mm");
  const peak = formatAlertValue(a.kind, a.peakValue);
  const link = a.linkLineId !== null ? lineLinkAt(opts.appUrl, a.linkLineId, a.startTs) : `${opts.appUrl.replace(/\/$/, "")}/alerts`;
  const alertsLink = `${opts.appUrl.replace(/\/$/, "")}/alerts`;
  const escalation = opts.level > 1;
  const worse = opts.worsenedTs != null;
  const severityWord = SEVERITY_WORDS[a.severity].toLowerCase();
  const subject = worse
    ? `Worse: ${escalation ? "[Escalated] " : ""}${codeText}: ${what} — ${where} (now ${severityWord}, peak ${peak})`
    : `${escalation ? "[Escalated] " : ""}${codeText}: ${what} — ${where} (${severityWord})`;
  const waited = formatDuration(opts.unackedForMs);
  const worseAt = worse ? formatPlantTime(opts.worsenedTs ?? 0, opts.timeZone, "HH:mm") : "";
  const lines = [
    `Hello ${opts.recipientName},`,
    "",
    worse
      ? `This alert got worse at ${worseAt} (plant time): now ${severityWord}, peak ${peak}. ${escalation ? `Nobody has acknowledged it since; you are next on the on-call list (order ${opts.level}).` : "You are on call."}`
      : escalation
        ? `This alert has not been acknowledged for ${waited}; you are next on the on-call list (order ${opts.level}).`
        : `This alert has not been acknowledged for ${waited} and you are on call.`,
    "",
    `State:   ${codeText} — ${ALERT_STATE_WORDS[a.state]}`,
    `What:    ${what}: ${a.message}`,
    `Where:   ${where}`,
    `Since:   ${since} (plant time)`,
    `Peak:    ${peak}`,
    ...(a.kind === "rh_forecast" && a.expectedCrossingTs !== null ? [`Expected to cross the limit at: ${formatPlantTime(a.expectedCrossingTs, opts.timeZone, "HH:mm")}`] : []),
    `Severity: ${SEVERITY_WORDS[a.severity]}`,
    "",
    ...(opts.chart ? [`The chart in this e-mail, to open later at the same moment: ${opts.chart.frozenLink}`] : []),
    `Open the chart at that time: ${link}`,
    `Acknowledge it in Stillfield: ${alertsLink}`,
    "",
    MONITORING_CAUTION,
    "",
    `Alert ${a.alertId}. You get this e-mail because you are on the Stillfield on-call roster.`,
  ];
  const row = (k: string, v: string) => `<tr><td style="padding:2px 12px 2px 0;color:#555;white-space:nowrap;vertical-align:top">${escapeHtml(k)}</td><td style="padding:2px 0">${v}</td></tr>`;
  const html = [
    `<div style="font-family:sans-serif;font-size:14px;color:#23262b">`,
    `<p>Hello ${escapeHtml(opts.recipientName)},</p>`,
    `<p>${escapeHtml(lines[2])}</p>`,
    ...(opts.chart
      ? [`<p><a href="${escapeHtml(opts.chart.frozenLink)}"><img src="cid:${escapeHtml(opts.chart.cid)}" width="600" style="max-width:100%;height:auto;border:1px solid #d9d7cf" alt="${escapeHtml(opts.chart.alt)}"></a><br><span style="font-size:12px;color:#555">Dashed red: the limit · purple line: when it was raised · <a href="${escapeHtml(opts.chart.frozenLink)}">open this view later</a></span></p>`]
      : []),
    `<table style="border-collapse:collapse;font-size:14px">`,
    row("State", `<b>${escapeHtml(codeText)}</b> — ${escapeHtml(ALERT_STATE_WORDS[a.state])}`),
    row("What", `<b>${escapeHtml(what)}</b>: ${escapeHtml(a.message)}`),
    row("Where", escapeHtml(where)),
    row("Since", `${escapeHtml(since)} (plant time)`),
    row("Peak", escapeHtml(peak)),
    ...(a.kind === "rh_forecast" && a.expectedCrossingTs !== null ? [row("Expected to cross", escapeHtml(formatPlantTime(a.expectedCrossingTs, opts.timeZone, "HH:mm")))] : []),
    row("Severity", escapeHtml(SEVERITY_WORDS[a.severity])),
    `</table>`,
    `<p><a href="${escapeHtml(link)}">Open the chart at that time</a> · <a href="${escapeHtml(alertsLink)}">Acknowledge in Stillfield</a></p>`,
    `<p style="font-size:12px;color:#555">${escapeHtml(MONITORING_CAUTION)}</p>`,
    `<p style="font-size:12px;color:#777">Alert ${a.alertId}. You get this e-mail because you are on the Stillfield on-call roster.</p>`,
    `</div>`,
  ].join("\n");
  return { subject, text: lines.join("\n"), html };
}

export type DigestAlert = AlertMailInput & { endTs: number | null; shelved: boolean; chattering: boolean };

/** The daily digest: yesterday's alerts (plant day), newest last, with a count per kind. */
export function composeDigestEmail(
  alerts: readonly DigestAlert[],
  opts: { dayLabel: string; recipientName: string; appUrl: string; timeZone: string; dryAir?: { lines: readonly string[]; sourceLine: string } | null },
): MailText {
  const n = alerts.length;
  const subject = n === 0 ? `Stillfield daily digest, ${opts.dayLabel}: no alerts` : `Stillfield daily digest, ${opts.dayLabel}: ${n} alert${n === 1 ? "" : "s"}`;
  const byKind = new Map<RuleKind, number>();
  for (const a of alerts) byKind.set(a.kind, (byKind.get(a.kind) ?? 0) + 1);
  const summary = [...byKind.entries()].sort((x, y) => y[1] - x[1]).map(([k, c]) => `${RULE_KIND_WORDS[k]}: ${c}`);
  const base = opts.appUrl.replace(/\/$/, "");
  const text: string[] = [`Hello ${opts.recipientName},`, "", n === 0 ? `No alerts were raised on ${opts.dayLabel}.` : `${n} alert${n === 1 ? " was" : "s were"} raised on ${opts.dayLabel} (plant time).`, ""];
  if (summary.length) text.push(...summary, "");
  const rows: string[] = [];
  for (const a of alerts) {
    const code = stateCodeText(alertStateCode({ kind: a.kind, state: a.state, shelved: a.shelved }));
    const t = formatPlantTime(a.startTs, opts.timeZone, "HH:mm");
    const dur = a.endTs !== null ? formatDuration(a.endTs - a.startTs) : "still active";
    const link = a.linkLineId !== null ? lineLinkAt(base, a.linkLineId, a.startTs) : `${base}/alerts`;
    text.push(`${t}  ${code}  ${SEVERITY_WORDS[a.severity]}  ${RULE_KIND_WORDS[a.kind]} — ${whereText(a)}; peak ${formatAlertValue(a.kind, a.peakValue)}; ${dur}${a.chattering ? "; chattering" : ""}`, `      ${link}`);
    rows.push(
      `<tr><td style="padding:2px 8px 2px 0">${t}</td><td style="padding:2px 8px">${escapeHtml(code)}</td><td style="padding:2px 8px">${escapeHtml(SEVERITY_WORDS[a.severity])}</td><td style="padding:2px 8px"><a href="${escapeHtml(link)}">${escapeHtml(RULE_KIND_WORDS[a.kind])}</a><br><span style="color:#666">${escapeHtml(whereText(a))}</span></td><td style="padding:2px 8px">${escapeHtml(formatAlertValue(a.kind, a.peakValue))}</td><td style="padding:2px 8px">${escapeHtml(dur)}${a.chattering ? " · chattering" : ""}</td></tr>`,
    );
  }
  const dry = opts.dryAir && opts.dryAir.lines.length > 0 ? opts.dryAir : null;
  if (dry) text.push("", "Tomorrow's dry air:", ...dry.lines.map((l) => `- ${l}`), dry.sourceLine);
  text.push("", `All alerts: ${base}/alerts · Alert load: ${base}/alert-load`, "", "You get this digest because you asked for it in Stillfield.");
  const html = [
    `<div style="font-family:sans-serif;font-size:14px;color:#23262b">`,
    `<p>Hello ${escapeHtml(opts.recipientName)},</p>`,
    `<p>${escapeHtml(text[2])}</p>`,
    summary.length ? `<p>${summary.map(escapeHtml).join(" · ")}</p>` : "",
    rows.length ? `<table style="border-collapse:collapse;font-size:13px">${rows.join("")}</table>` : "",
    dry ? `<h3 style="font-size:14px;margin:16px 0 4px">Tomorrow's dry air</h3><ul>${dry.lines.map((l) => `<li>${escapeHtml(l)}</li>`).join("")}</ul><p style="font-size:12px;color:#555">${escapeHtml(dry.sourceLine)}</p>` : "",
    `<p><a href="${escapeHtml(`${base}/alerts`)}">All alerts</a> · <a href="${escapeHtml(`${base}/alert-load`)}">Alert load</a></p>`,
    `<p style="font-size:12px;color:#777">You get this digest because you asked for it in Stillfield.</p>`,
    `</div>`,
  ].join("\n");
  return { subject, text: text.join("\n"), html };
}
