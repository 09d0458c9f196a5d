// One neutralizer's page: the unit, its kind's check limits, its checks with the decay trend and
// the slowdown against its own baseline, its effect from line data, history and uploads.
import type { Db } from "../client";
import { getCheckLimits, listChecks, projectDecay, type CheckRow, type DecayProjection, type KindLimits } from "./checks";
import { listEquipmentEvents, listUploads, type EquipmentEventRow, type UploadRow } from "./equipment-history";
import { computeNeutralizerEffects, effectWindows, getNeutralizerTopology, type EffectFigure, type NeutralizerTopology } from "./neutralizer-effect";
import { getNeutralizer, type NeutralizerListItem } from "./neutralizers";

export type NeutralizerDetail = {
  neutralizer: NeutralizerListItem;
  limits: KindLimits;
  checks: CheckRow[];
  projection: DecayProjection;
  effects: EffectFigure[];
  topology: NeutralizerTopology | null;
  events: EquipmentEventRow[];
  uploads: UploadRow[];
};

export async function getNeutralizerDetail(db: Db, id: number, nowMs = Date.now()): Promise<NeutralizerDetail | null> {
  const neutralizer = await getNeutralizer(db, id);
  if (!neutralizer) return null;
  const [limits, checkRows, events, windows, topo] = await Promise.all([
    getCheckLimits(db),
    listChecks(db, { neutralizerId: id, limit: 200 }),
    listEquipmentEvents(db, "neutralizer", id, 200),
    effectWindows(db, nowMs),
    getNeutralizerTopology(db, [id]),
  ]);
  const kindLimits = limits.byKind[neutralizer.kind];
  const effects = (await computeNeutralizerEffects(db, [id], windows)).get(id) ?? [];
  const uploadsOf = [...(await listUploads(db, "neutralizer", [id])), ...(await listUploads(db, "check", checkRows.map((c) => c.id)))].sort((a, b) => b.createdTs - a.createdTs);
  return {
    neutralizer,
    limits: kindLimits,
    checks: checkRows,
    projection: projectDecay(checkRows, kindLimits.maxDecayS, neutralizer.lastCleanedTs, nowMs),
    effects,
    topology: topo.get(id) ?? null,
    events,
    uploads: uploadsOf,
  };
}
