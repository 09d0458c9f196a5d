// The one map from role to allowed actions (the role table in README.md). Every page, route handler and
// server action asks `can(role, action)` through requirePermission() on the server.

export const ROLE_NAMES = ["viewer", "shift_lead", "engineer", "admin"] as const;
export type Role = (typeof ROLE_NAMES)[number];

export const ACTIONS = [
  "view", // floor, lines, charts, alerts, reports, calculators, equipment records
  "alert.respond", // acknowledge, comment, shelve an alert
  "note.add", // add line notes
  "limits.edit", // rules
  "plant.edit", // lines, points
  "equipment.edit", // neutralizers and sensors
  "check.record", // charged-plate checks, cleaning
  "upload.add",
  "import.run",
  "people.manage",
  "oncall.manage",
  "devices.manage", // create devices, issue and rotate secrets
  "audit.view",
  "gateways.map", // map a gateway's metric to a device and channel; a device's time source
  // walk-down surveys: shift leads and up walk the rounds, turn findings into actions and close
  // them (they are on the floor every shift); engineers and up edit the survey plans
  "survey.record",
  "survey.plan",
  "health.view", // the Health page and /api/health: every process's figures
  "maintenance.plan", // open, extend and end a maintenance window (planned work); everyone may see them
] as const;
export type Action = (typeof ACTIONS)[number];

const viewer: Action[] = ["view"];
const shiftLead: Action[] = [...viewer, "alert.respond", "note.add", "survey.record", "maintenance.plan"];
const engineer: Action[] = [
  ...shiftLead,
  "limits.edit",
  "plant.edit",
  "equipment.edit",
  "check.record",
  "upload.add",
  "import.run",
  "audit.view",
  "survey.plan",
  "gateways.map",
];
const admin: Action[] = [...engineer, "people.manage", "oncall.manage", "devices.manage", "health.view"];

export const PERMISSIONS: Record<Role, ReadonlySet<Action>> = {
  viewer: new Set(viewer),
  shift_lead: new Set(shiftLead),
  engineer: new Set(engineer),
  admin: new Set(admin),
};

export function isRole(value: unknown): value is Role {
  return typeof value === "string" && (ROLE_NAMES as readonly string[]).includes(value);
}

export function can(role: Role | null | undefined, action: Action): boolean {
  if (!role) return false;
  return PERMISSIONS[role]?.has(action) ?? false;
}

/** Ranks roles so "at least engineer" style checks (e.g. upload download rights) read plainly. */
export function roleRank(role: Role): number {
  return ROLE_NAMES.indexOf(role);
}

export const ROLE_LABELS: Record<Role, string> = {
  viewer: "Viewer",
  shift_lead: "Shift lead",
  engineer: "Engineer",
  admin: "Admin",
};
