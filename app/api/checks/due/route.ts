// GET /api/checks/due — what is overdue or due within 14 days, by hall.
import { NextResponse } from "next/server";
import { route } from "@/app/_server/route";
import { getDb } from "@/db/client";
import { getDueList } from "@/db/queries/due-list";

export const dynamic = "force-dynamic";

export const GET = route("view", async () => NextResponse.json(await getDueList(getDb(), Date.now())));
