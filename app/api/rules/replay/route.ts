// POST /api/rules/replay — replay a proposed rule over recorded data (engineers and admins):
// the save body plus {fromTs?, toTs?} (default the last 7 days). Answers what the current rules
// and the proposal would have raised (counts, when, how long) and what was actually stored.
import { route, readJson } from "@/app/_server/route";
import { replayRuleAction } from "@/app/_server/actions/rules";
import { actionResponse } from "@/app/_server/action";

export const dynamic = "force-dynamic";
export const maxDuration = 60;

export const POST = route("limits.edit", async ({ session, request }) => actionResponse(await replayRuleAction.run(session, await readJson(request))));
