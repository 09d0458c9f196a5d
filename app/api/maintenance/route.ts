// GET  /api/maintenance                     planned work: running, planned and recent windows (anyone who may view)
// POST /api/maintenance {targetKind, targetId, ownerId, reason, startTs, endTs, extendReason?}
//                                           open a window (shift lead and up; others get 403)
import { NextResponse } from "next/server";
import { readJson, route } from "@/app/_server/route";
import { actionResponse } from "@/app/_server/action";
import { openMaintenanceWindowAction } from "@/app/_server/actions/maintenance";
import { getDb } from "@/db/client";
import { listMaintenanceWindows } from "@/db/queries/maintenance-windows";

export const dynamic = "force-dynamic";

export const GET = route("view", async () => {
  return NextResponse.json(await listMaintenanceWindows(getDb(), Date.now()), { headers: { "Cache-Control": "private, no-store" } });
});

export const POST = route("maintenance.plan", async ({ request, session }) => {
  return actionResponse(await openMaintenanceWindowAction.run(session, await readJson(request)), 201);
});
