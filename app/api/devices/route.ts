// GET /api/devices — sensors with last seen, reading rate and rejections (never secrets).
// POST /api/devices — add a device (admins); the response carries its secret, once.
import { NextResponse } from "next/server";
import { readJson, route } from "@/app/_server/route";
import { createDeviceAction } from "@/app/_server/actions/devices";
import { getDb } from "@/db/client";
import { listDevices } from "@/db/queries/equipment";
import { actionResponse } from "@/app/_server/action";

export const dynamic = "force-dynamic";

export const GET = route("view", async () => NextResponse.json({ devices: await listDevices(getDb()) }));

export const POST = route("devices.manage", async ({ session, request }) => actionResponse(await createDeviceAction.run(session, await readJson(request)), 201));
