// The line page's time ranges: live (last 15 min, streaming), the current shift, 24 h, 7 days,
// 30 days, or a custom range, kept in the URL (?range=7d, ?range=custom&from=…&to=…) so a
// reload or a shared link shows the same window.
import { shiftAt, type ShiftSpec } from "@/lib/plant-time";
import { DAY_MS } from "@/lib/vocabulary";

export const RANGE_KINDS = ["live", "shift", "24h", "7d", "30d", "custom"] as const;
export type RangeKind = (typeof RANGE_KINDS)[number];
export type RangeState = { kind: RangeKind; from?: number; to?: number };

export const LIVE_WINDOW_MS = 15 * 60_000;

export const RANGE_LABELS: Record<RangeKind, string> = {
  live: "Live",
  shift: "Shift",
  "24h": "24 h",
  "7d": "7 days",
  "30d": "30 days",
  custom: "Custom",
};

/** How often a range ending "now" moves its right edge (and refetches). */
export function anchorStepMs(kind: RangeKind): number {
  if (kind === "7d" || kind === "30d") return 5 * 60_000;
  return 60_000;
}

export function resolveRange(r: RangeState, now: number, spec: ShiftSpec): [number, number] {
  switch (r.kind) {
    case "live":
      return [now - LIVE_WINDOW_MS, now];
    case "shift":
      return [shiftAt(now, spec).startTs, now];
    case "24h":
      return [now - DAY_MS, now];
    case "7d":
      return [now - 7 * DAY_MS, now];
    case "30d":
      return [now - 30 * DAY_MS, now];
    case "custom": {
      const to = r.to ?? now;
      const from = r.from ?? to - DAY_MS;
      return from < to ? [from, to] : [to - DAY_MS, to];
    }
  }
}

export function parseRangeParams(get: (key: string) => string | null): RangeState {
  const kind = get("range");
  // a link to a moment (?at=… from an e-mail or the alerts list) without a range: the hour around it
  const at = Number(get("at"));
  if (!kind && Number.isFinite(at) && at > 0) return { kind: "custom", from: at - 30 * 60_000, to: at + 30 * 60_000 };
  if (!kind || !(RANGE_KINDS as readonly string[]).includes(kind)) return { kind: "live" };
  if (kind === "custom") {
    const from = Number(get("from"));
    const to = Number(get("to"));
    if (Number.isFinite(from) && Number.isFinite(to) && from > 0 && from < to) return { kind: "custom", from, to };
    return { kind: "24h" };
  }
  return { kind: kind as RangeKind };
}

export function rangeToQuery(r: RangeState): string {
  if (r.kind === "live") return "";
  if (r.kind === "custom") return `?range=custom&from=${r.from}&to=${r.to}`;
  return `?range=${r.kind}`;
}
