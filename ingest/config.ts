// Tuning settings of the broker and the ingest worker (on top of db/env.ts), from the
// environment, validated with zod. Defaults suit the demo; tests shorten the intervals.
import os from "node:os";
import { z } from "zod";
import { MAX_PAYLOAD_BYTES } from "../lib/contract/readings-payload";

const int = (d: number, min = 0) => z.coerce.number().int().min(min).default(d);

const ingestSchema = z.object({
  // broker
  BROKER_HEALTH_PORT: z.coerce.number().int().min(1).max(65535).default(9465),
  MQTT_MAX_PAYLOAD_BYTES: int(MAX_PAYLOAD_BYTES, 256),
  /** how often the broker reloads device credentials (a disabled device is refused within this) */
  BROKER_DEVICE_REFRESH_MS: int(20_000, 100),
  BROKER_ID: z.string().default(`broker@${os.hostname()}`),
  // worker
  INGEST_CLIENT_ID: z.string().min(1).max(64).default("stillfield-ingest-1"),
  INGEST_FLUSH_MS: int(250, 5),
  INGEST_FLUSH_ROWS: int(5000, 1),
  /** parallel writers; a device always goes to the same one, so its readings stay in order */
  INGEST_LANES: int(2, 1),
  /** readings held in memory (unacknowledged) before they are spilled to a file */
  INGEST_MEMORY_MAX_READINGS: int(100_000, 10),
  /** unacknowledged messages before a spill (keeps MQTT message ids far from wrapping) */
  INGEST_MAX_UNACKED: int(20_000, 10),
  INGEST_STATUS_INTERVAL_MS: int(5000, 100),
  INGEST_DEVICE_REFRESH_MS: int(20_000, 100),
  INGEST_LIVE_INTERVAL_MS: int(1000, 50),
  INGEST_MAINTENANCE_INTERVAL_MS: int(3_600_000, 1000),
  INGEST_RETRY_MAX_MS: int(5000, 50),
});

export type IngestConfig = z.infer<typeof ingestSchema>;

let cached: IngestConfig | undefined;
export function getIngestConfig(): IngestConfig {
  if (cached) return cached;
  const parsed = ingestSchema.safeParse(process.env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`);
    throw new Error(`Invalid ingest settings:\n${lines.join("\n")}`);
  }
  cached = parsed.data;
  return cached;
}
