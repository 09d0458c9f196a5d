// GET /api/people — admin only; never includes password hashes (explicit column selection).
import { NextResponse } from "next/server";
import { route } from "@/app/_server/route";
import { getDb } from "@/db/client";
import { listPeople } from "@/db/queries/people";

export const dynamic = "force-dynamic";

export const GET = route("people.manage", async () => NextResponse.json({ people: await listPeople(getDb()) }));
