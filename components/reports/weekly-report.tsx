// Weekly review of one line: time over limits, alert counts and the noisiest rules, and how
// charge follows humidity and speed at each point (scatter + least-squares line, r²). Server component.
import { formatDuration, formatKv, formatPct, formatTs } from "@/lib/reports/format";
import type { LineFit } from "@/lib/reports/regression";
import { CHARGE_FIT_MEASURE, type WeeklyReport as Report, type WeeklyFit } from "@/lib/reports/weekly";
import { EmptyState } from "@/components/ui/page";
import { ScatterPlot } from "./scatter-plot";
import { LimitBar, Section, StateCell, Table, Td, Th, Tile, Tiles, Tr } from "./report-parts";

const sig = (v: number, digits = 3) => String(Number(v.toPrecision(digits)));

/** r² below this: the fitted slope explains too little of the variation to be read as an effect. */
const WEAK_FIT_R2 = 0.2;

function fitWords(fit: LineFit, xUnit: string, per: number): string {
  const against = xUnit === "% RH" ? "humidity" : "speed";
  if (fit.rSquared !== null && fit.rSquared < WEAK_FIT_R2) return `${against === "humidity" ? "Humidity" : "Speed"} explains little of the change in charge here; look at the other causes.`;
  const change = fit.slope * per;
  if (Math.abs(change) < 0.05) return `Charge hardly changes with ${against} here.`;
  if (xUnit === "% RH") {
    return change < 0
      ? `Each ${per} % RH less adds about ${sig(-change, 2)} kV here.`
      : `Charge rises with humidity here (${sig(change, 2)} kV per ${per} % RH): look for another cause.`;
  }
  return change > 0 ? `Each ${per} m/min faster adds about ${sig(change, 2)} kV here.` : `Charge falls as the line speeds up here (${sig(change, 2)} kV per ${per} m/min).`;
}

function FitPanel({ name, data, xLabel, xUnit, per, testId }: { name: string; data: WeeklyFit; xLabel: string; xUnit: string; per: number; testId: string }) {
  return (
    <figure className="rounded border border-paper-line p-3 break-inside-avoid" data-testid={testId}>
      <figcaption className="mb-1 flex items-baseline justify-between gap-2">
        <span className="text-sm font-medium">{name}</span>
        <span className="num text-xs text-ink-faint">{data.n} h</span>
      </figcaption>
      {data.n === 0 ? (
        <p className="py-8 text-center text-sm text-ink-faint">No running hours with both readings this week.</p>
      ) : (
        <ScatterPlot pairs={data.plot} fit={data.fit} xLabel={xLabel} yLabel="charge RMS, kV" title={`${name}: hourly charge RMS against ${xLabel}`} />
      )}
      {data.fit ? (
        <div className="mt-1 text-xs leading-relaxed text-ink-soft">
          <p className="num">
            charge RMS ≈ {sig(data.fit.intercept)} {data.fit.slope < 0 ? "−" : "+"} {sig(Math.abs(data.fit.slope))} × {xUnit === "% RH" ? "RH" : "speed"} (kV)
            {data.fit.rSquared !== null ? (
              <>
                {" "}
                · r² <b className="font-semibold text-ink">{data.fit.rSquared.toFixed(2)}</b>
              </>
            ) : null}
          </p>
          <p>{fitWords(data.fit, xUnit, per)}</p>
        </div>
      ) : data.n > 0 ? (
        <p className="mt-1 text-xs text-ink-faint">Too little spread for a fitted line.</p>
      ) : null}
    </figure>
  );
}

export function WeeklyReportView({ report }: { report: Report }) {
  const zone = report.window.timeZone;
  const totalOver = report.points.reduce((t, p) => t + p.overMs, 0);
  const worst = report.points
    .filter((p) => p.worst)
    .sort((a, b) => Math.abs(b.worst!.value) - Math.abs(a.worst!.value))[0];
  const maxKind = Math.max(1, ...report.alerts.byKind.map((k) => k.count));

  return (
    <div data-testid="weekly-report">
      <Tiles>
        <Tile label="Time over limits" value={formatDuration(totalOver)} detail="summed over the points, 1-minute resolution" state={totalOver > 0 ? "over" : "normal"} />
        <Tile label="Alerts" value={report.alerts.total} detail={`${report.alerts.chattering} chattering`} state={report.alerts.chattering > 0 ? "near" : "normal"} />
        <Tile label="Worst minute" value={worst?.worst ? formatKv(worst.worst.value) : "—"} detail={worst?.worst ? `${worst.name}, ${formatTs(worst.worst.ts, zone, "EEE HH:mm")}` : "no readings"} />
        <Tile
          label={`${report.hall.name} lowest RH`}
          value={report.hall.lowest ? formatPct(report.hall.lowest.value) : "—"}
          detail={report.hall.lowest ? formatTs(report.hall.lowest.ts, zone, "EEE HH:mm") : "no readings"}
          state={report.hall.belowLimitMs > 0 ? "over" : report.hall.belowBandMs > 0 ? "near" : "normal"}
        />
        <Tile label={`Below ${report.hall.rhMinPct} % RH`} value={formatDuration(report.hall.belowBandMs)} detail={report.hall.limitPct !== null ? `${formatDuration(report.hall.belowLimitMs)} below the ${report.hall.limitPct} % alert limit` : undefined} />
        <Tile label="Running hours" value={report.runningHours} detail="hours used for the fits below" />
      </Tiles>

      <Section title="Time over limits per point" aside="From 1-minute rollups: minutes in which any reading was over the limit" testId="weekly-points">
        <Table>
          <thead>
            <tr>
              <Th>Code</Th>
              <Th>Point</Th>
              <Th right>Limit</Th>
              <Th right>Time over</Th>
              <Th right>Excursions</Th>
              <Th right>Worst minute</Th>
              <Th>Against limit</Th>
              <Th right>Alerts</Th>
            </tr>
          </thead>
          <tbody>
            {report.points.map((p) => (
              <Tr key={p.pointId} testId="weekly-point">
                <Td>
                  <StateCell state={p.code} />
                </Td>
                <Td>{p.name}</Td>
                <Td right>{p.limitKv === null ? "none" : `${p.limitKv} kV`}</Td>
                <Td right className={p.overMs > 0 ? "font-semibold" : undefined}>{p.overMs > 0 ? formatDuration(p.overMs) : "—"}</Td>
                <Td right muted={p.excursions === 0}>{p.excursions}</Td>
                <Td right>{p.worst ? formatKv(p.worst.value) : "—"}</Td>
                <Td>{p.worst && p.limitKv !== null ? <LimitBar value={p.worst.value} limit={p.limitKv} state={p.code} /> : null}</Td>
                <Td right muted={p.alerts === 0}>{p.alerts}</Td>
              </Tr>
            ))}
          </tbody>
        </Table>
      </Section>

      <div className="grid gap-x-5 xl:grid-cols-2 print:grid-cols-1">
        <Section title="Alerts by kind" aside={`${report.alerts.total} this week · ${report.hall.alerts} for the hall`} testId="weekly-kinds">
          {report.alerts.byKind.length === 0 ? (
            <EmptyState title="No alerts this week" />
          ) : (
            <ul className="space-y-1.5">
              {report.alerts.byKind.map((k) => (
                <li key={k.kind} className="flex items-center gap-3 text-sm">
                  <span className="w-52 shrink-0">{k.words}</span>
                  <span className="h-2 rounded-full bg-ink-ghost print:bg-ink" style={{ width: `${Math.max(4, (100 * k.count) / maxKind) * 0.6}%` }} aria-hidden="true" />
                  <span className="num font-medium">{k.count}</span>
                </li>
              ))}
            </ul>
          )}
          {report.alerts.bySeverity.length ? (
            <p className="mt-3 text-xs text-ink-faint">By severity: {report.alerts.bySeverity.map((s) => `${s.severity} ${s.count}`).join(" · ")}</p>
          ) : null}
        </Section>
        <Section title="Noisiest rules" testId="weekly-rules">
          {report.alerts.noisiestRules.length === 0 ? (
            <EmptyState title="No alerts this week" />
          ) : (
            <Table>
              <thead>
                <tr>
                  <Th>Rule</Th>
                  <Th right>Alerts</Th>
                  <Th right>Chattering</Th>
                  <Th right>Time active</Th>
                </tr>
              </thead>
              <tbody>
                {report.alerts.noisiestRules.map((r) => (
                  <Tr key={r.ruleId}>
                    <Td>{r.ruleName}</Td>
                    <Td right className="font-semibold">{r.count}</Td>
                    <Td right muted={r.chattering === 0}>{r.chattering}</Td>
                    <Td right>{formatDuration(r.activeMs)}</Td>
                  </Tr>
                ))}
              </tbody>
            </Table>
          )}
        </Section>
      </div>

      <Section
        title="Charge against humidity"
        aside="Each dot is one running hour; least-squares line (simple-statistics), r² = share of the hour-to-hour variation the line explains"
        testId="weekly-rh-fits"
      >
        <p className="mb-2 text-xs leading-relaxed text-ink-soft" data-testid="weekly-fit-measure">
          Charge is the <b className="font-medium text-ink">{CHARGE_FIT_MEASURE.words}</b> from the hourly rollups, humidity and speed their hourly means. Why RMS: {CHARGE_FIT_MEASURE.why}.
        </p>
        <div className="grid gap-3 sm:grid-cols-2 xl:grid-cols-4 print:grid-cols-2">
          {report.points.map((p) => (
            <FitPanel key={p.pointId} name={p.name} data={p.rh} xLabel={`${report.hall.name} RH, %`} xUnit="% RH" per={10} testId="rh-fit" />
          ))}
        </div>
      </Section>

      <Section title="Charge against line speed" aside="Same hours, against the line's mean speed" testId="weekly-speed-fits">
        <div className="grid gap-3 sm:grid-cols-2 xl:grid-cols-4 print:grid-cols-2">
          {report.points.map((p) => (
            <FitPanel key={p.pointId} name={p.name} data={p.speed} xLabel="speed, m/min" xUnit="m/min" per={50} testId="speed-fit" />
          ))}
        </div>
        <p className="mt-3 text-xs text-ink-faint">
          A fit describes this week&apos;s data, not a cause: humidity and speed can change together (a dry night shift running faster), and a fouled neutralizer shows as scatter above the line.
        </p>
      </Section>
    </div>
  );
}
