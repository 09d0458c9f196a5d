// db/use-cases/ is the one place for use cases that combine data access (db/queries) with the
// rules and computations of lib/ (see db/use-cases/replay-rule-proposal.ts).
//
// Use case: the weekly line review — read one line's rollups and alerts for a week
// (db/queries/reports.ts) and build the review with lib/reports/weekly.ts.
import type { Db } from "../client";
import { getPlantLayout } from "../queries/plant";
import { getPlantSettings } from "../queries/plant-settings";
import { listStoredRules } from "../queries/limits";
import { groupSamples, loadWeeklyRows } from "../queries/reports";
import { weekWindow } from "../../lib/plant-time";
import { bucketExtreme } from "../../lib/reports/series";
import { buildWeekly, rollupRms, type HourlyMean, type WeeklyReport } from "../../lib/reports/weekly";

export type WeeklyRequest = { lineId: number; date: string };

export async function getWeeklyReport(db: Db, req: WeeklyRequest, nowTs: number): Promise<WeeklyReport | null> {
  const plantSettings = await getPlantSettings(db);
  const plant = await getPlantLayout(db);
  const area = plant.find((a) => a.lines.some((l) => l.id === req.lineId));
  const line = area?.lines.find((l) => l.id === req.lineId);
  if (!area || !line) return null;
  const window = weekWindow(req.date, plantSettings.timeZone);
  const meterIds = line.points.flatMap((p) => (p.fieldMeter ? [p.fieldMeter.id] : []));
  const hourlyIds = [...meterIds, ...(line.speedGateway ? [line.speedGateway.id] : []), ...(area.logger ? [area.logger.id] : [])];
  const pointIds = line.points.map((p) => p.id);

  const [ruleList, { minuteCharge, minuteRh, hourlyRows, alertRows }] = await Promise.all([
    listStoredRules(db),
    loadWeeklyRows(db, { window, meterIds, loggerId: area.logger?.id ?? null, hourlyIds, lineId: line.id, pointIds, areaId: area.id }),
  ]);

  const hourly: HourlyMean[] = hourlyRows.filter((r) => r.count > 0).map((r) => ({ deviceId: r.deviceId, channel: r.channel, bucketTs: r.bucketTs, mean: r.sum / r.count, rms: rollupRms(r.count, r.sumSq) }));
  return buildWeekly({
    plantName: plantSettings.name,
    window,
    generatedTs: nowTs,
    area,
    line,
    rules: ruleList,
    minuteCharge: groupSamples(minuteCharge.map((r) => ({ deviceId: r.deviceId, ts: r.bucketTs, value: bucketExtreme(r.min, r.max) }))),
    minuteRhMin: minuteRh.map((r) => ({ ts: r.bucketTs, value: r.min })),
    hourly,
    alerts: alertRows,
  });
}
