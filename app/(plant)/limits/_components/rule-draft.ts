// A rule being edited in the limits editor: the form's text values (draftFrom), the request
// body they make for the replay and save routes (bodyOf), and the JSON post to those routes.
import type { RuleKind, Severity } from "@/lib/vocabulary";
import { NOT_LINE_GATED, PARAM_FIELDS } from "./rule-fields";
import type { Place, RuleInfo } from "./rules-in-force";

export type Draft = {
  ruleId?: number;
  baseVersion?: number;
  kind: RuleKind;
  severity: Severity;
  place: Place;
  fields: Record<string, string>;
  onDelayS: string;
  offDelayS: string;
  onlyWhileRunning: boolean;
  enabled: boolean;
  comment: string;
  /** what it was based on, for "was → now" */
  from: RuleInfo | null;
};

export function draftFrom(rule: RuleInfo | null, kind: RuleKind, severity: Severity, place: Place, own: boolean): Draft {
  const fields: Record<string, string> = {};
  for (const f of PARAM_FIELDS[kind]) {
    const v = rule?.params[f.key];
    fields[f.key] = typeof v === "number" ? String(f.percentOfFraction ? Math.round(v * 1000) / 10 : v) : typeof v === "string" ? v : f.choices ? f.choices[0].value : "";
  }
  return {
    ruleId: own && rule ? rule.id : undefined,
    baseVersion: own && rule ? rule.currentVersion : undefined,
    kind,
    severity: rule?.severity ?? severity,
    place,
    fields,
    onDelayS: String(rule?.onDelayS ?? 0),
    offDelayS: String(rule?.offDelayS ?? 0),
    onlyWhileRunning: NOT_LINE_GATED.has(kind) ? false : (rule?.onlyWhileRunning ?? true),
    enabled: own && rule ? rule.enabled : true,
    comment: "",
    from: rule,
  };
}

export function bodyOf(d: Draft): Record<string, unknown> {
  const params: Record<string, unknown> = {};
  for (const f of PARAM_FIELDS[d.kind]) {
    const raw = (d.fields[f.key] ?? "").trim();
    if (raw === "" && f.optional) continue;
    if (f.choices) params[f.key] = raw;
    else params[f.key] = raw === "" ? Number.NaN : f.percentOfFraction ? Number(raw) / 100 : Number(raw);
  }
  return {
    ...(d.ruleId !== undefined ? { ruleId: d.ruleId, baseVersion: d.baseVersion } : {}),
    kind: d.kind,
    scope: { pointId: d.place.pointId, lineId: d.place.lineId, areaId: d.place.areaId },
    severity: d.severity,
    onDelayS: d.onDelayS.trim() === "" ? Number.NaN : Number(d.onDelayS),
    offDelayS: d.offDelayS.trim() === "" ? Number.NaN : Number(d.offDelayS),
    onlyWhileRunning: d.onlyWhileRunning,
    enabled: d.enabled,
    params,
  };
}

type ApiError = { error?: string; fieldErrors?: Record<string, string[]> };

export async function postJson<T>(url: string, body: unknown): Promise<{ ok: true; data: T } | { ok: false; status: number; error: ApiError }> {
  const res = await fetch(url, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body, (_k, v) => (typeof v === "number" && Number.isNaN(v) ? null : v)) });
  const json: unknown = await res.json().catch(() => ({}));
  if (res.ok) return { ok: true, data: json as T }; // our own route's answer
  return { ok: false, status: res.status, error: (json ?? {}) as ApiError };
}
