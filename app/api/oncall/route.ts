// GET /api/oncall?from=&to= — the roster (default: from now for 4 weeks) and who is on call now;
//   e-mail addresses only for admins.
// POST /api/oncall — add a shift (admins): {personId, start, end (epoch ms or plant-local
//   "YYYY-MM-DDTHH:MM"), escalationOrder, note?} → 201 {id}.
import { NextResponse } from "next/server";
import { z } from "zod";
import { parseOrThrow, queryObject, readJson, route } from "@/app/_server/route";
import { addShiftAction } from "@/app/_server/actions/oncall";
import { getDb } from "@/db/client";
import { listOnCallAt, listShifts } from "@/db/queries/oncall";
import { can, type Role } from "@/lib/permissions";
import { actionResponse } from "@/app/_server/action";

export const dynamic = "force-dynamic";

const querySchema = z.object({ from: z.coerce.number().int().min(0).optional(), to: z.coerce.number().int().min(0).optional() });

/** E-mail addresses are for admins (who fill the roster); everyone else sees names only. */
function forReader<S extends { personEmail: string }>(shifts: S[], role: Role): Array<Omit<S, "personEmail"> & { personEmail?: string }> {
  if (can(role, "oncall.manage")) return shifts;
  return shifts.map(({ personEmail: _email, ...rest }) => rest);
}

export const GET = route("view", async ({ request, session }) => {
  const q = parseOrThrow(querySchema, queryObject(request), "roster query");
  const now = Date.now();
  const from = q.from ?? now;
  const to = q.to ?? from + 28 * 86_400_000;
  const db = getDb();
  const [shifts, onCallNow] = await Promise.all([listShifts(db, from, to), listOnCallAt(db, now)]);
  return NextResponse.json({ from, to, shifts: forReader(shifts, session.role), onCallNow: forReader(onCallNow, session.role) });
});

export const POST = route("oncall.manage", async ({ session, request }) => actionResponse(await addShiftAction.run(session, await readJson(request)), 201));
