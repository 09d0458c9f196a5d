// GET /api/plant — halls, lines, points, devices and neutralizers (structure only).
import { NextResponse } from "next/server";
import { route } from "@/app/_server/route";
import { getDb } from "@/db/client";
import { getPlantLayout } from "@/db/queries/plant";

export const dynamic = "force-dynamic";

export const GET = route("view", async () => NextResponse.json({ areas: await getPlantLayout(getDb()) }));
