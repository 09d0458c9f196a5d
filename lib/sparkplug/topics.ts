// Sparkplug B topic names (Sparkplug 3.0, chapter "Topics"), the host application's STATE
// message, and who may publish and subscribe where in the Sparkplug namespace. Pure: the broker's
// access rules, the host application, the simulator and the tests share it.
//
//   spBv1.0/<group id>/<NBIRTH|NDEATH|DBIRTH|DDEATH|NDATA|DDATA|NCMD|DCMD>/<edge node id>[/<device id>]
//   spBv1.0/STATE/<host id>        retained JSON {"online": true|false, "timestamp": <epoch ms>}
import { z } from "zod";

export const SPB_NAMESPACE = "spBv1.0";
export const SPB_MESSAGE_TYPES = ["NBIRTH", "NDEATH", "DBIRTH", "DDEATH", "NDATA", "DDATA", "NCMD", "DCMD"] as const;
export type SpbMessageType = (typeof SPB_MESSAGE_TYPES)[number];
const TYPE_SET: ReadonlySet<string> = new Set(SPB_MESSAGE_TYPES);
const NODE_TYPES: ReadonlySet<string> = new Set(["NBIRTH", "NDEATH", "NDATA", "NCMD"]);

/** A group, edge node, device or host id: UTF-8 without the MQTT separators and wildcards. */
export const SPB_ID_PATTERN = /^[^/+#\s]{1,64}$/;

export type SpbTopic =
  | { kind: "state"; hostId: string }
  | { kind: "message"; groupId: string; type: SpbMessageType; nodeId: string; deviceId: string | null };

/** Splits a Sparkplug topic; null for anything that is not one (wrong shape, bad id, wrong level count). */
export function parseSparkplugTopic(topic: string): SpbTopic | null {
  const parts = topic.split("/");
  if (parts[0] !== SPB_NAMESPACE) return null;
  if (parts[1] === "STATE") {
    if (parts.length !== 3 || !SPB_ID_PATTERN.test(parts[2])) return null;
    return { kind: "state", hostId: parts[2] };
  }
  if (parts.length !== 4 && parts.length !== 5) return null;
  const [, groupId, type, nodeId, deviceId] = parts;
  if (!TYPE_SET.has(type) || !SPB_ID_PATTERN.test(groupId) || !SPB_ID_PATTERN.test(nodeId)) return null;
  const nodeLevel = NODE_TYPES.has(type);
  if (nodeLevel !== (parts.length === 4)) return null;
  if (deviceId !== undefined && !SPB_ID_PATTERN.test(deviceId)) return null;
  return { kind: "message", groupId, type: type as SpbMessageType, nodeId, deviceId: deviceId ?? null };
}

export const sparkplugTopics = {
  state: (hostId: string) => `${SPB_NAMESPACE}/STATE/${hostId}`,
  node: (groupId: string, type: "NBIRTH" | "NDEATH" | "NDATA" | "NCMD", nodeId: string) => `${SPB_NAMESPACE}/${groupId}/${type}/${nodeId}`,
  device: (groupId: string, type: "DBIRTH" | "DDEATH" | "DDATA" | "DCMD", nodeId: string, deviceId: string) =>
    `${SPB_NAMESPACE}/${groupId}/${type}/${nodeId}/${deviceId}`,
  /** the host application's subscription: every group, node and device */
  all: `${SPB_NAMESPACE}/#`,
};

/** The host's STATE payload (3.0: JSON, UTF-8; the birth repeats the timestamp of the will). */
export const hostStateSchema = z.object({ online: z.boolean(), timestamp: z.number().int().nonnegative() });
export type HostState = z.infer<typeof hostStateSchema>;
export const hostStatePayload = (online: boolean, timestamp: number) => JSON.stringify({ online, timestamp });

export type EdgeNodeIdentity = { groupId: string; nodeId: string };

/**
 * An edge node may publish only births, deaths and data under its own group and node id
 * (`spBv1.0/<group>/+/<its node id>/#`, commands excluded: those are the host's to send).
 */
export function edgeNodeMayPublish(p: EdgeNodeIdentity, topic: string): boolean {
  const t = parseSparkplugTopic(topic);
  if (!t || t.kind !== "message") return false;
  if (t.type === "NCMD" || t.type === "DCMD") return false;
  return t.groupId === p.groupId && t.nodeId === p.nodeId;
}

/**
 * An edge node may read the commands addressed to it (and to its devices) and any host's STATE:
 * `spBv1.0/<group>/NCMD/<node>`, `spBv1.0/<group>/DCMD/<node>/<device or +>`, the same with
 * `/#`, and `spBv1.0/STATE/<host id or +>`.
 */
export function edgeNodeMaySubscribe(p: EdgeNodeIdentity, filter: string): boolean {
  const parts = filter.split("/");
  if (parts[0] !== SPB_NAMESPACE) return false;
  if (parts[1] === "STATE") return parts.length === 3 && (parts[2] === "+" || SPB_ID_PATTERN.test(parts[2]));
  if (parts[1] !== p.groupId || parts[3] !== p.nodeId) return false;
  if (parts[2] !== "NCMD" && parts[2] !== "DCMD") return false;
  if (parts.length === 4) return parts[2] === "NCMD";
  if (parts.length !== 5) return false;
  return parts[4] === "#" || (parts[2] === "DCMD" && (parts[4] === "+" || SPB_ID_PATTERN.test(parts[4])));
}

/** Topics a broker may publish for a client of another broker instance (wills): deaths and STATE. */
export function isSparkplugWillTopic(topic: string): boolean {
  const t = parseSparkplugTopic(topic);
  return t !== null && (t.kind === "state" || t.type === "NDEATH");
}

/** The host application (the ingest worker's account) publishes STATE and commands only. */
export function hostMayPublish(topic: string): boolean {
  const t = parseSparkplugTopic(topic);
  return t !== null && (t.kind === "state" || t.type === "NCMD" || t.type === "DCMD");
}

/** The host application may read the whole Sparkplug namespace. */
export function hostMaySubscribe(filter: string): boolean {
  return filter === `${SPB_NAMESPACE}/#` || filter.startsWith(`${SPB_NAMESPACE}/`);
}
