/**
 * Warnings about equipment settings that will not work, shown beside the equipment forms and on
 * the equipment pages. They do not block saving: the engineer may know better (a bar mounted
 * far away on purpose while a guard is fitted); they say what is likely wrong and why.
 *
 * The distances are rules of thumb of static-control practice, not limits from a standard; each
 * kind's range lives with the kind (lib/physics/neutralizer-kinds.ts).
 * Pure: no I/O.
 */

import { mountingRangeMm, NEUTRALIZER_KIND_SPECS, type NeutralizerKind } from "./physics/neutralizer-kinds";

export type EquipmentWarning = {
  /** stable code for tests and for grouping */
  code: string;
  /** the form field it is about */
  field: string;
  message: string;
  /** "common practice" or the standard the rule comes from */
  source: string;
};

export type NeutralizerSettings = {
  kind: NeutralizerKind;
  airAssisted: boolean;
  mountingDistanceMm: number | null;
  lengthMm: number | null;
  outputKv: number | null;
  pointId: number | null;
  state: "in_service" | "needs_cleaning" | "faulty" | "removed";
  cleaningIntervalDays: number;
  checkIntervalDays: number;
  /** the line it serves runs solvent inks or coatings (ink mist fouls emitters fast) */
  solventLine?: boolean;
};

/** A field meter's reading is only right at the distance it was calibrated for; 10 % or 2 mm of slack. */
export const FIELD_METER_DISTANCE_TOLERANCE = { fraction: 0.1, mm: 2 };

const COMMON = "common practice";

/**
 * Mounting distance against the kind's usual range (lib/physics/neutralizer-kinds.ts): too far
 * and the ions recombine or spread before they reach the web; too close and a fluttering web
 * can touch the emitters or draw sparks from them.
 */
function distanceWarnings(n: NeutralizerSettings): EquipmentWarning[] {
  const d = n.mountingDistanceMm;
  const spec = NEUTRALIZER_KIND_SPECS[n.kind];
  const { minMm, maxMm } = mountingRangeMm(n.kind, n.airAssisted);
  if (d === null) {
    if (maxMm !== null && n.state !== "removed") {
      return [{ code: "no_distance", field: "mountingDistanceMm", message: `Record the mounting distance to the web: a ${spec.label.toLowerCase()}'s effect depends on it (usually ${range(minMm, maxMm)}).`, source: COMMON }];
    }
    return [];
  }
  const out: EquipmentWarning[] = [];
  if (maxMm !== null && d > maxMm) {
    out.push({
      code: "too_far",
      field: "mountingDistanceMm",
      message: `A ${spec.label.toLowerCase()} is usually mounted ${range(minMm, maxMm)} from the web; at ${fmt(d)} mm it will remove little charge. Move it closer${n.kind === "ac_bar" ? ", or use a pulsed-DC or air-assisted bar where it must sit farther away" : ""}.`,
      source: spec.source,
    });
  }
  if (minMm !== null && d < minMm) {
    out.push({
      code: "too_close",
      field: "mountingDistanceMm",
      message:
        n.kind === "pulsed_dc_bar"
          ? `${fmt(d)} mm is close for a pulsed-DC bar: at short range its pulses leave bands of alternating charge on the web. ${range(minMm, maxMm)} is usual; use an AC bar close in.`
          : `${fmt(d)} mm is very close: a fluttering web can touch the emitters or draw sparks from them. ${range(minMm, maxMm)} is usual for a ${spec.label.toLowerCase()}.`,
      source: spec.source,
    });
  }
  return out;
}

function range(minMm: number | null, maxMm: number | null): string {
  if (minMm !== null && maxMm !== null) return `${fmt(minMm)}–${fmt(maxMm)} mm`;
  if (maxMm !== null) return `within ${fmt(maxMm)} mm`;
  return "at a distance that suits it";
}

export function neutralizerWarnings(n: NeutralizerSettings): EquipmentWarning[] {
  const out: EquipmentWarning[] = [...distanceWarnings(n)];
  if (n.pointId === null && n.state !== "removed") {
    out.push({
      code: "no_point",
      field: "pointId",
      message: "Not attached to a measuring point: its effect (charge before vs after) cannot be computed and it is left out of the line's picture.",
      source: "Stillfield",
    });
  }
  if (n.solventLine && n.cleaningIntervalDays > 14 && n.state !== "removed") {
    out.push({
      code: "solvent_cleaning_interval",
      field: "cleaningIntervalDays",
      message: `Every ${n.cleaningIntervalDays} days is a long cleaning interval on a solvent press: ink mist fouls emitters within days; weekly is usual.`,
      source: COMMON,
    });
  }
  if (n.checkIntervalDays > 365) {
    out.push({
      code: "check_interval_long",
      field: "checkIntervalDays",
      message: "A verification less than once a year lets a failing neutralizer go unnoticed for too long; quarterly to yearly is usual in ESD programs.",
      source: COMMON,
    });
  }
  return out;
}

export type DeviceSettings = {
  kind: "field_meter" | "th_logger" | "speed_gateway";
  calibratedDistanceMm: number | null;
  mountingDistanceMm: number | null;
  /** "YYYY-MM-DD" */
  calibrationDue: string | null;
  pointId: number | null;
  areaId: number | null;
  lineId: number | null;
};

/** Today's date as "YYYY-MM-DD" is passed in so the function stays pure. */
export function deviceWarnings(dev: DeviceSettings, todayIso: string): EquipmentWarning[] {
  const out: EquipmentWarning[] = [];
  if (dev.kind === "field_meter") {
    const cal = dev.calibratedDistanceMm;
    const mount = dev.mountingDistanceMm;
    if (cal !== null && mount !== null) {
      const slack = Math.max(FIELD_METER_DISTANCE_TOLERANCE.mm, cal * FIELD_METER_DISTANCE_TOLERANCE.fraction);
      if (Math.abs(cal - mount) > slack) {
        out.push({
          code: "meter_distance_mismatch",
          field: "mountingDistanceMm",
          // the meter turns the field it sees into volts for its calibrated gap; the field near a
          // charged web falls as the gap grows, so the reading scales roughly with cal / mount
          // (from memory; worse still on a narrow web)
          message: `Calibrated for ${fmt(cal)} mm but mounted at ${fmt(mount)} mm: readings will be ${mount > cal ? "too low" : "too high"}, roughly ×${fmt(cal / mount)}. Mount it at ${fmt(cal)} mm or have it recalibrated for ${fmt(mount)} mm.`,
          source: COMMON,
        });
      }
    }
    if (cal === null) {
      out.push({ code: "meter_no_calibrated_distance", field: "calibratedDistanceMm", message: "Record the distance the meter is calibrated for (25 mm is usual); readings are only right at that distance.", source: COMMON });
    }
    if (dev.pointId === null) {
      out.push({ code: "meter_no_point", field: "pointId", message: "A field meter without a measuring point shows nowhere on the Floor.", source: "Stillfield" });
    }
  }
  if (dev.kind === "th_logger" && dev.areaId === null) {
    out.push({ code: "logger_no_hall", field: "areaId", message: "A temperature/humidity logger needs a hall; its readings set the hall's humidity.", source: "Stillfield" });
  }
  if (dev.kind === "speed_gateway" && dev.lineId === null) {
    out.push({ code: "gateway_no_line", field: "lineId", message: "A speed gateway needs a line; its running signal gates that line's charge limits.", source: "Stillfield" });
  }
  if (dev.calibrationDue !== null && dev.calibrationDue < todayIso) {
    out.push({ code: "calibration_overdue", field: "calibrationDue", message: `Calibration was due on ${dev.calibrationDue}; readings may have drifted.`, source: "Stillfield" });
  }
  return out;
}

function fmt(v: number): string {
  return String(Number(v.toPrecision(3)));
}
