// GET /api/alerts/load?from=&to= — alert load over a span (default the last 30 days): alerts per
// 10 minutes and per day, floods, chattering, standing alerts and the noisiest rules, with the
// EEMUA 191 / ISA-18.2 benchmark figures.
import { NextResponse } from "next/server";
import { z } from "zod";
import { parseOrThrow, queryObject, route } from "@/app/_server/route";
import { getDb } from "@/db/client";
import { getAlertLoad } from "@/db/queries/alert-load";

export const dynamic = "force-dynamic";

const querySchema = z
  .object({ from: z.coerce.number().int().min(0).optional(), to: z.coerce.number().int().min(0).optional() })
  .refine((q) => q.from === undefined || q.to === undefined || q.from < q.to, { message: "from must be before to", path: ["from"] });

export const GET = route("view", async ({ request }) => {
  const q = parseOrThrow(querySchema, queryObject(request), "alert-load query");
  const now = Date.now();
  const to = q.to ?? now;
  const from = q.from ?? to - 30 * 86_400_000;
  if (to - from > 93 * 86_400_000) return NextResponse.json({ error: "At most 93 days at a time.", code: "bad_input" }, { status: 400 });
  return NextResponse.json(await getAlertLoad(getDb(), from, to, now));
});
