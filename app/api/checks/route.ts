// GET /api/checks?neutralizerId=&limit= — recent checks. POST /api/checks — record a check.
import { NextResponse } from "next/server";
import { z } from "zod";
import { parseOrThrow, queryObject, readJson, route } from "@/app/_server/route";
import { recordCheckAction } from "@/app/_server/actions/checks";
import { getDb } from "@/db/client";
import { listChecks } from "@/db/queries/checks";
import { actionResponse } from "@/app/_server/action";

export const dynamic = "force-dynamic";

const query = z.object({
  neutralizerId: z.coerce.number().int().positive().optional(),
  limit: z.coerce.number().int().min(1).max(500).default(50),
});

export const GET = route("view", async ({ request }) => {
  const q = parseOrThrow(query, queryObject(request), "query");
  return NextResponse.json({ checks: await listChecks(getDb(), q) });
});

export const POST = route("check.record", async ({ session, request }) => actionResponse(await recordCheckAction.run(session, await readJson(request)), 201));
