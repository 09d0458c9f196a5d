// The plant simulator: plays the demo plant "Harrow Fen Packaging" (model and scenario in
// plant-model.ts). Each demo device signs in to the broker with its own code and secret and
// publishes at its rate (field meters 1 Hz, hall loggers every 10 s, speed gateways every 5 s),
// with its last will {"online":false}. Deterministic: a seed and the scenario anchor fix every
// value. First it fast-forwards history straight into MariaDB (backfill), then plays live.
//
//   tsx simulators/plant.ts                      backfill the missing part of the last 7 days, then live
//   tsx simulators/plant.ts --backfill-days 30   a month of history (raw within the retention only)
//   tsx simulators/plant.ts --no-live            backfill only
//   tsx simulators/plant.ts --backfill-days 0 --from=-4h --speed 600
//                                                live from 4 h ago at 600× until caught up with now
// Options (or env): --seed (SIM_SEED, 7), --anchor <epoch ms> (SIM_ANCHOR_MS; default: the
// anchor stored at first start in DATA_DIR/sim-anchor-<DB_NAME>.json, else now),
// --backfill-days (SIM_BACKFILL_DAYS, 7), --full-rate-hours (SIM_FULL_RATE_HOURS, 24) and
// --thin n (SIM_BACKFILL_THIN, 10): history older than the full-rate hours is written at every
// n-th sample so a week backfills in under a minute (--thin 1 for the full rate), --speed,
// --from (=-4h, =-30m or epoch ms; write negative times as --from=-4h), --until (+10m, now, epoch ms: stop when simulated time gets
// there), --duration-s (stop after so many wall seconds), --devices code,code,
// --malformed-every-s (SIM_MALFORMED_EVERY_S, 600; 0 = never): one bad message per interval of
// simulated time, --log-acked <file>: append "code,channel,ts" for every reading the broker
// acknowledged (tests compare it with the table). Uses MQTT_HOST/MQTT_PORT and DB_* from env.
import fs from "node:fs";
import path from "node:path";
import { parseArgs } from "node:util";
import mqtt, { type MqttClient } from "mqtt";
import { z } from "zod";
import { readSimulatorSecrets } from "./device-secrets";
import type { ReadingSetInput } from "../lib/contract/readings-payload";
import { MAX_BATCH_LENGTH } from "../lib/contract/readings-payload";
import { deviceTopics } from "../lib/contract/topics";
import { getSettings } from "../lib/settings";
import { closeHistoryWriter, resolveAnchor, writeHistory } from "./backfill";
import { PlantModel, SAMPLE_PERIOD_MS, type SimDevice } from "./plant-model";
import { sparkplugLine } from "./sparkplug-line";
import { DAY_MS as DAY } from "../lib/vocabulary/time";


const relTime = z.string().transform((s, ctx) => {
  if (s === "now") return Date.now();
  const m = /^([+-])(\d+(?:\.\d+)?)(s|m|h|d)$/.exec(s);
  const units: Record<string, number> = { s: 1000, m: 60_000, h: 3_600_000, d: DAY };
  if (m && units[m[3]]) return Date.now() + (m[1] === "-" ? -1 : 1) * Number(m[2]) * units[m[3]];
  if (/^\d{12,}$/.test(s)) return Number(s);
  ctx.addIssue({ code: "custom", message: `not a time: ${s} (use now, -4h, +10m or epoch ms)` });
  return z.NEVER;
});

const optionsSchema = z.object({
  seed: z.coerce.number().int().default(7),
  anchor: z.coerce.number().int().positive().optional(),
  backfillDays: z.coerce.number().min(0).max(400).default(7),
  thin: z.coerce.number().int().min(1).max(3600).default(10),
  fullRateHours: z.coerce.number().min(0).default(24),
  live: z.boolean().default(true),
  speed: z.coerce.number().min(0.01).max(100_000).optional(),
  from: relTime.optional(),
  until: relTime.optional(),
  durationS: z.coerce.number().positive().optional(),
  devices: z.string().optional(),
  malformedEveryS: z.coerce.number().min(0).default(600),
  logAcked: z.string().optional(),
});
export type PlantOptions = z.infer<typeof optionsSchema>;

function readOptions(): PlantOptions {
  const { values } = parseArgs({
    options: {
      seed: { type: "string" },
      anchor: { type: "string" },
      "backfill-days": { type: "string" },
      thin: { type: "string" },
      "full-rate-hours": { type: "string" },
      "no-live": { type: "boolean" },
      speed: { type: "string" },
      from: { type: "string" },
      until: { type: "string" },
      "duration-s": { type: "string" },
      devices: { type: "string" },
      "malformed-every-s": { type: "string" },
      "log-acked": { type: "string" },
    },
    strict: true,
  });
  const env = getSettings();
  const parsed = optionsSchema.safeParse({
    seed: values.seed ?? env.SIM_SEED,
    anchor: values.anchor ?? env.SIM_ANCHOR_MS,
    backfillDays: values["backfill-days"] ?? env.SIM_BACKFILL_DAYS,
    thin: values.thin ?? env.SIM_BACKFILL_THIN,
    fullRateHours: values["full-rate-hours"] ?? env.SIM_FULL_RATE_HOURS,
    live: !values["no-live"],
    speed: values.speed,
    from: values.from,
    until: values.until,
    durationS: values["duration-s"],
    devices: values.devices,
    malformedEveryS: values["malformed-every-s"] ?? env.SIM_MALFORMED_EVERY_S,
    logAcked: values["log-acked"],
  });
  if (!parsed.success) {
    throw new Error(`Bad options:\n${parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`).join("\n")}`);
  }
  return parsed.data;
}

const log = (msg: string) => process.stdout.write(`${new Date().toISOString()} plant: ${msg}\n`);

// ---- malformed messages: one kind after another ----
function malformedPayload(n: number, device: SimDevice, ts: number): string {
  const kinds = [
    () => `{"ts":${ts},"values":{"${device.kind === "th_logger" ? "rh_pct" : "charge_kv"}":`, // cut short
    () => JSON.stringify({ ts, values: device.kind === "th_logger" ? { rh_pct: 140 } : device.kind === "speed_gateway" ? { speed_mpm: -5 } : { charge_kv: 950 } }),
    () => `{"ts":${ts},"values":{"charge_kv":NaN}}`,
    () => JSON.stringify({ ts, values: device.kind === "field_meter" ? { rh_pct: 40 } : { charge_kv: 1.5 } }),
    () => JSON.stringify({ ts: "yesterday", values: { temp_c: 20 } }),
  ];
  return kinds[n % kinds.length]();
}

type Link = { device: SimDevice; client: MqttClient; nextTs: number; inFlight: number };

async function runLive(opts: PlantOptions, model: PlantModel, simDevices: SimDevice[], startMs: number): Promise<void> {
  const env = getSettings();
  const secrets = readSimulatorSecrets(env.DB_NAME);
  const ackedLog = opts.logAcked ? fs.createWriteStream(opts.logAcked, { flags: "a" }) : null;
  const links: Link[] = [];
  let stopping = false;
  let published = 0;
  let acked = 0;
  let failed = 0;

  await Promise.all(
    simDevices.map(
      (device) =>
        new Promise<void>((resolve) => {
          const secret = secrets[device.code];
          if (!secret) {
            log(`no secret for ${device.code}; skipped`);
            return resolve();
          }
          const client = mqtt.connect({
            host: env.MQTT_HOST,
            port: env.MQTT_PORT,
            protocolVersion: 4,
            clientId: device.code,
            username: device.code,
            password: secret,
            clean: true,
            reconnectPeriod: 2000,
            // refused for a moment after a Mosquitto restart (ingest/mosquitto/device-gate.ts): try again
            reconnectOnConnackError: true,
            keepalive: 30,
            will: { topic: deviceTopics.status(device.code), payload: Buffer.from('{"online":false}'), qos: 1, retain: false },
          });
          const link: Link = { device, client, nextTs: startMs, inFlight: 0 };
          let lastError = "";
          client.on("connect", () => {
            lastError = "";
            client.options.reconnectPeriod = 2000;
            client.publish(deviceTopics.status(device.code), '{"online":true}', { qos: 1 });
            resolve();
          });
          client.on("error", (err) => {
            // a device disabled by an admin is refused until enabled again: say so once, retry slowly
            if (err.message !== lastError) log(`${device.code}: ${err.message}`);
            lastError = err.message;
            if (/not authorized|bad user/i.test(err.message)) client.options.reconnectPeriod = 30_000;
            resolve();
          });
          links.push(link);
        }),
    ),
  );
  log(`${links.length} devices signed in to ${env.MQTT_HOST}:${env.MQTT_PORT}`);

  const speed = opts.speed ?? (startMs < Date.now() - 5000 ? 60 : 1);
  const wallStart = Date.now();
  const untilMs = opts.until;
  let caughtUp = false;
  let malformedCount = 0;
  let nextMalformed = opts.malformedEveryS > 0 ? startMs + opts.malformedEveryS * 1000 : Infinity;
  const simNow = () => {
    const now = Date.now();
    const t = startMs + (now - wallStart) * speed;
    if (t >= now) {
      if (!caughtUp) log("caught up with real time; playing at 1×");
      caughtUp = true;
    }
    return caughtUp ? now : t;
  };

  const publishSets = (link: Link, sets: ReadingSetInput[]) => {
    for (let i = 0; i < sets.length; i += MAX_BATCH_LENGTH) {
      const part = sets.slice(i, i + MAX_BATCH_LENGTH);
      const body = part.length === 1 ? JSON.stringify(part[0]) : JSON.stringify({ batch: part });
      link.inFlight++;
      published += part.length;
      link.client.publish(deviceTopics.readings(link.device.code), body, { qos: 1 }, (err) => {
        link.inFlight--;
        if (err) {
          failed += part.length;
          return;
        }
        acked += part.length;
        if (ackedLog) {
          const lines: string[] = [];
          for (const s of part) for (const ch of Object.keys(s.values)) lines.push(`${link.device.code},${ch},${s.ts}`);
          ackedLog.write(lines.join("\n") + "\n");
        }
      });
    }
  };

  const tick = () => {
    const t = simNow();
    for (const link of links) {
      // a disconnected device keeps its place and sends the backlog when it is back (as a
      // logger with local storage would); skip while its last messages are still unanswered
      if (!link.client.connected || link.inFlight > 20) continue;
      const period = SAMPLE_PERIOD_MS[link.device.kind];
      const sets: ReadingSetInput[] = [];
      let ts = Math.ceil(link.nextTs / period) * period;
      for (; ts <= t && (untilMs === undefined || ts <= untilMs); ts += period) {
        const values = model.valuesAt(link.device, ts);
        if (values) sets.push({ ts, values });
      }
      link.nextTs = ts;
      if (sets.length > 0) publishSets(link, sets);
    }
    if (t >= nextMalformed && links.length > 0) {
      const link = links[malformedCount % links.length];
      if (link.client.connected) link.client.publish(deviceTopics.readings(link.device.code), malformedPayload(malformedCount, link.device, Math.floor(t / 1000) * 1000), { qos: 1 });
      malformedCount++;
      nextMalformed += opts.malformedEveryS * 1000;
    }
  };

  const tickMs = speed > 1 ? 250 : 1000;
  await new Promise<void>((resolve) => {
    const timer = setInterval(() => {
      tick();
      const reachedUntil = untilMs !== undefined && links.every((l) => l.nextTs > untilMs);
      const overDuration = opts.durationS !== undefined && Date.now() - wallStart >= opts.durationS * 1000;
      if (reachedUntil || overDuration || stopping) {
        clearInterval(timer);
        resolve();
      }
    }, tickMs);
    const onSignal = () => {
      stopping = true;
    };
    process.once("SIGTERM", onSignal);
    process.once("SIGINT", onSignal);
    const report = setInterval(() => log(`published ${published} readings, acknowledged ${acked}, failed ${failed}`), 30_000);
    report.unref();
  });

  // let the last messages be acknowledged, then sign off (the broker marks the devices offline)
  const deadline = Date.now() + 5000;
  while (links.some((l) => l.inFlight > 0) && Date.now() < deadline) await new Promise((r) => setTimeout(r, 50));
  await Promise.all(links.map((l) => new Promise<void>((r) => l.client.end(false, {}, () => r()))));
  if (ackedLog) await new Promise<void>((r) => ackedLog.end(() => r()));
  log(`stopped: published ${published} readings, acknowledged ${acked}, failed ${failed}`);
}

async function main() {
  const opts = readOptions();
  const env = getSettings();
  const anchorMs = resolveAnchor(opts.anchor, env.DATA_DIR, env.DB_NAME);
  const model = new PlantModel({ anchorMs, seed: opts.seed });
  const wanted = opts.devices ? new Set(opts.devices.split(",").map((s) => s.trim())) : null;
  const simDevices = model.devices.filter((d) => !wanted || wanted.has(d.code));
  log(`scenario anchor ${new Date(anchorMs).toISOString()}, seed ${opts.seed}, ${simDevices.length} devices`);

  let liveFrom = opts.from ?? Math.floor(Date.now() / 1000) * 1000;
  if (opts.backfillDays > 0) {
    const end = await writeHistory(
      model,
      { days: opts.backfillDays, thin: opts.thin, fullRateHours: opts.fullRateHours, rollupThin: 30, codes: simDevices.map((d) => d.code) },
      log,
    );
    liveFrom = opts.from ?? end;
  }
  await closeHistoryWriter();
  // the demo gateway's line comes through a simulated Sparkplug edge node (simulators/sparkplug-line.ts)
  const spb = opts.live ? sparkplugLine(model, log) : null;
  let liveDone = false;
  const jsonDevices = spb ? simDevices.filter((d) => !spb.codes.has(d.code)) : simDevices;
  if (opts.live) await Promise.all([runLive(opts, model, jsonDevices, liveFrom).finally(() => (liveDone = true)), spb?.run(liveFrom, () => liveDone)]);
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.filename);
if (isMain) {
  main()
    .then(() => process.exit(0))
    .catch((err: unknown) => {
      process.stderr.write(`plant: ${err instanceof Error ? err.stack ?? err.message : String(err)}\n`);
      void closeHistoryWriter().catch(() => undefined);
      process.exit(1);
    });
}
