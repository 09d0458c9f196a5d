// Read model of the plant's structure: halls → lines → points (web-path order) with the
// devices and neutralizers that serve them. Used by the Floor, line pages, reports and tests.
import { asc } from "drizzle-orm";
import type { Db } from "../client";
import { areas, devices, lines, neutralizers, points } from "../schema";

export type PlantPoint = {
  id: number;
  lineId: number;
  name: string;
  position: number;
  fieldMeter: { id: number; code: string; calibratedDistanceMm: number | null; enabled: boolean; lastSeenTs: number | null } | null;
  neutralizer: { id: number; tag: string; kind: string; state: string } | null;
};

export type PlantLine = {
  id: number;
  areaId: number;
  slug: string;
  name: string;
  kind: string;
  nominalSpeedMpm: number;
  material: string | null;
  solventName: string | null;
  solventMieMj: number | null;
  conductorCapacitancePf: number | null;
  speedGateway: { id: number; code: string } | null;
  points: PlantPoint[];
};

export type PlantArea = {
  id: number;
  slug: string;
  name: string;
  rhMinPct: number;
  rhMaxPct: number;
  tempSetpointC: number;
  logger: { id: number; code: string; lastSeenTs: number | null } | null;
  lines: PlantLine[];
};

export async function getPlantLayout(db: Db): Promise<PlantArea[]> {
  const [areaRows, lineRows, pointRows, deviceRows, neutralizerRows] = await Promise.all([
    db.select({ id: areas.id, slug: areas.slug, name: areas.name, rhMinPct: areas.rhMinPct, rhMaxPct: areas.rhMaxPct, tempSetpointC: areas.tempSetpointC }).from(areas).orderBy(asc(areas.displayOrder), asc(areas.id)),
    db
      .select({
        id: lines.id,
        areaId: lines.areaId,
        slug: lines.slug,
        name: lines.name,
        kind: lines.kind,
        nominalSpeedMpm: lines.nominalSpeedMpm,
        material: lines.material,
        solventName: lines.solventName,
        solventMieMj: lines.solventMieMj,
        conductorCapacitancePf: lines.conductorCapacitancePf,
      })
      .from(lines)
      .orderBy(asc(lines.displayOrder), asc(lines.id)),
    db.select({ id: points.id, lineId: points.lineId, name: points.name, position: points.position }).from(points).orderBy(asc(points.lineId), asc(points.position)),
    db
      .select({
        id: devices.id,
        code: devices.code,
        kind: devices.kind,
        pointId: devices.pointId,
        lineId: devices.lineId,
        areaId: devices.areaId,
        calibratedDistanceMm: devices.calibratedDistanceMm,
        enabled: devices.enabled,
        lastSeenTs: devices.lastSeenTs,
      })
      .from(devices),
    db.select({ id: neutralizers.id, tag: neutralizers.tag, kind: neutralizers.kind, state: neutralizers.state, pointId: neutralizers.pointId }).from(neutralizers),
  ]);

  return areaRows.map((a) => {
    const logger = deviceRows.find((d) => d.kind === "th_logger" && d.areaId === a.id);
    return {
      ...a,
      logger: logger ? { id: logger.id, code: logger.code, lastSeenTs: logger.lastSeenTs } : null,
      lines: lineRows
        .filter((l) => l.areaId === a.id)
        .map((l) => {
          const gw = deviceRows.find((d) => d.kind === "speed_gateway" && d.lineId === l.id);
          return {
            ...l,
            speedGateway: gw ? { id: gw.id, code: gw.code } : null,
            points: pointRows
              .filter((p) => p.lineId === l.id)
              .map((p) => {
                const fm = deviceRows.find((d) => d.kind === "field_meter" && d.pointId === p.id);
                const n = neutralizerRows.find((x) => x.pointId === p.id && x.state !== "removed");
                return {
                  ...p,
                  fieldMeter: fm ? { id: fm.id, code: fm.code, calibratedDistanceMm: fm.calibratedDistanceMm, enabled: fm.enabled, lastSeenTs: fm.lastSeenTs } : null,
                  neutralizer: n ? { id: n.id, tag: n.tag, kind: n.kind, state: n.state } : null,
                };
              }),
          };
        }),
    };
  });
}
