// The demo's Sparkplug B line: Labeller LB1's field meters and drive (lib/demo-gateway.ts) come
// into Stillfield through a simulated edge node (simulators/sparkplug-edge-node.ts) instead of the
// JSON contract, with the same values the plant model gives every other device, in the gateway's
// own units (charge in V, speed in m/min, running as a Boolean). It plays network outages: the
// node's connection drops (the broker sends its NDEATH will, so the line's points go silent), it
// keeps buffering for SIM_SPARKPLUG_OUTAGE_S (20 minutes by default), then reconnects with a new
// session, sends its births and uploads the buffer as historical metrics, which fill the gap on
// the line page. Switched on by SIM_SPARKPLUG_LINE=on (the demo stack, scripts/run-stack.ts);
// the plant simulator (simulators/plant.ts) then leaves these devices to it.
import { readSimulatorSecrets } from "./device-secrets";
import { DEMO_GATEWAY, DEMO_GATEWAY_METRICS, demoGatewayDeviceCodes } from "../lib/demo-gateway";
import { getSettings } from "../lib/settings";
import type { PlantModel, SimDevice } from "./plant-model";
import { SAMPLE_PERIOD_MS } from "./plant-model";
import { EdgeNode, type EdgeDeviceSpec } from "./sparkplug-edge-node";

/** the backlog published at start is capped (the plant simulator's backfill covers the rest) */
const MAX_BACKLOG_MS = 10 * 60_000;
const TICK_MS = 1000;

export type OutagePlan = { afterMs: number; durationMs: number; everyMs: number };

/** Whether wall time `t` falls in an outage of the plan, counted from `startMs`. */
export function inOutage(plan: OutagePlan, startMs: number, t: number): boolean {
  const since = t - startMs - plan.afterMs;
  if (since < 0) return false;
  return since % plan.everyMs < plan.durationMs;
}

/** The metric values of one gateway device at one moment, from a Stillfield device's channel values. */
export function gatewayValues(deviceName: string, values: Record<string, number>): Record<string, number | boolean> | null {
  const out: Record<string, number | boolean> = {};
  for (const m of DEMO_GATEWAY_METRICS) {
    if (m.deviceName !== deviceName) continue;
    if (m.target === null) {
      // web tension, unmapped: a plausible figure that follows the speed (N)
      if (m.name === "Web tension") out[m.name] = Math.round((35 + 0.25 * (values.speed_mpm ?? 0)) * 10) / 10;
      continue;
    }
    const v = values[m.target.channel];
    if (v === undefined) continue;
    out[m.name] = m.datatype === "Boolean" ? v > 0.5 : m.target.conversion === "v_to_kv" ? Math.round(v * 1000) : v;
  }
  return Object.keys(out).length ? out : null;
}

export type SparkplugLine = { codes: Set<string>; run(startMs: number, stopping: () => boolean): Promise<void> };

/** The line, or null when SIM_SPARKPLUG_LINE is off. */
export function sparkplugLine(model: PlantModel, log: (msg: string) => void): SparkplugLine | null {
  const s = getSettings();
  if (s.SIM_SPARKPLUG_LINE !== "on") return null;
  const codes = demoGatewayDeviceCodes();
  const plan: OutagePlan = { afterMs: s.SIM_SPARKPLUG_OUTAGE_AFTER_S * 1000, durationMs: s.SIM_SPARKPLUG_OUTAGE_S * 1000, everyMs: s.SIM_SPARKPLUG_OUTAGE_EVERY_S * 1000 };
  const bySource = new Map<string, { sim: SimDevice; deviceName: string }>();
  for (const m of DEMO_GATEWAY_METRICS) {
    const sim = m.target ? model.devices.find((d) => d.code === m.target!.code) : undefined;
    if (sim) bySource.set(sim.code, { sim, deviceName: m.deviceName });
  }
  const specs: EdgeDeviceSpec[] = [...new Set(DEMO_GATEWAY_METRICS.map((m) => m.deviceName))].map((name) => ({
    name,
    metrics: DEMO_GATEWAY_METRICS.filter((m) => m.deviceName === name).map((m) => ({ name: m.name, datatype: m.datatype, ...(m.unit ? { unit: m.unit } : {}) })),
  }));

  return {
    codes,
    async run(startMs, stopping) {
      const env = getSettings();
      const secret = readSimulatorSecrets(env.DB_NAME)[DEMO_GATEWAY.code];
      if (!secret) {
        log(`no secret for the Sparkplug gateway ${DEMO_GATEWAY.code} (run the seed); its line stays quiet`);
        return;
      }
      const node = new EdgeNode({ host: env.MQTT_HOST, port: env.MQTT_PORT, code: DEMO_GATEWAY.code, secret, groupId: DEMO_GATEWAY.groupId, nodeId: DEMO_GATEWAY.nodeId, devices: specs });
      const wallStart = Date.now();
      const next = new Map<string, number>();
      for (const code of bySource.keys()) next.set(code, Math.max(startMs, wallStart - MAX_BACKLOG_MS));
      let down = false;
      let connected = false;
      let outages = 0;

      const step = async () => {
        const now = Date.now();
        const wantDown = inOutage(plan, wallStart, now);
        if (wantDown && !down) {
          down = true;
          node.offline = true;
          outages++;
          if (connected) node.drop(); // no clean death: the broker publishes the will
          connected = false;
          log(`sparkplug line: network outage ${outages} begins (buffering for ${Math.round(plan.durationMs / 60_000)} min)`);
        }
        if (!wantDown && !connected) {
          await node.connect(); // a new session: births first
          connected = true;
          if (down) {
            down = false;
            node.offline = false;
            const n = await node.uploadBuffer(100);
            log(`sparkplug line: back online; uploaded ${n} buffered reading sets as historical metrics`);
          }
        }
        // readings up to now, per source device, one message per gateway device (buffered while down)
        const perDevice = new Map<string, Array<{ ts: number; values: Record<string, number | boolean> }>>();
        for (const [code, { sim, deviceName }] of bySource) {
          const period = SAMPLE_PERIOD_MS[sim.kind];
          let ts = Math.ceil(next.get(code)! / period) * period;
          for (; ts <= now; ts += period) {
            const v = model.valuesAt(sim, ts);
            const g = v ? gatewayValues(deviceName, v as Record<string, number>) : null;
            if (g) perDevice.set(deviceName, [...(perDevice.get(deviceName) ?? []), { ts, values: g }]);
          }
          next.set(code, ts);
        }
        for (const [deviceName, sets] of perDevice) for (const set of sets) await node.data(deviceName, set.values, set.ts);
      };

      log(`sparkplug line: ${DEMO_GATEWAY.groupId}/${DEMO_GATEWAY.nodeId} feeds ${[...codes].join(", ")}; first outage ${Math.round(plan.afterMs / 1000)} s after start`);
      while (!stopping()) {
        try {
          await step();
        } catch (err) {
          connected = false;
          log(`sparkplug line: ${err instanceof Error ? err.message : String(err)}; retrying`);
        }
        await new Promise((r) => setTimeout(r, TICK_MS));
      }
      if (connected) await node.stop().catch(() => undefined);
    },
  };
}
