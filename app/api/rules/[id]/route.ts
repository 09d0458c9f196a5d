// GET /api/rules/<id> — one rule's versions, newest first (who saved each, and why).
import { NextResponse } from "next/server";
import { route } from "@/app/_server/route";
import { getDb } from "@/db/client";
import { listRuleRows } from "@/db/queries/rule-rows";
import { listRuleVersions } from "@/db/queries/rule-versions";
import { badInput, notFound } from "@/lib/errors";

export const dynamic = "force-dynamic";

export const GET = route<{ id: string }>("view", async ({ params }) => {
  const id = Number(params.id);
  if (!Number.isInteger(id) || id <= 0) throw badInput("The rule id must be a positive whole number.");
  const db = getDb();
  const [rule] = await listRuleRows(db, { ids: [id] });
  if (!rule) throw notFound("No such rule.");
  return NextResponse.json({ rule, versions: await listRuleVersions(db, id) });
});
