// The small per-line charts of the handover e-mail: for each line with a field meter on one of
// its points, a chart spec (lib/charts/line-mail-chart.ts) over the shift, with the strictest
// charge limit the handover report found for the line's points. The mailer draws them at send time.
import { and, asc, eq, isNotNull } from "drizzle-orm";
import type { Db } from "../client";
import { devices, lines, points } from "../schema";
import type { HandoverReport } from "../../lib/reports/handover";
import type { LineMailChartSpec } from "../../lib/charts/line-mail-chart";

export async function handoverLineChartSpecs(db: Db, report: Pick<HandoverReport, "window" | "points">, maxLines = 24): Promise<LineMailChartSpec[]> {
  const rows = await db
    .select({ deviceId: devices.id, pointId: points.id, lineId: lines.id, lineName: lines.name })
    .from(devices)
    .innerJoin(points, eq(points.id, devices.pointId))
    .innerJoin(lines, eq(lines.id, points.lineId))
    .where(and(eq(devices.kind, "field_meter"), isNotNull(devices.pointId)))
    .orderBy(asc(lines.id), asc(points.id), asc(devices.id));
  const limitOfPoint = new Map(report.points.map((p) => [p.pointId, p.limitKv]));
  const specs = new Map<number, LineMailChartSpec>();
  for (const r of rows) {
    let spec = specs.get(r.lineId);
    if (!spec) {
      if (specs.size >= maxLines) continue;
      spec = { kind: "line", lineId: r.lineId, deviceIds: [], fromTs: report.window.startTs, toTs: report.window.endTs, limitKv: null, title: r.lineName.slice(0, 120) };
      specs.set(r.lineId, spec);
    }
    if (spec.deviceIds.length < 12) spec.deviceIds.push(r.deviceId);
    const limit = limitOfPoint.get(r.pointId);
    if (limit != null && (spec.limitKv === null || limit < spec.limitKv)) spec.limitKv = limit;
  }
  return [...specs.values()];
}
