// The alerts list's filters and how they read from the page's URL (server and client alike).
import type { AlertState } from "@/lib/vocabulary";

export type AlertFilterState = {
  area: number | null;
  line: number | null;
  /** "open" (not closed), one state, or "all" */
  state: "open" | "all" | AlertState;
  /** hours back, or null for any time */
  hours: number | null;
};

const STATE_VALUES = ["open", "all", "active_unacked", "active_acked", "cleared_unacked", "closed"] as const;

export function isStateChoice(v: string): v is AlertFilterState["state"] {
  return (STATE_VALUES as readonly string[]).includes(v);
}

export const DEFAULT_ALERT_HOURS = 168;

export function parseAlertFilters(sp: Record<string, string | string[] | undefined>): AlertFilterState {
  const one = (k: string) => {
    const v = sp[k];
    return Array.isArray(v) ? v[0] : v;
  };
  const posInt = (v: string | undefined) => (v && /^\d+$/.test(v) && Number(v) > 0 ? Number(v) : null);
  const state = one("state");
  const hours = one("hours");
  return {
    area: posInt(one("area")),
    line: posInt(one("line")),
    state: state && isStateChoice(state) ? state : "open",
    hours: hours === "any" ? null : (posInt(hours) ?? DEFAULT_ALERT_HOURS),
  };
}
