// GET /api/oncall/settings — when alerts are e-mailed and escalated (anyone signed in).
// PUT /api/oncall/settings — change it (admins): {notifyMinSeverity, notifyAfterMin, escalateAfterMin, digestHourLocal}.
import { NextResponse } from "next/server";
import { readJson, route } from "@/app/_server/route";
import { saveAlertingSettingsAction } from "@/app/_server/actions/oncall";
import { getDb } from "@/db/client";
import { getAlertingSettings } from "@/db/queries/oncall";
import { actionResponse } from "@/app/_server/action";

export const dynamic = "force-dynamic";

export const GET = route("view", async () => NextResponse.json(await getAlertingSettings(getDb())));

export const PUT = route("oncall.manage", async ({ session, request }) => actionResponse(await saveAlertingSettingsAction.run(session, await readJson(request))));
