// GET /api/rules — every rule with its current version (anyone signed in).
// POST /api/rules — save a change (engineers and admins): body as saveRuleInputSchema
//   {ruleId?, baseVersion?, kind, scope:{pointId,lineId,areaId}, severity, onDelayS, offDelayS,
//    onlyWhileRunning, enabled?, params:{…}, comment?} → 201 {ruleId, version, created}.
import { NextResponse } from "next/server";
import { route, readJson } from "@/app/_server/route";
import { saveRuleAction } from "@/app/_server/actions/rules";
import { getDb } from "@/db/client";
import { listRuleRows } from "@/db/queries/rule-rows";
import { actionResponse } from "@/app/_server/action";

export const dynamic = "force-dynamic";

export const GET = route("view", async () => NextResponse.json({ rules: await listRuleRows(getDb()) }));

export const POST = route("limits.edit", async ({ session, request }) =>
  actionResponse(await saveRuleAction.run(session, await readJson(request)), 201),
);
