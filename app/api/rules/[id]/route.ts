// GET /api/rules/<id> — one rule's versions, newest first (who saved each, and why).
import { NextResponse } from "next/server";
import { route } from "@/app/_server/route";
import { getDb } from "@/db/client";
import { listRuleRows } from "@/db/queries/rule-rows";
import { listRuleVersions } from "@/db/queries/rule-versions";
import { notFound } from "@/lib/errors";
import { requireId } from "@/lib/ids";

export const dynamic = "force-dynamic";

export const GET = route<{ id: string }>("view", async ({ params }) => {
  const id = requireId(params.id, "The rule id must be a positive whole number.");
  const db = getDb();
  const [rule] = await listRuleRows(db, { ids: [id] });
  if (!rule) throw notFound("No such rule.");
  return NextResponse.json({ rule, versions: await listRuleVersions(db, id) });
});
