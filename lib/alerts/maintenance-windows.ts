/**
 * Maintenance windows: planned work on a neutralizer, point, line or hall, with an owner, a
 * reason, a start and an end. During a window the alerts it explains are recorded but nobody is
 * told; when it ends, a summary says what happened in it and a re-check sends the alerts whose
 * condition is still there, as usual.
 *
 * Pure: the rules for opening and extending a window, which alerts it explains, its summary.
 */
import { z } from "zod";
import { formatDuration } from "../vocabulary";

export const MAINTENANCE_TARGETS = ["neutralizer", "point", "line", "area"] as const;
export type MaintenanceTarget = (typeof MAINTENANCE_TARGETS)[number];

/** Longest window without an extension (plant setting: one long shift, 12 h). */
export const MAX_WINDOW_MS = 12 * 3_600_000;

export type MaintenanceWindow = {
  id: number;
  targetKind: MaintenanceTarget;
  targetId: number;
  ownerId: number;
  reason: string;
  startTs: number;
  endTs: number;
  /** Why it was extended past MAX_WINDOW_MS (null: never extended). */
  extendReason: string | null;
};

const reasonSchema = z.string().trim().min(3, { message: "Say why (at least 3 characters)" }).max(300);

export const openWindowSchema = z
  .object({
    targetKind: z.enum(MAINTENANCE_TARGETS),
    targetId: z.coerce.number().int().positive(),
    reason: reasonSchema,
    startTs: z.coerce.number().int().min(0),
    endTs: z.coerce.number().int().min(0),
  })
  .refine((w) => w.endTs > w.startTs, { message: "The end must be after the start", path: ["endTs"] })
  .refine((w) => w.endTs - w.startTs <= MAX_WINDOW_MS, { message: `At most ${MAX_WINDOW_MS / 3_600_000} h; extend it later with a reason`, path: ["endTs"] });
export type OpenWindowInput = z.infer<typeof openWindowSchema>;

export const extendWindowSchema = z.object({ id: z.coerce.number().int().positive(), endTs: z.coerce.number().int().min(0), reason: reasonSchema });

/** A new end for a window: later than now and the old end; always needs a reason. */
export function checkExtension(w: Pick<MaintenanceWindow, "startTs" | "endTs">, newEndTs: number, nowMs: number): { ok: true } | { ok: false; message: string } {
  if (newEndTs <= w.endTs) return { ok: false, message: "An extension must end later than the window does now" };
  if (newEndTs <= nowMs) return { ok: false, message: "An extension must end in the future" };
  if (newEndTs - w.startTs > 7 * 24 * 3_600_000) return { ok: false, message: "A window cannot run longer than a week; shelve or disable the rule instead" };
  return { ok: true };
}

/** Where an alert is, as far as windows care. */
export type AlertPlace = { areaId: number | null; lineId: number | null; pointId: number | null; neutralizerId: number | null };

/**
 * Whether a window explains an alert at this place: a hall window covers everything in the
 * hall, a line window its points and bars, a point window the point and the bar serving it, a
 * neutralizer window the bar and the point it serves (`neutralizerPointId`).
 */
export function windowExplains(w: Pick<MaintenanceWindow, "targetKind" | "targetId">, place: AlertPlace, neutralizerPointId: number | null = null): boolean {
  switch (w.targetKind) {
    case "area":
      return place.areaId === w.targetId;
    case "line":
      return place.lineId === w.targetId;
    case "point":
      return place.pointId === w.targetId;
    case "neutralizer":
      return place.neutralizerId === w.targetId || (neutralizerPointId !== null && place.pointId === neutralizerPointId);
  }
}

export function isActiveAt(w: Pick<MaintenanceWindow, "startTs" | "endTs">, ts: number): boolean {
  return ts >= w.startTs && ts < w.endTs;
}

/** The window (if any) that explains an alert raised at ts. */
export function explainingWindow<W extends MaintenanceWindow>(windows: readonly W[], place: AlertPlace, ts: number, pointOfNeutralizer: (id: number) => number | null = () => null): W | null {
  for (const w of windows) {
    if (!isActiveAt(w, ts)) continue;
    if (windowExplains(w, place, w.targetKind === "neutralizer" ? pointOfNeutralizer(w.targetId) : null)) return w;
  }
  return null;
}

export type WindowAlert = { id: number; message: string; startTs: number; endTs: number | null };

export type WindowSummary = { text: string; raised: number; cleared: number; stillActive: number[] };

/** What happened during a window, for the handover and the owner; the still-active alerts are re-checked (notified as usual). */
export function summarizeWindow(w: Pick<MaintenanceWindow, "startTs" | "endTs" | "reason">, targetName: string, alerts: readonly WindowAlert[]): WindowSummary {
  const during = alerts.filter((a) => a.startTs >= w.startTs && a.startTs < w.endTs);
  const cleared = during.filter((a) => a.endTs !== null && a.endTs <= w.endTs);
  const stillActive = during.filter((a) => a.endTs === null || a.endTs > w.endTs).map((a) => a.id);
  const head = `Maintenance on ${targetName} (${w.reason}) ran ${formatDuration(w.endTs - w.startTs)}`;
  const body =
    during.length === 0
      ? "no alerts were raised during it."
      : `${during.length} alert${during.length === 1 ? " was" : "s were"} recorded without notice, ${cleared.length} cleared by its end` +
        (stillActive.length ? `; ${stillActive.length} still active, so ${stillActive.length === 1 ? "it is" : "they are"} now notified as usual.` : ".");
  return { text: `${head}: ${body}`, raised: during.length, cleared: cleared.length, stillActive };
}
