// GET /api/alerts/<id> — one alert with its history (every action, who and when).
import { NextResponse } from "next/server";
import { route } from "@/app/_server/route";
import { getDb } from "@/db/client";
import { getAlertDetail } from "@/db/queries/alert-list";
import { notFound } from "@/lib/errors";
import { alertIdOf } from "../_respond";

export const dynamic = "force-dynamic";

export const GET = route<{ id: string }>("view", async ({ params }) => {
  const alert = await getAlertDetail(getDb(), alertIdOf(params));
  if (!alert) throw notFound("No such alert.");
  return NextResponse.json({ alert });
});
