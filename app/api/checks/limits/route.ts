// GET /api/checks/limits — verification limits per neutralizer kind, with their sources.
// PUT /api/checks/limits — save them (engineers): {"ionizing_bar.maxDecayS": 20, …}.
import { NextResponse } from "next/server";
import { readJson, route } from "@/app/_server/route";
import { saveCheckLimitsAction } from "@/app/_server/actions/checks";
import { getDb } from "@/db/client";
import { CHECK_LIMIT_SOURCES, getCheckLimits } from "@/db/queries/checks";
import { actionResponse } from "@/app/_server/action";

export const dynamic = "force-dynamic";

export const GET = route("view", async () => NextResponse.json({ ...(await getCheckLimits(getDb())), sources: CHECK_LIMIT_SOURCES }));

export const PUT = route("equipment.edit", async ({ session, request }) => actionResponse(await saveCheckLimitsAction.run(session, await readJson(request))));
