// GET /api/equipment — every neutralizer with its place, state and due dates.
// POST /api/equipment — add a neutralizer (engineers).
import { NextResponse } from "next/server";
import { readJson, route } from "@/app/_server/route";
import { createNeutralizerAction } from "@/app/_server/actions/equipment";
import { getDb } from "@/db/client";
import { listNeutralizers } from "@/db/queries/equipment";
import { actionResponse } from "@/app/_server/action";

export const dynamic = "force-dynamic";

export const GET = route("view", async () => NextResponse.json({ neutralizers: await listNeutralizers(getDb()) }));

export const POST = route("equipment.edit", async ({ session, request }) => actionResponse(await createNeutralizerAction.run(session, await readJson(request)), 201));
