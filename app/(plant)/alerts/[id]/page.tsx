// One alert, built for a phone first: the state and what is wrong, the last hour's chart with
// the limit and the moment it was raised, what the rule is, who was told and when (e-mail,
// text, push, with delivery state), its history, and Acknowledge / Comment / Shelve at the
// bottom where a thumb reaches. Anyone signed in sees it; shift leads and up respond.
import type { Metadata } from "next";
import Link from "next/link";
import { z } from "zod";
import { notFound, requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { getAlertDetail } from "@/db/queries/alert-list";
import { listNotifyGroupAlerts } from "@/db/queries/alert-notify-group";
import { groupAlertList, groupSpanText } from "@/lib/alerts/alert-list-groups";
import { getAlertChartSpec, listAlertDeliveries, loadChartPoints } from "@/db/queries/alert-chart";
import { getPlantSettings } from "@/db/queries/equipment";
import { AlertCode, SeverityTag } from "@/components/alerts/alert-bits";
import { AlertPageActions } from "@/components/alerts/alert-page-actions";
import { Forbidden } from "@/components/ui/page";
import { frozenLineLink } from "@/lib/charts/alert-chart";
import { renderSvgChart } from "@/lib/charts/svg-chart";
import { can } from "@/lib/permissions";
import { formatPlantTime } from "@/lib/plant-time";
import { ALERT_EVENT_WORDS, ALERT_STATE_WORDS, RULE_KIND_WORDS, formatAlertValue, formatDuration } from "@/lib/vocabulary";
import { ackAlert, commentAlert, shelveAlert, unshelveAlert } from "../actions";
import { FoundLateMark } from "@/components/alerts/found-late-mark";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Alert" };

const CHANNEL_WORDS = { email: "E-mail", sms: "Text", push: "Push" } as const;

export default async function AlertPage({ params }: { params: Promise<{ id: string }> }) {
  const { id: idText } = await params;
  const { session, allowed } = await requirePagePermission("view", `/alerts/${idText}`);
  if (!allowed) return <Forbidden what="see alerts" />;
  const id = z.coerce.number().int().positive().max(Number.MAX_SAFE_INTEGER).safeParse(idText);
  if (!id.success) notFound();
  const db = getDb();
  const now = Date.now();
  const [a, info, plant] = await Promise.all([getAlertDetail(db, id.data), getAlertChartSpec(db, id.data, now), getPlantSettings(db)]);
  if (!a) notFound();
  const [deliveries, groupAlerts] = await Promise.all([listAlertDeliveries(db, a.id, a.notifyGroup ?? null), listNotifyGroupAlerts(db, a.notifyGroup)]);
  const group = groupAlertList(groupAlerts).find((e) => e.type === "group");
  const tz = plant.timeZone;
  const spec = info?.spec ?? null;
  const points = spec ? await loadChartPoints(db, spec) : [];
  const svg = spec
    ? renderSvgChart({
        points,
        fromTs: spec.fromTs,
        toTs: spec.toTs,
        unit: spec.unit,
        timeZone: tz,
        limits: spec.limits,
        mark: { ts: spec.markTs, label: `raised ${formatPlantTime(spec.markTs, tz, "HH:mm")}` },
        width: 600,
        height: 240,
      })
    : null;
  const shelved = a.shelvedUntilTs !== null && a.shelvedUntilTs > now;
  const where = [a.areaName, a.lineName, a.pointName].filter(Boolean).join(" › ") || a.subjectKey;
  const endTs = a.endTs ?? (a.state === "closed" ? a.closedTs : null);
  const lineLink = spec?.lineId ? frozenLineLink("", spec.lineId, spec) : null;
  const canRespond = can(session.role, "alert.respond");
  return (
    <article className="mx-auto max-w-3xl space-y-4" data-testid="alert-page" data-alert-id={a.id} data-state={a.state}>
      <p className="text-sm text-ink-faint">
        <Link href="/alerts" className="hover:text-brand hover:underline">
          Alerts
        </Link>{" "}
        / Alert {a.id}
      </p>
      <header className="space-y-1.5">
        <div className="flex flex-wrap items-center gap-3">
          <AlertCode kind={a.kind} state={a.state} shelved={shelved} />
          <SeverityTag severity={a.severity} />
          <FoundLateMark a={a} timeZone={tz} />
        </div>
        <h1 className="text-xl font-semibold tracking-tight text-ink">
          {RULE_KIND_WORDS[a.kind]} — {where}
        </h1>
        <p className="break-words text-ink-soft">{a.message}</p>
        <p className="num text-sm text-ink-soft">
          Since {formatPlantTime(a.startTs, tz, "EEE d MMM HH:mm")} · {endTs !== null ? `lasted ${formatDuration(endTs - a.startTs)}` : `for ${formatDuration(now - a.startTs)}`} · peak{" "}
          {formatAlertValue(a.kind, a.peakValue)} · {ALERT_STATE_WORDS[a.state]}
          {shelved && a.shelvedUntilTs !== null ? ` · shelved until ${formatPlantTime(a.shelvedUntilTs, tz, "d MMM HH:mm")}` : ""}
        </p>
      </header>

      {group?.type === "group" ? (
        <section className="rounded-card border border-paper-line bg-paper-sunk p-3" aria-labelledby="group-h" data-testid="alert-sent-together">
          <h2 id="group-h" className="text-sm font-semibold text-ink">
            Sent together with {group.group.alerts.length - 1} other alert{group.group.alerts.length === 2 ? "" : "s"}
          </h2>
          <p className="mt-0.5 text-sm text-ink-soft">
            On call got one message for this storm: “{group.group.title}” <span className="num">({groupSpanText(group.group, tz)})</span>
          </p>
          <ul className="mt-2 space-y-1.5 text-sm">
            {group.group.alerts
              .filter((m) => m.id !== a.id)
              .map((m) => (
                <li key={m.id} className="flex flex-wrap items-center gap-x-2 gap-y-0.5">
                  <AlertCode kind={m.kind} state={m.state} shelved={m.shelvedUntilTs !== null && m.shelvedUntilTs > now} />
                  <Link href={`/alerts/${m.id}`} className="min-w-0 break-words text-brand underline-offset-2 hover:underline">
                    {RULE_KIND_WORDS[m.kind]} — {[m.lineName, m.pointName].filter(Boolean).join(" › ") || m.areaName || m.subjectKey}
                  </Link>
                  <span className="num text-xs text-ink-soft">
                    {formatPlantTime(m.startTs, tz, "HH:mm")} · peak {formatAlertValue(m.kind, m.peakValue)}
                  </span>
                </li>
              ))}
          </ul>
        </section>
      ) : null}

      <section className="rounded-card border border-paper-line bg-paper-raised p-3" aria-labelledby="chart-h">
        <h2 id="chart-h" className="mb-2 text-sm font-semibold text-ink">
          {spec ? `The hour to ${formatPlantTime(spec.toTs, tz, "HH:mm")}` : "Chart"}
        </h2>
        {svg ? (
          // the SVG is built on the server from numbers and escaped words (lib/charts/svg-chart.ts)
          <div className="w-full overflow-hidden [&>svg]:h-auto [&>svg]:w-full" data-testid="alert-chart" dangerouslySetInnerHTML={{ __html: svg }} />
        ) : (
          <p className="text-sm text-ink-soft">No sensor to chart for this alert.</p>
        )}
        {spec ? (
          <p className="mt-1 text-xs text-ink-soft">
            Dashed red: the limit. Purple line: when the alert was raised. {points.length === 0 ? "No readings arrived in this hour." : ""}
          </p>
        ) : null}
        {lineLink ? (
          <p className="mt-2 text-sm">
            <Link href={lineLink} className="text-brand underline underline-offset-2" data-testid="alert-line-link">
              Open the line page at this hour
            </Link>
          </p>
        ) : null}
      </section>

      <section className="rounded-card border border-paper-line bg-paper-raised p-3" aria-labelledby="rule-h">
        <h2 id="rule-h" className="mb-1 text-sm font-semibold text-ink">
          The rule
        </h2>
        <p className="text-sm text-ink-soft" data-testid="alert-rule">
          {a.ruleName ? `“${a.ruleName}”, version ${a.ruleVersion}. ` : `Version ${a.ruleVersion}. `}
          {info?.ruleText ?? ""}
        </p>
      </section>

      <section className="rounded-card border border-paper-line bg-paper-raised p-3" aria-labelledby="told-h">
        <h2 id="told-h" className="mb-2 text-sm font-semibold text-ink">
          Who was told
        </h2>
        {deliveries.length === 0 ? (
          <p className="text-sm text-ink-soft">Nobody yet: on-call people are told when an alert stays unacknowledged past the set delay.</p>
        ) : (
          <ul className="space-y-1.5 text-sm" data-testid="alert-deliveries">
            {deliveries.map((d, i) => (
              <li key={i} className="flex flex-wrap gap-x-2" data-channel={d.channel} data-state={d.state}>
                <span className="font-medium text-ink">{CHANNEL_WORDS[d.channel]}</span>
                <span className="min-w-0 break-all text-ink-soft">to {d.personName ? `${d.personName} (${d.to})` : d.to}</span>
                <span className="num text-ink-soft">
                  {d.state === "sent" && d.sentTs !== null
                    ? `sent ${formatPlantTime(d.sentTs, tz, "HH:mm:ss")}${d.deliveryStatus ? `, ${d.deliveryStatus}` : ""}`
                    : d.state === "failed"
                      ? `failed${d.lastError ? `: ${d.lastError}` : ""}`
                      : `queued ${formatPlantTime(d.createdTs, tz, "HH:mm:ss")}${d.attempts > 0 ? `, ${d.attempts} attempt${d.attempts === 1 ? "" : "s"}` : ""}`}
                </span>
              </li>
            ))}
          </ul>
        )}
      </section>

      <section className="rounded-card border border-paper-line bg-paper-raised p-3" aria-labelledby="hist-h">
        <h2 id="hist-h" className="mb-2 text-sm font-semibold text-ink">
          History
        </h2>
        <ol className="space-y-1 text-sm" data-testid="alert-events">
          {a.events.map((e) => (
            <li key={e.id} className="flex gap-3">
              <span className="num w-28 shrink-0 text-xs text-ink-soft">{formatPlantTime(e.ts, tz, "d MMM HH:mm:ss")}</span>
              <span className="min-w-0 break-words">
                <span className="font-medium">{ALERT_EVENT_WORDS[e.kind] ?? e.kind}</span>
                {e.personName ? <span className="text-ink-soft"> by {e.personName}</span> : null}
                {e.comment ? <span className="text-ink-soft"> — {e.comment}</span> : null}
              </span>
            </li>
          ))}
        </ol>
      </section>

      {canRespond ? (
        <div className="sticky bottom-0 -mx-3 border-t border-paper-line bg-paper/95 px-3 py-3 backdrop-blur sm:static sm:mx-0 sm:border-0 sm:bg-transparent sm:px-0">
          <AlertPageActions
            alertId={a.id}
            state={a.state}
            shelved={shelved}
            shelvedReason={a.shelvedReason}
            actions={{ ack: ackAlert, comment: commentAlert, shelve: shelveAlert, unshelve: unshelveAlert }}
          />
        </div>
      ) : null}
      <p className="text-xs text-ink-soft">Times are plant time ({tz}). Stillfield is a monitoring aid, not a safety system.</p>
    </article>
  );
}
