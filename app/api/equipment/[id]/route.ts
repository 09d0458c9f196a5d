// GET /api/equipment/:id — one neutralizer: record, checks, decay trend, effect, history, uploads.
// PATCH /api/equipment/:id — edit it (engineers); the whole record is sent.
import { NextResponse } from "next/server";
import { readJson, route } from "@/app/_server/route";
import { updateNeutralizerAction } from "@/app/_server/actions/equipment";
import { getDb } from "@/db/client";
import { getNeutralizerDetail } from "@/db/queries/equipment";
import { notFound } from "@/lib/errors";
import { toUploadView } from "@/lib/upload-view";
import { actionResponse } from "@/app/_server/action";
import { parseId } from "@/lib/ids";

export const dynamic = "force-dynamic";

export const GET = route<{ id: string }>("view", async ({ params, session }) => {
  const id = parseId(params.id);
  const detail = id !== null ? await getNeutralizerDetail(getDb(), id) : null;
  if (!detail) throw notFound("No such neutralizer.");
  return NextResponse.json({ ...detail, uploads: detail.uploads.map((u) => toUploadView(u, session.role)) });
});

export const PATCH = route<{ id: string }>("equipment.edit", async ({ session, params, request }) => {
  const body = await readJson(request);
  return actionResponse(await updateNeutralizerAction.run(session, { ...(typeof body === "object" && body !== null ? body : {}), id: params.id }));
});
