// MQTT topic names shared by devices, the broker's access rules, the ingest worker, the app's
// live routes and the simulators. A device lives under `stillfield/d/<code>/…`; everything the
// services say to each other lives under `stillfield/internal/…`, which only the service
// account may read or write.

export const TOPIC_ROOT = "stillfield";
export const DEVICE_PREFIX = `${TOPIC_ROOT}/d/`;
export const INTERNAL_PREFIX = `${TOPIC_ROOT}/internal/`;

/** A device code: what it signs in with and publishes under. No MQTT wildcards or separators. */
export const DEVICE_CODE_PATTERN = /^[A-Za-z0-9][A-Za-z0-9_.-]{0,63}$/;

export const deviceTopics = {
  readings: (code: string) => `${DEVICE_PREFIX}${code}/readings`,
  status: (code: string) => `${DEVICE_PREFIX}${code}/status`,
  command: (code: string) => `${DEVICE_PREFIX}${code}/cmd`,
};

/** Subscriptions of the ingest worker (every device's readings and online status). */
export const ALL_DEVICE_READINGS = `${DEVICE_PREFIX}+/readings`;
export const ALL_DEVICE_STATUS = `${DEVICE_PREFIX}+/status`;

export const internalTopics = {
  liveLine: (lineId: number) => `${INTERNAL_PREFIX}live/line/${lineId}`,
  liveArea: (areaId: number) => `${INTERNAL_PREFIX}live/area/${areaId}`,
  /** every live snapshot (for a subscriber that wants them all) */
  liveAll: `${INTERNAL_PREFIX}live/#`,
  alerts: `${INTERNAL_PREFIX}alerts`,
  devices: `${INTERNAL_PREFIX}devices`,
};

export type DeviceTopicKind = "readings" | "status" | "cmd";

/** Splits `stillfield/d/<code>/<kind>`; null for anything else (wrong root, extra levels, bad code). */
export function parseDeviceTopic(topic: string): { code: string; kind: DeviceTopicKind } | null {
  if (!topic.startsWith(DEVICE_PREFIX)) return null;
  const rest = topic.slice(DEVICE_PREFIX.length);
  const slash = rest.indexOf("/");
  if (slash <= 0) return null;
  const code = rest.slice(0, slash);
  const kind = rest.slice(slash + 1);
  if (kind !== "readings" && kind !== "status" && kind !== "cmd") return null;
  if (!DEVICE_CODE_PATTERN.test(code)) return null;
  return { code, kind };
}

/**
 * parseDeviceTopic with memory: a device sends on the same few topics all day, so each is read
 * once (at most `max` kept; the memory starts again when full).
 */
export function deviceTopicReader(max = 50_000): (topic: string) => ReturnType<typeof parseDeviceTopic> {
  const known = new Map<string, ReturnType<typeof parseDeviceTopic>>();
  return (topic) => {
    let t = known.get(topic);
    if (t === undefined) {
      t = parseDeviceTopic(topic);
      if (known.size >= max) known.clear();
      known.set(topic, t);
    }
    return t;
  };
}
