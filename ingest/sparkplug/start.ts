// Starts the Sparkplug host application from the environment:
//   SPARKPLUG_HOST=off        leaves it out (the worker then takes only the JSON contract)
//   SPARKPLUG_HOST_ID         the host id in spBv1.0/STATE/<host id> (default "stillfield")
import type { Db } from "../../db/client";
import type { Env } from "../../db/env";
import type { DeviceClocks } from "../device-clocks";
import type { Logger } from "../log";
import type { ReadingWriter } from "../writer";
import { getSettings } from "../../lib/settings";
import { startSparkplugHost } from "./host";


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
  // checked with every other setting in lib/settings.ts
  const { SPARKPLUG_HOST, SPARKPLUG_HOST_ID } = getSettings();
  if (SPARKPLUG_HOST === "off") {
    deps.log.info("sparkplug host switched off (SPARKPLUG_HOST=off)");
    return null;
  }
  return startSparkplugHost({
    ...deps,
    clientId: `${deps.ingestClientId}-spb`.slice(0, 64),
    hostId: SPARKPLUG_HOST_ID,
    clocks: deps.clocks.tracker,
    clockOf: deps.clocks.clockOf,
  });
}
