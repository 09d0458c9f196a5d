// /api/me/push — a phone's browser push for the signed-in person (same-origin only, through route()):
//   GET     the install's VAPID public key, for PushManager.subscribe
//   POST    save this phone's PushSubscription.toJSON() for the person
//   DELETE  remove it again ({ endpoint })
import { NextResponse } from "next/server";
import { z } from "zod";
import { parseOrThrow, readJson, route } from "@/app/_server/route";
import { getDb } from "@/db/client";
import { getEnv } from "@/db/env";
import { deletePushSubscription, savePushSubscription } from "@/db/queries/my-notifications";
import { ensureVapidKeys } from "@/db/vapid-keys";
import { pushSubscriptionSchema } from "@/lib/phone";

export const dynamic = "force-dynamic";

const MAX_BODY = 4 * 1024;

export const GET = route("view", async () => NextResponse.json({ publicKey: ensureVapidKeys(getEnv().DATA_DIR).publicKey }));

export const POST = route("view", async ({ session, request }) => {
  const sub = parseOrThrow(pushSubscriptionSchema, await readJson(request, MAX_BODY), "push subscription");
  await savePushSubscription(getDb(), session.personId, sub, request.headers.get("user-agent"));
  return NextResponse.json({ ok: true }, { status: 201 });
});

export const DELETE = route("view", async ({ session, request }) => {
  const { endpoint } = parseOrThrow(z.object({ endpoint: z.string().url().max(1000) }), await readJson(request, MAX_BODY), "request");
  const removed = await deletePushSubscription(getDb(), session.personId, endpoint);
  return NextResponse.json({ removed });
});
