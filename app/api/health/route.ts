// GET /api/health — every process's figures as JSON for a plant's own monitoring (the Health
// page shows the same): brokers, ingest workers, the alert owner's lease, the mail and text
// queues, the read replica. Allowed for an admin session, or with `Authorization: Bearer
// <HEALTH_TOKEN>` when that setting is given (lib/settings.ts). Answers 503 when a worker or
// broker has stopped reporting or the mail queue holds failures, so a plain HTTP check alarms.
import { timingSafeEqual, createHash } from "node:crypto";
import { NextResponse } from "next/server";
import { errorResponse } from "@/app/_server/route";
import { checkPermission, getSession } from "@/app/_server/session";
import { getDb, getReplicaState } from "@/db/client";
import { getEnv } from "@/db/env";
import { getHealthReport } from "@/db/queries/health";
import { healthVerdict } from "@/lib/health-verdict";

export const dynamic = "force-dynamic";

function tokenMatches(header: string | null, token: string | undefined): boolean {
  if (!token || !header?.startsWith("Bearer ")) return false;
  // compare digests so the comparison takes the same time whatever the length given
  const given = createHash("sha256").update(header.slice(7).trim()).digest();
  const wanted = createHash("sha256").update(token).digest();
  return timingSafeEqual(given, wanted);
}

export async function GET(request: Request) {
  try {
    if (!tokenMatches(request.headers.get("authorization"), getEnv().HEALTH_TOKEN)) checkPermission(await getSession(), "health.view");
    const report = await getHealthReport(getDb(), await getReplicaState());
    const verdict = healthVerdict(report);
    return NextResponse.json({ ok: verdict.ok, problems: verdict.problems, ...report }, { status: verdict.ok ? 200 : 503, headers: { "Cache-Control": "no-store" } });
  } catch (err) {
    return errorResponse(err);
  }
}
