// Who may publish and subscribe where (pure; the broker calls it for every packet).
//   device <code>:  publish  stillfield/d/<code>/readings and stillfield/d/<code>/status
//                   subscribe stillfield/d/<code>/cmd only
//   service account: publish and subscribe anywhere under stillfield/ (internal topics, device
//                   topics for the ingest worker, command topics)
// Nobody publishes to $SYS topics (a custom authorizePublish replaces aedes' own guard).
import { DEVICE_PREFIX, TOPIC_ROOT } from "../lib/contract/topics";

export type Principal = { kind: "service" } | { kind: "device"; code: string };

export function mayPublish(p: Principal, topic: string): boolean {
  if (topic.startsWith("$")) return false;
  if (p.kind === "service") return topic.startsWith(`${TOPIC_ROOT}/`);
  const own = `${DEVICE_PREFIX}${p.code}/`;
  return topic === `${own}readings` || topic === `${own}status`;
}

export function maySubscribe(p: Principal, filter: string): boolean {
  if (filter.startsWith("$")) return false;
  if (p.kind === "service") return filter.startsWith(`${TOPIC_ROOT}/`);
  return filter === `${DEVICE_PREFIX}${p.code}/cmd`;
}
