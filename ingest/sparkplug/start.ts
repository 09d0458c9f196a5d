// Starts the Sparkplug host application from the environment:
//   SPARKPLUG_HOST=off        leaves it out (the worker then takes only the JSON contract)
//   SPARKPLUG_HOST_ID         the host id in spBv1.0/STATE/<host id> (default "stillfield")
import { z } from "zod";
import type { Db } from "../../db/client";
import type { Env } from "../../db/env";
import type { DeviceClocks } from "../device-clocks";
import type { Logger } from "../log";
import type { ReadingWriter } from "../writer";
import { SPB_ID_PATTERN } from "../../lib/sparkplug/topics";
import { startSparkplugHost } from "./host";

const settingsSchema = z.object({
  SPARKPLUG_HOST: z.enum(["on", "off"]).default("on"),
  SPARKPLUG_HOST_ID: z.string().regex(SPB_ID_PATTERN).default("stillfield"),
});

export type SparkplugStartDeps = {
  env: Env;
  db: Db;
  log: Logger;
  writer: ReadingWriter;
  ingestClientId: string;
  username: string;
  password: string;
  maxPayloadBytes: number;
  refreshMs: number;
  clocks: DeviceClocks;
  oldestAcceptedMs(now: number): number;
  setDeviceOnline(deviceId: number, online: boolean, now: number): void;
  countReadings(nodeCode: string, readings: number, now: number, deviceIds: Iterable<number>): void;
};

export async function startSparkplugFromEnv(deps: SparkplugStartDeps) {
  const parsed = settingsSchema.safeParse(process.env);
  if (!parsed.success) throw new Error(`Invalid Sparkplug settings: ${parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("; ")}`);
  if (parsed.data.SPARKPLUG_HOST === "off") {
    deps.log.info("sparkplug host switched off (SPARKPLUG_HOST=off)");
    return null;
  }
  return startSparkplugHost({
    ...deps,
    clientId: `${deps.ingestClientId}-spb`.slice(0, 64),
    hostId: parsed.data.SPARKPLUG_HOST_ID,
    clocks: deps.clocks.tracker,
    clockOf: deps.clocks.clockOf,
  });
}
