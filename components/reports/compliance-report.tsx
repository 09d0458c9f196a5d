// Equipment compliance: checks done and due, pass rate, overdue cleaning and checks, and the
// calibration dates of the meters and loggers. Server component.
import { formatDay } from "@/lib/reports/format";
import type { ComplianceReport as Report, Due } from "@/lib/reports/compliance";
import { DUE_SOON_DAYS } from "@/lib/reports/compliance";
import { NEUTRALIZER_STATE_WORDS, isNeutralizerState } from "@/lib/vocabulary";
import { Section, StateCell, Table, Td, Th, Tile, Tiles, Tr } from "./report-parts";

const KIND_WORDS: Record<string, string> = { ionizing_bar: "Ionizing bar", ionized_air_blower: "Ionized-air blower", ionizing_nozzle: "Ionizing nozzle", other: "Other" };

function dueLabel(d: Due): string {
  if (d.status === "unknown") return "No record";
  if (d.status === "overdue") return d.days === 0 ? "Due today" : `Overdue ${d.days} d`;
  return `In ${d.days} d`;
}

export function ComplianceReportView({ report }: { report: Report }) {
  const zone = report.window.timeZone;
  const day = (ts: number | null) => (ts === null ? "—" : formatDay(ts, zone));
  const s = report.summary;
  return (
    <div data-testid="compliance-report">
      <Tiles>
        <Tile label="Checks done" value={s.checksDone} detail={`on ${s.neutralizers} neutralizers in service`} />
        <Tile
          label="Pass rate"
          value={s.passRate === null ? "—" : `${Math.round(s.passRate * 100)} %`}
          detail={`${s.checksPassed} passed, ${s.checksDone - s.checksPassed} failed`}
          state={s.passRate !== null && s.passRate < 1 ? "near" : "normal"}
        />
        <Tile label="Checks overdue" value={s.checksOverdue} detail={`${s.checksDueSoon} due soon`} state={s.checksOverdue > 0 ? "over" : s.checksDueSoon > 0 ? "near" : "normal"} />
        <Tile label="Cleaning overdue" value={s.cleaningOverdue} detail={`${s.cleaningDueSoon} due soon`} state={s.cleaningOverdue > 0 ? "over" : s.cleaningDueSoon > 0 ? "near" : "normal"} />
        <Tile
          label="Calibration overdue"
          value={s.metersCalibrationOverdue}
          detail={`${s.metersCalibrationDueSoon} due within ${DUE_SOON_DAYS} days (meters and loggers)`}
          state={s.metersCalibrationOverdue > 0 ? "over" : s.metersCalibrationDueSoon > 0 ? "near" : "normal"}
        />
        <Tile label="As of" value={formatDay(report.asOfTs, zone)} detail="due dates are judged on this day" />
      </Tiles>

      <Section title="Neutralizers: checks and cleaning" aside="Charged-plate verification per the plant's intervals" testId="compliance-neutralizers">
        <Table>
          <thead>
            <tr>
              <Th>Next check</Th>
              <Th>Neutralizer</Th>
              <Th>State</Th>
              <Th right>Checks in period</Th>
              <Th>Last check</Th>
              <Th>Next cleaning</Th>
              <Th>Last cleaned</Th>
            </tr>
          </thead>
          <tbody>
            {report.neutralizers.map((n) => (
              <Tr key={n.id} testId="compliance-neutralizer">
                <Td>
                  <StateCell state={n.check.code} label={dueLabel(n.check)} />
                  <span className="block text-xs text-ink-faint">{day(n.check.dueTs)}</span>
                </Td>
                <Td>
                  <span className="font-medium">{n.tag}</span>
                  <span className="block text-xs text-ink-faint">
                    {KIND_WORDS[n.kind] ?? n.kind} · {n.where.label}
                  </span>
                </Td>
                <Td className={n.state === "faulty" ? "font-medium text-over print:text-ink" : n.state === "needs_cleaning" ? "text-near print:text-ink" : "text-ink-soft"}>
                  {isNeutralizerState(n.state) ? NEUTRALIZER_STATE_WORDS[n.state] : n.state}
                </Td>
                <Td right>
                  {n.passedInPeriod}/{n.checksInPeriod}
                  <span className="block text-xs text-ink-faint">passed</span>
                </Td>
                <Td>
                  {n.lastCheck ? (
                    <>
                      {day(n.lastCheck.ts)} · <b className={n.lastCheck.passed ? "font-medium" : "font-semibold text-over print:text-ink"}>{n.lastCheck.passed ? "passed" : "FAILED"}</b>
                      {n.lastCheck.failReasons ? <span className="block text-xs text-ink-soft">{n.lastCheck.failReasons}</span> : null}
                      {n.lastCheck.personName ? <span className="block text-xs text-ink-faint">by {n.lastCheck.personName}</span> : null}
                    </>
                  ) : (
                    <span className="text-ink-faint">never checked</span>
                  )}
                </Td>
                <Td>
                  <StateCell state={n.cleaning.code} label={dueLabel(n.cleaning)} />
                  <span className="block text-xs text-ink-faint">{day(n.cleaning.dueTs)}</span>
                </Td>
                <Td muted>{day(n.lastCleanedTs)}</Td>
              </Tr>
            ))}
          </tbody>
        </Table>
        <p className="mt-3 text-xs text-ink-faint">
          Before cleaning or touching emitters, isolate the power unit and follow the plant&apos;s lockout procedure. Stillfield keeps the records; it is a monitoring aid, not a safety system.
        </p>
      </Section>

      <Section title="Meter and logger calibration" testId="compliance-meters">
        <Table>
          <thead>
            <tr>
              <Th>Calibration</Th>
              <Th>Instrument</Th>
              <Th>Where</Th>
              <Th>Due</Th>
            </tr>
          </thead>
          <tbody>
            {report.meters.map((m) => (
              <Tr key={m.id}>
                <Td>
                  <StateCell state={m.code} label={m.status === "unknown" ? "No date" : m.status === "overdue" ? `Overdue ${m.days} d` : m.status === "due_soon" ? `In ${m.days} d` : "OK"} />
                </Td>
                <Td>
                  {m.label}
                  <span className="block text-xs text-ink-faint">{m.deviceCode}</span>
                </Td>
                <Td muted>{m.where.label}</Td>
                <Td className="num">{m.calibrationDue ?? "—"}</Td>
              </Tr>
            ))}
          </tbody>
        </Table>
      </Section>
    </div>
  );
}
