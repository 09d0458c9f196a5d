// POST /api/surveys/rounds — a round (or part of one) sent from the phone, JSON (lib/surveys/schemas.ts
// roundSchema). Idempotent by the round's client-made id: a resend stores nothing twice.
// 201 when the survey is new, 200 when it was already stored. Shift leads and up.
import { NextResponse } from "next/server";
import { readJson, route } from "@/app/_server/route";
import { sendRoundAction } from "@/app/_server/actions/surveys";
import { actionResponse } from "@/app/_server/action";

export const dynamic = "force-dynamic";
const MAX_BODY_BYTES = 256 * 1024;

export const POST = route("survey.record", async ({ session, request }) => {
  const length = Number(request.headers.get("content-length") ?? "0");
  if (length > MAX_BODY_BYTES) return NextResponse.json({ error: "The round is too large to send.", code: "too_large" }, { status: 413 });
  const body = await readJson(request);
  const r = await sendRoundAction.run(session, body);
  return actionResponse(r, r.ok && r.data?.created ? 201 : 200);
});
