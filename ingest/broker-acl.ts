// Who may publish and subscribe where (pure; the broker calls it for every packet).
//   device <code>:      publish   stillfield/d/<code>/readings and stillfield/d/<code>/status
//                       subscribe stillfield/d/<code>/cmd only
//   worker (svc-worker): subscribe device topics (stillfield/d/…, wildcards allowed)
//                       publish   internal topics (stillfield/internal/…) and device commands
//                                 (stillfield/d/<code>/cmd); never a device's readings or status
//   app (svc-app):      subscribe internal topics only
//                       publish   stillfield/internal/alerts only (alert changes made on a page)
// So a leaked app account can neither fake readings nor fake the live snapshots the Floor shows.
// Nobody publishes to $SYS topics (a custom authorizePublish replaces aedes' own guard).
import { DEVICE_PREFIX, INTERNAL_PREFIX, internalTopics, parseDeviceTopic } from "../lib/contract/topics";
import type { ServiceRole } from "../lib/settings";
import { edgeNodeMayPublish, edgeNodeMaySubscribe, hostMayPublish, hostMaySubscribe } from "../lib/sparkplug/topics";

export type Principal =
  | { kind: "service"; role: ServiceRole }
  | { kind: "device"; code: string }
  // a Sparkplug edge node: spBv1.0/<group>/+/<node>/# only, plus its commands and host STATE
  | { kind: "edge_node"; code: string; groupId: string; nodeId: string };

const hasWildcard = (topic: string) => topic.includes("+") || topic.includes("#");

export function mayPublish(p: Principal, topic: string): boolean {
  if (topic.startsWith("$") || hasWildcard(topic)) return false;
  if (p.kind === "edge_node") return edgeNodeMayPublish(p, topic);
  if (p.kind === "service" && p.role === "worker" && hostMayPublish(topic)) return true;
  if (p.kind === "service") {
    if (p.role === "app") return topic === internalTopics.alerts;
    if (topic.startsWith(INTERNAL_PREFIX)) return true;
    return parseDeviceTopic(topic)?.kind === "cmd";
  }
  const own = `${DEVICE_PREFIX}${p.code}/`;
  return topic === `${own}readings` || topic === `${own}status`;
}

export function maySubscribe(p: Principal, filter: string): boolean {
  if (filter.startsWith("$")) return false;
  if (p.kind === "edge_node") return edgeNodeMaySubscribe(p, filter);
  if (p.kind === "service" && p.role === "worker" && hostMaySubscribe(filter)) return true;
  if (p.kind === "service") return filter.startsWith(p.role === "worker" ? DEVICE_PREFIX : INTERNAL_PREFIX);
  return filter === `${DEVICE_PREFIX}${p.code}/cmd`;
}
