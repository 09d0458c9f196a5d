// The shift handover on screen and on paper: summary, alerts with who acknowledged them and
// what they wrote, time over limit and worst readings per point, hall humidity, neutralizers
// that need attention, line notes. Server component.
import { formatDayTime, formatDuration, formatKv, formatPct, formatShare, formatTs } from "@/lib/reports/format";
import type { HandoverReport as Report } from "@/lib/reports/handover";
import { RULE_KIND_WORDS } from "@/lib/reports/weekly";
import { EmptyState } from "@/components/ui/page";
import { LimitBar, Section, StateCell, Table, Td, Th, Tile, Tiles, Tr } from "./report-parts";
import { HandoverMaintenance } from "./handover-maintenance";

export function HandoverReportView({ report }: { report: Report }) {
  const zone = report.window.timeZone;
  const hhmm = (ts: number) => formatTs(ts, zone);
  const s = report.summary;
  const shiftMs = Math.min(report.window.endTs, Math.max(report.window.startTs, report.generatedTs)) - report.window.startTs;

  // group point rows by hall › line, keeping web-path order
  const groups: { key: string; area: string; line: string; rows: Report["points"] }[] = [];
  for (const p of report.points) {
    const key = `${p.where.areaName}|${p.where.lineName}`;
    let g = groups.find((x) => x.key === key);
    if (!g) groups.push((g = { key, area: p.where.areaName ?? "", line: p.where.lineName ?? "", rows: [] }));
    g.rows.push(p);
  }

  return (
    <div data-testid="handover-report">
      <Tiles>
        <Tile label="Alerts raised" value={s.alertsRaised} detail={`${report.alerts.length - s.alertsRaised} carried in from earlier`} state={s.alertsRaised > 0 ? "over" : "normal"} />
        <Tile
          label="Still active at the end"
          value={s.alertsActiveAtEnd}
          detail={s.unacknowledgedAtEnd > 0 ? `${s.unacknowledgedAtEnd} not acknowledged` : "all acknowledged"}
          state={s.unacknowledgedAtEnd > 0 ? "over" : s.alertsActiveAtEnd > 0 ? "near" : "normal"}
        />
        <Tile label="Points over limit" value={`${s.pointsOverLimit} of ${s.pointsTotal}`} detail={`${s.pointsTotal - s.pointsWithData} without data`} state={s.pointsOverLimit > 0 ? "over" : "normal"} />
        <Tile
          label="Worst reading"
          value={s.worst ? formatKv(s.worst.sample.value) : "—"}
          detail={s.worst ? `${s.worst.where.lineName} · ${s.worst.where.pointName}, ${hhmm(s.worst.sample.ts)}` : "no readings"}
        />
        <Tile label="Lowest humidity" value={s.lowestRh ? formatPct(s.lowestRh.sample.value) : "—"} detail={s.lowestRh ? `${s.lowestRh.areaName}, ${hhmm(s.lowestRh.sample.ts)}` : "no readings"} />
        <Tile label="Neutralizers to see to" value={s.neutralizersNeedingAttention} detail={`${s.notes} line note${s.notes === 1 ? "" : "s"}`} state={s.neutralizersNeedingAttention > 0 ? "near" : "normal"} />
      </Tiles>

      <Section title="Alerts during the shift" aside={`${report.alerts.length} alert${report.alerts.length === 1 ? "" : "s"}`} testId="handover-alerts">
        {report.alerts.length === 0 ? (
          <EmptyState title="No alerts during this shift" />
        ) : (
          <Table>
            <thead>
              <tr>
                <Th>Code</Th>
                <Th>Time</Th>
                <Th>Where</Th>
                <Th>What</Th>
                <Th>Status</Th>
                <Th>Acknowledged and noted</Th>
              </tr>
            </thead>
            <tbody>
              {report.alerts.map((a) => (
                <Tr key={a.id} testId="handover-alert">
                  <Td>
                    <StateCell state={a.code} />
                  </Td>
                  <Td className="whitespace-nowrap">
                    <span className="num">{a.raisedInShift ? hhmm(a.startTs) : formatDayTime(a.startTs, zone)}</span>
                    <span className="text-ink-faint"> – </span>
                    <span className="num">{a.endTs === null ? "still active" : hhmm(a.endTs)}</span>
                    <span className="block text-xs text-ink-faint">{formatDuration(a.activeMsInShift)} in this shift</span>
                  </Td>
                  <Td>{a.where.label}</Td>
                  <Td>
                    {a.message}
                    <span className="block text-xs text-ink-faint">
                      {a.ruleName ?? RULE_KIND_WORDS[a.kind] ?? a.kind} · {a.severity}
                      {a.chattering ? " · chattering" : ""}
                    </span>
                  </Td>
                  <Td className="whitespace-nowrap text-xs">{a.status}</Td>
                  <Td className="min-w-[16rem]">
                    {a.ackedByName ? (
                      <span className="block text-xs text-ink-soft">
                        Acknowledged by <b className="font-medium text-ink">{a.ackedByName}</b>
                        {a.ackedTs ? ` at ${hhmm(a.ackedTs)}` : ""}
                      </span>
                    ) : (
                      <span className="block text-xs text-ink-faint">Not acknowledged</span>
                    )}
                    {a.events
                      .filter((e) => e.comment)
                      .map((e, i) => (
                        <span key={i} className="mt-0.5 block text-sm">
                          <span className="num text-xs text-ink-faint">{hhmm(e.ts)}</span> {e.personName ?? "Someone"}: “{e.comment}”
                        </span>
                      ))}
                    {a.shelvedReason ? <span className="mt-0.5 block text-xs text-shelved">Shelved: {a.shelvedReason}</span> : null}
                  </Td>
                </Tr>
              ))}
            </tbody>
          </Table>
        )}
      </Section>

      <Section title="Time over limit and worst reading per point" aside="Charge readings held up to 2 min each; longer gaps count as no data" testId="handover-points">
        <Table>
          <thead>
            <tr>
              <Th>Code</Th>
              <Th>Point</Th>
              <Th right>Limit</Th>
              <Th right>Time over</Th>
              <Th right>Excursions</Th>
              <Th right>Worst reading</Th>
              <Th>Against limit</Th>
              <Th right>At</Th>
              <Th right>Data</Th>
            </tr>
          </thead>
          {groups.map((g) => (
            <tbody key={g.key}>
              <tr>
                <td colSpan={9} className="pt-3 pb-1 text-xs font-semibold text-ink-soft">
                  {g.line} <span className="font-normal text-ink-faint">· {g.area}</span>
                </td>
              </tr>
              {g.rows.map((p) => (
                <Tr key={p.pointId} testId="handover-point">
                  <Td>
                    <StateCell state={p.code} />
                  </Td>
                  <Td>{p.where.pointName}</Td>
                  <Td right>{p.limitKv === null ? <span className="text-ink-faint">none</span> : `${p.limitKv} kV`}</Td>
                  <Td right className={p.overMs > 0 ? "font-semibold" : undefined}>
                    {p.overMs > 0 ? formatDuration(p.overMs) : <span className="text-ink-faint">—</span>}
                  </Td>
                  <Td right muted={p.excursions === 0}>{p.excursions}</Td>
                  <Td right>{p.worst ? formatKv(p.worst.value) : <span className="text-ink-faint">—</span>}</Td>
                  <Td>{p.worst && p.limitKv !== null ? <LimitBar value={p.worst.value} limit={p.limitKv} state={p.code} /> : null}</Td>
                  <Td right muted>{p.worst ? hhmm(p.worst.ts) : ""}</Td>
                  <Td right muted>{formatShare(p.coveredMs, shiftMs)}</Td>
                </Tr>
              ))}
            </tbody>
          ))}
        </Table>
        {report.points.some((p) => p.limitFrom) ? (
          <p className="mt-3 text-xs text-ink-faint">
            Limits are the lowest charge limit in force at each point (point, else line, else hall, else plant-wide), as set now in Limits.
          </p>
        ) : null}
      </Section>

      <div className="grid grid-cols-1 gap-x-5 xl:grid-cols-2 print:grid-cols-1">
        <Section title="Hall humidity" testId="handover-halls">
          <Table>
            <thead>
              <tr>
                <Th>Code</Th>
                <Th>Hall</Th>
                <Th right>Lowest RH</Th>
                <Th right>At</Th>
                <Th right>Below band</Th>
                <Th right>Below alert limit</Th>
              </tr>
            </thead>
            <tbody>
              {report.halls.map((h) => (
                <Tr key={h.areaId} testId="handover-hall">
                  <Td>
                    <StateCell state={h.code} />
                  </Td>
                  <Td>{h.areaName}</Td>
                  <Td right className="font-semibold">{h.lowest ? formatPct(h.lowest.value) : "—"}</Td>
                  <Td right muted>{h.lowest ? hhmm(h.lowest.ts) : ""}</Td>
                  <Td right>
                    {h.belowBandMs > 0 ? formatDuration(h.belowBandMs) : <span className="text-ink-faint">—</span>}
                    <span className="block text-xs text-ink-faint">band {h.rhMinPct}–{h.rhMaxPct} %</span>
                  </Td>
                  <Td right>
                    {h.belowLimitMs > 0 ? formatDuration(h.belowLimitMs) : <span className="text-ink-faint">—</span>}
                    <span className="block text-xs text-ink-faint">{h.limitPct === null ? "no rule" : `below ${h.limitPct} %`}</span>
                  </Td>
                </Tr>
              ))}
            </tbody>
          </Table>
        </Section>

        <Section title="Neutralizers that need attention" testId="handover-neutralizers">
          {report.neutralizers.length === 0 ? (
            <EmptyState title="Nothing due">All neutralizers are in service, cleaned and checked on time.</EmptyState>
          ) : (
            <Table>
              <thead>
                <tr>
                  <Th>Code</Th>
                  <Th>Neutralizer</Th>
                  <Th>Why</Th>
                </tr>
              </thead>
              <tbody>
                {report.neutralizers.map((n) => (
                  <Tr key={n.id} testId="handover-neutralizer">
                    <Td>
                      <StateCell state={n.code} />
                    </Td>
                    <Td>
                      <span className="font-medium">{n.tag}</span>
                      <span className="block text-xs text-ink-faint">{n.where.label}</span>
                    </Td>
                    <Td>{n.reasons.join("; ")}</Td>
                  </Tr>
                ))}
              </tbody>
            </Table>
          )}
          <p className="mt-3 text-xs text-ink-faint">
            Before cleaning or touching emitters, isolate the power unit and follow the plant&apos;s lockout procedure: neutralizer power units carry several kilovolts.
          </p>
        </Section>
      </div>

      <HandoverMaintenance windows={report.maintenance ?? []} zone={zone} nowMs={report.generatedTs} />

      <Section title="Line notes" aside={`${report.notes.length} note${report.notes.length === 1 ? "" : "s"}`} testId="handover-notes">
        {report.notes.length === 0 ? (
          <EmptyState title="No line notes this shift" />
        ) : (
          <ul className="divide-y divide-paper-line">
            {report.notes.map((n) => (
              <li key={n.id} className="flex flex-wrap gap-x-3 py-1.5 text-sm break-inside-avoid">
                <span className="num w-12 shrink-0 text-ink-faint">{hhmm(n.ts)}</span>
                <span className="min-w-0 text-ink-soft sm:w-64 sm:shrink-0">{n.where.label.replace(/^[^›]*› /, "")}</span>
                <span className="min-w-0 grow basis-full break-words sm:basis-0">
                  {n.text} <span className="text-xs text-ink-faint">— {n.personName ?? "someone"}</span>
                </span>
              </li>
            ))}
          </ul>
        )}
      </Section>
    </div>
  );
}
