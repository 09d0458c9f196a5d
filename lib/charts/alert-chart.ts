// What an alert's chart shows (pure): which channel, in which unit, over which hour, with which
// limit lines and which moment marked; and the rule in words. Used by the alert page, the
// on-call e-mail (the mailer draws it) and the frozen link that opens the same view later.
import { z } from "zod";
import type { RuleKind } from "../vocabulary";

export const ALERT_CHART_SPAN_MS = 3_600_000;

export type AlertChartChannel = "charge_kv" | "rh_pct" | "temp_c" | "speed_mpm";

export type AlertChartSpec = {
  alertId: number;
  deviceId: number;
  channel: AlertChartChannel;
  unit: string;
  fromTs: number;
  toTs: number;
  markTs: number;
  limits: Array<{ value: number; label: string }>;
  title: string;
  /** the line page to open at this moment, when the alert has a line */
  lineId: number | null;
};

export const CHANNEL_UNITS: Record<AlertChartChannel, string> = { charge_kv: "kV", rh_pct: "% RH", temp_c: "°C", speed_mpm: "m/min" };

/** The channel an alert kind is about (sensor health alerts: the sensor's main channel). */
export function channelOfAlert(kind: RuleKind, params: Record<string, unknown>, deviceKind: string | null): AlertChartChannel {
  if (kind === "rh_low" || kind === "rh_forecast") return "rh_pct";
  if (kind === "sensor_flat" && typeof params.channel === "string" && params.channel in CHANNEL_UNITS) return params.channel as AlertChartChannel;
  if ((kind === "sensor_silent" || kind === "sensor_flat") && deviceKind === "th_logger") return "rh_pct";
  if ((kind === "sensor_silent" || kind === "sensor_flat") && deviceKind === "speed_gateway") return "speed_mpm";
  return "charge_kv";
}

function num(v: unknown): number | null {
  return typeof v === "number" && Number.isFinite(v) ? v : null;
}

/** Limit lines from the rule version's parameters: ± the charge limit (either polarity), or the RH limit. */
export function limitLinesOf(kind: RuleKind, params: Record<string, unknown>): Array<{ value: number; label: string }> {
  if (kind === "charge_high") {
    const l = num(params.limitKv);
    return l === null ? [] : [{ value: l, label: `limit +${l} kV` }, { value: -l, label: `limit \u2212${l} kV` }];
  }
  if (kind === "rh_low" || kind === "rh_forecast") {
    const l = num(params.limitPct);
    return l === null ? [] : [{ value: l, label: `limit ${l} % RH` }];
  }
  return [];
}

/**
 * The hour the chart covers: for an alert still open, the hour up to now; for one that ended,
 * the hour up to its end; always wide enough to show the moment it was raised when that was
 * within the last hour (else the hour around the raise).
 */
export function alertChartWindow(a: { startTs: number; endTs: number | null }, nowMs: number): { fromTs: number; toTs: number } {
  const toTs = Math.min(nowMs, a.endTs ?? nowMs);
  if (toTs - a.startTs <= ALERT_CHART_SPAN_MS * 0.9) return { fromTs: toTs - ALERT_CHART_SPAN_MS, toTs };
  return { fromTs: a.startTs - ALERT_CHART_SPAN_MS / 2, toTs: a.startTs + ALERT_CHART_SPAN_MS / 2 };
}

/** The rule in a sentence ("Raised when |charge| is above 20 kV for 10 s; cleared below 16 kV."). */
export function describeRule(kind: RuleKind, params: Record<string, unknown>, onDelayS: number, offDelayS: number): string {
  const hold = onDelayS > 0 ? ` for ${onDelayS} s` : "";
  const offHold = offDelayS > 0 ? ` for ${offDelayS} s` : "";
  switch (kind) {
    case "charge_high":
      return `Raised when the charge of either polarity is above ${num(params.limitKv) ?? "?"} kV${hold}; cleared when it is back below ${num(params.clearKv) ?? "?"} kV${offHold}.`;
    case "charge_rate":
      return `Raised when the charge grows faster than ${num(params.rateKvPerMin) ?? "?"} kV/min over ${num(params.windowS) ?? "?"} s${hold}.`;
    case "rh_low":
      return `Raised when the hall's relative humidity is below ${num(params.limitPct) ?? "?"} %${hold}; cleared above ${num(params.clearPct) ?? "?"} %${offHold}.`;
    case "rh_forecast":
      return `Raised when the humidity trend over ${num(params.windowMin) ?? "?"} min is expected to cross ${num(params.limitPct) ?? "?"} % within ${num(params.horizonMin) ?? "?"} min.`;
    case "sensor_silent":
      return `Raised when a sensor sends nothing for ${num(params.silentS) ?? "?"} s.`;
    case "sensor_flat":
      return `Raised when a sensor's reading stays within ${num(params.tolerance) ?? "?"} for ${num(params.windowS) ?? "?"} s (a stuck sensor).`;
    case "effect_loss":
      return "Raised when the charge after a neutralizer is no longer well below the charge before it.";
  }
}

/** The link that opens the line page at this chart's span later (the "frozen" link). */
export function frozenLineLink(appUrl: string, lineId: number, spec: { fromTs: number; toTs: number; markTs: number }): string {
  return `${appUrl.replace(/\/$/, "")}/lines/${lineId}?at=${spec.markTs}&range=custom&from=${spec.fromTs}&to=${spec.toTs}`;
}

/** The chart spec as stored on an outbox mail and read back by the mailer. */
export const alertChartSpecSchema = z.object({
  alertId: z.number().int(),
  deviceId: z.number().int(),
  channel: z.enum(["charge_kv", "rh_pct", "temp_c", "speed_mpm"]),
  unit: z.string().max(20),
  fromTs: z.number().int(),
  toTs: z.number().int(),
  markTs: z.number().int(),
  limits: z.array(z.object({ value: z.number(), label: z.string().max(60) })).max(4),
  title: z.string().max(120),
  lineId: z.number().int().nullable(),
});

/** The content id of the inline chart image in an alert e-mail. */
export const ALERT_CHART_CID = "alert-chart@stillfield";
