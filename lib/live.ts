// Messages the ingest worker publishes on internal topics for the app (live charts, device
// list). The app's SSE route handlers parse them with these schemas before streaming them on.
//   stillfield/internal/live/line/<lineId>   readings of the line's field meters and speed gateway
//   stillfield/internal/live/area/<areaId>   readings of the hall's temperature/humidity logger
//   stillfield/internal/devices              a device went online or offline
import { z } from "zod";
import { CHANNELS } from "./contract/readings-payload";

export const LIVE_SNAPSHOT_VERSION = 1;
/** The worker sends at most this many samples per series in one snapshot (the newest). */
export const LIVE_MAX_SAMPLES_PER_SERIES = 600;

export const liveSeriesSchema = z.object({
  deviceId: z.number().int(),
  channel: z.enum(CHANNELS),
  /** [ts epoch ms, value], oldest first */
  samples: z.array(z.tuple([z.number(), z.number()])),
});

export const liveSnapshotSchema = z.object({
  v: z.literal(LIVE_SNAPSHOT_VERSION),
  scope: z.enum(["line", "area"]),
  id: z.number().int(),
  /** when the worker published the snapshot */
  ts: z.number(),
  series: z.array(liveSeriesSchema),
});

export type LiveSeries = z.infer<typeof liveSeriesSchema>;
export type LiveSnapshot = z.infer<typeof liveSnapshotSchema>;

export const deviceStatusChangeSchema = z.object({
  v: z.literal(1),
  deviceId: z.number().int(),
  code: z.string(),
  online: z.boolean(),
  ts: z.number(),
});
export type DeviceStatusChange = z.infer<typeof deviceStatusChangeSchema>;

/** Parses a live snapshot from an MQTT message body; null when it does not match. */
export function parseLiveSnapshot(body: string | Uint8Array): LiveSnapshot | null {
  try {
    const text = typeof body === "string" ? body : new TextDecoder().decode(body);
    const parsed = liveSnapshotSchema.safeParse(JSON.parse(text));
    return parsed.success ? parsed.data : null;
  } catch {
    return null;
  }
}
