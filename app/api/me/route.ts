// GET /api/me — who is signed in and what they may do.
import { NextResponse } from "next/server";
import { route } from "@/app/_server/route";
import { ACTIONS, can } from "@/lib/permissions";

export const dynamic = "force-dynamic";

export const GET = route("view", async ({ session }) =>
  NextResponse.json({
    person: { id: session.personId, name: session.name, email: session.email, role: session.role },
    may: ACTIONS.filter((a) => can(session.role, a)),
  }),
);
