// GET /api/devices/:id — one device with its history. PATCH — edit placement, distances,
// calibration date (engineers).
import { NextResponse } from "next/server";
import { readJson, route } from "@/app/_server/route";
import { updateDeviceAction } from "@/app/_server/actions/devices";
import { getDb } from "@/db/client";
import { getDevice, listEquipmentEvents, listUploads } from "@/db/queries/equipment";
import { notFound } from "@/lib/errors";
import { toUploadView } from "@/lib/upload-view";
import { actionResponse } from "@/app/_server/action";
import { parseId } from "@/lib/ids";

export const dynamic = "force-dynamic";

export const GET = route<{ id: string }>("view", async ({ params, session }) => {
  const id = parseId(params.id);
  const device = id !== null ? await getDevice(getDb(), id) : null;
  if (!device || id === null) throw notFound("No such device.");
  const [events, uploads] = await Promise.all([listEquipmentEvents(getDb(), "device", id), listUploads(getDb(), "device", [id])]);
  return NextResponse.json({ device, events, uploads: uploads.map((u) => toUploadView(u, session.role)) });
});

export const PATCH = route<{ id: string }>("equipment.edit", async ({ session, params, request }) => {
  const body = await readJson(request);
  return actionResponse(await updateDeviceAction.run(session, { ...(typeof body === "object" && body !== null ? body : {}), id: params.id }));
});
