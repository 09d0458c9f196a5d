// db/use-cases/ is the one place for use cases that combine data access (db/queries) with the
// rules and computations of lib/ (see db/use-cases/replay-rule-proposal.ts).
//
// Use case: the equipment compliance report — read neutralizers, checks and meters
// (db/queries/reports.ts) and build the report with lib/reports/compliance.ts.
import type { Db } from "../client";
import { getPlantLayout } from "../queries/plant";
import { getPlantSettings } from "../queries/plant-settings";
import { loadComplianceRows, loadNeutralizerRecords } from "../queries/reports";
import { dateRangeWindow } from "../../lib/plant-time";
import { buildCompliance, type ComplianceCheckInput, type ComplianceReport } from "../../lib/reports/compliance";
import { buildPlaceIndex } from "../../lib/reports/types";

export type ComplianceRequest = { from: string; to: string };

export async function getComplianceReport(db: Db, req: ComplianceRequest, nowTs: number): Promise<ComplianceReport> {
  const plantSettings = await getPlantSettings(db);
  const window = dateRangeWindow(req.from, req.to, plantSettings.timeZone);
  const plant = await getPlantLayout(db);
  const places = buildPlaceIndex(plant);
  const [neutralizerRows, { checkRows, meterRows }] = await Promise.all([
    loadNeutralizerRecords(db, window.endTs, plantSettings.timeZone),
    loadComplianceRows(db, window.endTs),
  ]);
  const checkList: ComplianceCheckInput[] = checkRows;
  return buildCompliance({
    plantName: plantSettings.name,
    window,
    generatedTs: nowTs,
    neutralizers: neutralizerRows.map((n) => ({ ...n, where: places.where({ pointId: n.pointId }) })),
    checks: checkList,
    meters: meterRows.map((m) => ({
      id: m.id,
      deviceCode: m.code,
      label: m.label,
      where: places.where({ pointId: m.pointId, lineId: m.lineId, areaId: m.areaId }),
      calibrationDue: m.calibrationDue,
    })),
  });
}
