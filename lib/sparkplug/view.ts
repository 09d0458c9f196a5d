// View types of the Gateways page, shared by the read model (db/queries/gateways.ts) and the UI.
import type { Channel } from "../contract/readings-payload";
import type { Conversion } from "./metrics";

export type GatewayMetricView = {
  id: number;
  deviceName: string;
  name: string;
  alias: number | null;
  datatype: string;
  unit: string | null;
  lastValue: number | null;
  lastText: string | null;
  lastTs: number | null;
  targetDeviceId: number | null;
  targetChannel: Channel | null;
  conversion: Conversion;
};
export type GatewayDeviceView = { deviceName: string; online: boolean; lastBirthTs: number | null; lastDeathTs: number | null };
export type GatewayRejectionView = { id: number; ts: number; topic: string; reason: string; detail: string | null };
export type EdgeNodeView = {
  id: number;
  code: string;
  groupId: string;
  nodeId: string;
  label: string;
  enabled: boolean;
  online: boolean;
  bdSeq: number | null;
  lastBirthTs: number | null;
  lastDeathTs: number | null;
  lastSeenTs: number | null;
  clockSkewMs: number | null;
  rebirthRequests: number;
  seqGaps: number;
  rejectedCount: number;
  rejectedByReason: Record<string, number>;
  devices: GatewayDeviceView[];
  metrics: GatewayMetricView[];
  rejections: GatewayRejectionView[];
};
/** A Stillfield device a metric can feed, named by where it sits (point or hall). */
export type MappingTarget = { deviceId: number; code: string; label: string; place: string; channels: Channel[] };
