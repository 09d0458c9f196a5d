// The demo plant's Sparkplug B gateway (invented): Labeller LB1's meters and drive come into
// Stillfield through an edge node in the Labelling Room instead of Stillfield's JSON. The seed
// registers it with its metrics already mapped (db/seed-gateway.ts); the demo's simulated edge
// node publishes them (simulators/sparkplug-line.ts), in the gateway's own units.
import type { Channel } from "./contract/readings-payload";
import { fieldMeterCode, speedGatewayCode } from "./demo-plant";
import type { Conversion } from "./sparkplug/metrics";

export const DEMO_GATEWAY = {
  code: "spb-labeller-1",
  groupId: "harrow-fen",
  nodeId: "labeller-1-gw",
  label: "Labeller LB1 line gateway",
  lineSlug: "labeller-1",
} as const;

export type DemoGatewayMetric = {
  deviceName: string;
  name: string;
  datatype: "Float" | "Double" | "Boolean";
  unit: string | null;
  /** the Stillfield device and channel it feeds (null: left unmapped, still listed) */
  target: { code: string; channel: Channel; conversion: Conversion } | null;
};

export const DEMO_GATEWAY_METRICS: DemoGatewayMetric[] = [
  { deviceName: "liner-unwind-meter", name: "Charge", datatype: "Float", unit: "V", target: { code: fieldMeterCode("labeller-1", "liner-unwind"), channel: "charge_kv", conversion: "v_to_kv" } },
  { deviceName: "dispense-meter", name: "Charge", datatype: "Float", unit: "V", target: { code: fieldMeterCode("labeller-1", "dispense"), channel: "charge_kv", conversion: "v_to_kv" } },
  { deviceName: "drive", name: "Line speed", datatype: "Float", unit: "m/min", target: { code: speedGatewayCode("labeller-1"), channel: "speed_mpm", conversion: "none" } },
  { deviceName: "drive", name: "Running", datatype: "Boolean", unit: null, target: { code: speedGatewayCode("labeller-1"), channel: "running", conversion: "none" } },
  { deviceName: "drive", name: "Web tension", datatype: "Float", unit: "N", target: null },
];

/** The Stillfield devices the demo gateway feeds (the JSON simulator leaves them to it). */
export function demoGatewayDeviceCodes(): Set<string> {
  return new Set(DEMO_GATEWAY_METRICS.flatMap((m) => (m.target ? [m.target.code] : [])));
}
