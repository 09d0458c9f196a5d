// What the Planned work page, the line charts and the handover show of a maintenance window.
import type { MaintenanceTarget } from "../alerts/maintenance-windows";

export type MaintenanceWindowView = {
  id: number;
  targetKind: MaintenanceTarget;
  targetId: number;
  /** "Press Hall", "Gravure Press 1", "Gravure Press 1 — 2. After print unit", "bar NB-101" */
  targetName: string;
  /** the line the target is on (null for a hall) — for links to its charts */
  lineId: number | null;
  /** the point the target is (a point) or serves (a neutralizer); null for a line or a hall */
  pointId: number | null;
  ownerId: number;
  ownerName: string;
  reason: string;
  startTs: number;
  endTs: number;
  extendReason: string | null;
  createdByName: string;
  endedEarlyTs: number | null;
  summary: string | null;
};

export type MaintenanceStatus = "planned" | "active" | "ended";

export function maintenanceStatus(w: Pick<MaintenanceWindowView, "startTs" | "endTs">, nowMs: number): MaintenanceStatus {
  if (nowMs < w.startTs) return "planned";
  return nowMs < w.endTs ? "active" : "ended";
}

export const MAINTENANCE_TARGET_WORDS: Record<MaintenanceTarget, string> = {
  area: "Hall",
  line: "Line",
  point: "Measuring point",
  neutralizer: "Neutralizer",
};

/** The target picker's choices, grouped; `value` is "kind:id" (e.g. "line:3"). */
export type MaintenanceTargetGroup = { kind: MaintenanceTarget; label: string; options: Array<{ value: string; label: string }> };

export function targetValue(kind: MaintenanceTarget, id: number): string {
  return `${kind}:${id}`;
}
