// POST /api/reports/handover/email {date, shift, toPersonId} — queue the handover e-mail to the
// person taking over (shift leads and up; the action checks again).
import { NextResponse } from "next/server";
import { emailHandoverAction } from "@/app/_server/actions/reports";
import { readJson, route } from "@/app/_server/route";

export const dynamic = "force-dynamic";

export const POST = route("note.add", async ({ session, request }) => {
  const result = await emailHandoverAction.run(session, await readJson(request));
  if (result.ok) return NextResponse.json(result.data, { status: 202 });
  return NextResponse.json({ error: result.message, fieldErrors: result.fieldErrors }, { status: result.status });
});
