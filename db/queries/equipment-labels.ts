// Words and a small helper shared by the equipment read models: device kinds, history event
// kinds, and day-granular dates. Neutralizer states and kinds live in lib/ (lib/vocabulary,
// lib/physics/neutralizer-kinds.ts).
import { DEVICE_KINDS } from "../schema/plant";
import { EQUIPMENT_EVENT_KINDS } from "../schema/records";

export type DeviceKind = (typeof DEVICE_KINDS)[number];
export type EquipmentEventKind = (typeof EQUIPMENT_EVENT_KINDS)[number];

export const DEVICE_KIND_LABELS: Record<DeviceKind, string> = {
  field_meter: "Field meter",
  th_logger: "Temperature/humidity logger",
  speed_gateway: "Line-speed gateway",
};

export const EVENT_KIND_LABELS: Record<EquipmentEventKind, string> = {
  cleaned: "Cleaned",
  check: "Check",
  fault: "Fault",
  moved: "Moved",
  note: "Note",
  upload: "Upload",
  state_changed: "State",
  created: "Created",
  edited: "Edited",
  secret_rotated: "Secret",
};


/** "YYYY-MM-DD" → epoch ms at 00:00 UTC (day-granular due dates). */
export function dateOnlyMs(date: string | null): number | null {
  if (!date) return null;
  const ms = Date.parse(`${date}T00:00:00Z`);
  return Number.isFinite(ms) ? ms : null;
}
