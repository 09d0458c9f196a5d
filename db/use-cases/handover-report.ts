// db/use-cases/ is the one place for use cases that combine data access (db/queries) with the
// rules and computations of lib/ (see db/use-cases/replay-rule-proposal.ts).
//
// Use case: the shift handover — read the shift's readings, alerts, neutralizer records and notes
// (db/queries/reports.ts) and build the report with lib/reports/handover.ts.
import type { Db } from "../client";
import { getPlantLayout } from "../queries/plant";
import { getPlantSettings } from "../queries/plant-settings";
import { listStoredRules } from "../queries/limits";
import { listWindowsOverlapping } from "../queries/maintenance-windows";
import { fieldMeterIds, loadAlertsInWindow, loadLineNotes, loadNeutralizerRecords, loadRawSeries, loggerIds } from "../queries/reports";
import { shiftWindowFor, type ShiftWindow } from "../../lib/plant-time";
import { buildHandover, RAW_HOLD_MS, type HandoverReport } from "../../lib/reports/handover";

export type HandoverRequest = { date: string; shift: string };

/** The handover of a shift, or null when the plant has no shift of that name. */
export async function getHandoverReport(db: Db, req: HandoverRequest, nowTs: number): Promise<HandoverReport | null> {
  const plantSettings = await getPlantSettings(db);
  const window = shiftWindowFor(req.date, req.shift, plantSettings);
  if (!window) return null;
  return buildHandoverForWindow(db, window, plantSettings.name, nowTs);
}

export async function buildHandoverForWindow(db: Db, window: ShiftWindow, plantName: string, nowTs: number): Promise<HandoverReport> {
  const plant = await getPlantLayout(db);
  const [ruleList, chargeSeries, rhSeries, alertList, neutralizerList, notes, maintenance] = await Promise.all([
    listStoredRules(db),
    loadRawSeries(db, "charge_kv", fieldMeterIds(plant), window.startTs, window.endTs, RAW_HOLD_MS),
    loadRawSeries(db, "rh_pct", loggerIds(plant), window.startTs, window.endTs, RAW_HOLD_MS),
    loadAlertsInWindow(db, window.startTs, window.endTs),
    loadNeutralizerRecords(db, window.endTs, window.timeZone),
    loadLineNotes(db, window.startTs, window.endTs),
    listWindowsOverlapping(db, window.startTs, window.endTs),
  ]);
  const report = buildHandover({
    plantName,
    window,
    generatedTs: nowTs,
    plant,
    rules: ruleList,
    chargeSeries,
    rhSeries,
    alerts: alertList,
    neutralizers: neutralizerList,
    notes,
  });
  return { ...report, maintenance };
}
