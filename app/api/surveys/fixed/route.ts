// GET /api/surveys/fixed?deviceId=&ts= — a fixed field meter's mean charge (kV) within a minute
// either side of a moment, to show beside a handheld reading as it is entered.
import { NextResponse } from "next/server";
import { z } from "zod";
import { parseOrThrow, queryObject, route } from "@/app/_server/route";
import { getDb } from "@/db/client";
import { fixedMeterAround } from "@/db/queries/surveys-rounds";

export const dynamic = "force-dynamic";
const query = z.object({ deviceId: z.coerce.number().int().positive(), ts: z.coerce.number().int().min(0).max(4_100_000_000_000) });

export const GET = route("view", async ({ request }) => {
  const q = parseOrThrow(query, queryObject(request), "query");
  const values = await fixedMeterAround(getDb(), q.deviceId, q.ts);
  const meanKv = values.length ? values.reduce((a, b) => a + b, 0) / values.length : null;
  return NextResponse.json({ meanKv, count: values.length }, { headers: { "Cache-Control": "no-store" } });
});
