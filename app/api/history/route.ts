// GET /api/history?deviceId=N|pointId=N&channel=charge_kv&from=ms&to=ms[&maxPoints=1000][&source=auto]
// One channel of one sensor as ≤ maxPoints buckets of [ts, min, mean, max] (db/queries/history.ts):
// raw readings for short ranges, 1-minute rollups for medium, 1-hour rollups for long ones.
// A point id means the point's field meter (channel charge_kv unless given).
import { NextResponse } from "next/server";
import { z } from "zod";
import { parseOrThrow, queryObject, route } from "@/app/_server/route";
import { getReadDb } from "@/db/client";
import { getEnv } from "@/db/env";
import { findHistoryDevice, getHistory, MAX_HISTORY_POINTS } from "@/db/queries/history";
import { CHANNELS, CHANNELS_BY_KIND } from "@/lib/contract/readings-payload";
import { badInput, notFound } from "@/lib/errors";

export const dynamic = "force-dynamic";

const MAX_SPAN_MS = 400 * 86_400_000;

const querySchema = z
  .object({
    deviceId: z.coerce.number().int().positive().optional(),
    pointId: z.coerce.number().int().positive().optional(),
    channel: z.enum(CHANNELS, { message: `channel must be one of ${CHANNELS.join(", ")}` }).optional(),
    from: z.coerce.number().int().min(0, "from must be epoch milliseconds"),
    to: z.coerce.number().int().min(0, "to must be epoch milliseconds"),
    maxPoints: z.coerce.number().int().min(10).max(MAX_HISTORY_POINTS).default(1000),
    source: z.enum(["auto", "raw", "1m", "1h"]).default("auto"),
  })
  .refine((q) => (q.deviceId === undefined) !== (q.pointId === undefined), { message: "give exactly one of deviceId or pointId", path: ["deviceId"] })
  .refine((q) => q.from < q.to, { message: "from must be before to", path: ["from"] })
  .refine((q) => q.to - q.from <= MAX_SPAN_MS, { message: "a range may span at most 400 days", path: ["to"] });

export const GET = route("view", async ({ request }) => {
  const q = parseOrThrow(querySchema, queryObject(request), "history query");
  const db = await getReadDb();
  const device = await findHistoryDevice(db, { deviceId: q.deviceId, pointId: q.pointId });
  if (!device) throw notFound(q.pointId !== undefined ? `Point ${q.pointId} has no field meter.` : `No sensor with id ${q.deviceId}.`);
  const channel = q.channel ?? (device.kind === "field_meter" ? "charge_kv" : undefined);
  if (!channel) throw badInput("channel is required for this sensor", { channel: ["Required"] });
  if (!CHANNELS_BY_KIND[device.kind].includes(channel)) {
    throw badInput(`A ${device.kind.replace("_", " ")} has no ${channel} channel`, { channel: [`Use ${CHANNELS_BY_KIND[device.kind].join(" or ")}`] });
  }
  const result = await getHistory(db, {
    deviceId: device.id,
    channel,
    fromTs: q.from,
    toTs: q.to,
    maxPoints: q.maxPoints,
    source: q.source,
    rawRetentionMs: getEnv().RAW_RETENTION_DAYS * 86_400_000,
  });
  return NextResponse.json(result, { headers: { "Cache-Control": "private, no-store" } });
});
