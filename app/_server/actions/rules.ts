// Limit (rule) actions, engineers and admins: replay a proposal over recorded data, and save it
// as a new rule version (with its audit entry). Both check the permission themselves.
import "server-only";
import { getDb, getPool } from "@/db/client";
import { getEnv } from "@/db/env";
import { loadPlantTopology } from "@/db/queries/topology";
import { saveRuleVersion } from "@/db/queries/rule-versions";
import { replayRuleProposal } from "@/db/use-cases/replay-rule-proposal";
import { replayInputSchema, saveRuleInputSchema } from "@/lib/rules/rule-input";
import { defineAction } from "../action";

async function whereOfScope(scope: { pointId: number | null; lineId: number | null; areaId: number | null }): Promise<string | null> {
  if (scope.pointId === null && scope.lineId === null && scope.areaId === null) return null;
  const topo = await loadPlantTopology(getDb());
  if (scope.pointId !== null) return topo.subjects.get(`point:${scope.pointId}`)?.where ?? `point ${scope.pointId}`;
  if (scope.lineId !== null) {
    const l = topo.lineNames.get(scope.lineId);
    return l ? `${topo.areaNames.get(l.areaId) ?? ""} › ${l.name}` : `line ${scope.lineId}`;
  }
  return topo.areaNames.get(scope.areaId ?? -1) ?? `hall ${scope.areaId}`;
}

export const saveRuleAction = defineAction("limits.edit", saveRuleInputSchema, async (input, session) => {
  return saveRuleVersion(getDb(), input, { personId: session.personId, where: await whereOfScope(input.scope) });
});

export const replayRuleAction = defineAction("limits.edit", replayInputSchema, async (input) => {
  return replayRuleProposal(getDb(), getPool(), input, Date.now(), getEnv().RAW_RETENTION_DAYS * 86_400_000);
});
