/**
 * Shapes shared by the report builders. The plant shape is the subset of the plant layout read
 * model (db/queries/plant.ts getPlantLayout) the reports use, declared here so lib stays free
 * of db imports; the read model's objects fit it as they are.
 */

export type ReportPoint = {
  id: number;
  name: string;
  position: number;
  fieldMeter: { id: number } | null;
  neutralizer: { id: number; tag: string } | null;
};

export type ReportLine = {
  id: number;
  name: string;
  areaId: number;
  solventName: string | null;
  solventMieMj: number | null;
  conductorCapacitancePf: number | null;
  speedGateway: { id: number } | null;
  points: readonly ReportPoint[];
};

export type ReportArea = {
  id: number;
  name: string;
  rhMinPct: number;
  rhMaxPct: number;
  logger: { id: number } | null;
  lines: readonly ReportLine[];
};

export type Where = { areaName: string | null; lineName: string | null; pointName: string | null; label: string };

/** Lookup from ids to names ("Press Hall › Gravure Press 1 › Unwind"). */
export function buildPlaceIndex(plant: readonly ReportArea[], neutralizerPoints: ReadonlyMap<number, number | null> = new Map()) {
  const areas = new Map<number, ReportArea>();
  const lines = new Map<number, { line: ReportLine; area: ReportArea }>();
  const points = new Map<number, { point: ReportPoint; line: ReportLine; area: ReportArea }>();
  const devices = new Map<number, { areaId: number; lineId?: number; pointId?: number }>();
  const neutralizerToPoint = new Map<number, number | null>(neutralizerPoints);
  for (const area of plant) {
    areas.set(area.id, area);
    if (area.logger) devices.set(area.logger.id, { areaId: area.id });
    for (const line of area.lines) {
      lines.set(line.id, { line, area });
      if (line.speedGateway) devices.set(line.speedGateway.id, { areaId: area.id, lineId: line.id });
      for (const point of line.points) {
        points.set(point.id, { point, line, area });
        if (point.fieldMeter) devices.set(point.fieldMeter.id, { areaId: area.id, lineId: line.id, pointId: point.id });
        if (point.neutralizer && !neutralizerToPoint.has(point.neutralizer.id)) neutralizerToPoint.set(point.neutralizer.id, point.id);
      }
    }
  }

  function where(ids: { areaId?: number | null; lineId?: number | null; pointId?: number | null; deviceId?: number | null; neutralizerId?: number | null }): Where {
    let pointId = ids.pointId ?? null;
    let lineId = ids.lineId ?? null;
    let areaId = ids.areaId ?? null;
    if (pointId === null && ids.neutralizerId != null) pointId = neutralizerToPoint.get(ids.neutralizerId) ?? null;
    if (pointId === null && lineId === null && areaId === null && ids.deviceId != null) {
      const d = devices.get(ids.deviceId);
      pointId = d?.pointId ?? null;
      lineId = d?.lineId ?? null;
      areaId = d?.areaId ?? null;
    }
    const p = pointId !== null ? points.get(pointId) : undefined;
    const l = p ? { line: p.line, area: p.area } : lineId !== null ? lines.get(lineId) : undefined;
    const a = l ? l.area : areaId !== null ? areas.get(areaId) : undefined;
    const parts = [a?.name, l?.line.name, p?.point.name].filter((x): x is string => Boolean(x));
    return {
      areaName: a?.name ?? null,
      lineName: l?.line.name ?? null,
      pointName: p?.point.name ?? null,
      label: parts.length ? parts.join(" › ") : "Plant-wide",
    };
  }

  return { areas, lines, points, where };
}
