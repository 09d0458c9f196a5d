// Places (halls → lines → points) for the equipment forms and labels.
import { asc } from "drizzle-orm";
import type { Db } from "../client";
import { areas, lines, points } from "../schema";

export type PlaceOptions = {
  areas: { id: number; name: string }[];
  lines: { id: number; areaId: number; name: string; solvent: boolean }[];
  points: { id: number; lineId: number; name: string; position: number; label: string }[];
};

export async function getPlaceOptions(db: Db): Promise<PlaceOptions> {
  const [a, l, p] = await Promise.all([
    db.select({ id: areas.id, name: areas.name }).from(areas).orderBy(asc(areas.displayOrder), asc(areas.id)),
    db.select({ id: lines.id, areaId: lines.areaId, name: lines.name, solventName: lines.solventName }).from(lines).orderBy(asc(lines.displayOrder), asc(lines.id)),
    db.select({ id: points.id, lineId: points.lineId, name: points.name, position: points.position }).from(points).orderBy(asc(points.lineId), asc(points.position)),
  ]);
  const lineName = new Map(l.map((x) => [x.id, x.name]));
  const lineOrder = new Map(l.map((x, i) => [x.id, i]));
  return {
    areas: a,
    lines: l.map((x) => ({ id: x.id, areaId: x.areaId, name: x.name, solvent: x.solventName !== null })),
    points: p
      .map((x) => ({ ...x, label: `${lineName.get(x.lineId) ?? "?"} — ${x.position}. ${x.name}` }))
      .sort((x, y) => (lineOrder.get(x.lineId) ?? 0) - (lineOrder.get(y.lineId) ?? 0) || x.position - y.position),
  };
}
