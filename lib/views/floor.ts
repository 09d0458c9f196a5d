// View types of the live screens (the Floor, the wallboard, the line page), shared by the read
// models in db/queries/floor.ts and the client components that draw them.
import type { PlantSettings } from "../plant-settings";
import type { AlertState, RuleKind, Severity } from "../vocabulary";
import type { ChargeLimit, RhLimit } from "./limits";

/** Recent readings of one sensor channel: bucket means plus the exact newest reading. */
export type RecentSeries = { deviceId: number; channel: string; samples: Array<[number, number]> };

export type FloorPoint = {
  id: number;
  name: string;
  position: number;
  fieldMeter: { deviceId: number; code: string; enabled: boolean; lastSeenTs: number | null } | null;
  neutralizer: { id: number; tag: string; kind: string; state: string } | null;
  limit: ChargeLimit | null;
  openAlerts: number;
  shelved: boolean;
};

export type FloorLine = {
  id: number;
  areaId: number;
  name: string;
  kind: string;
  nominalSpeedMpm: number;
  material: string | null;
  solventName: string | null;
  solventMieMj: number | null;
  conductorCapacitancePf: number | null;
  speedGateway: { deviceId: number; lastSeenTs: number | null } | null;
  openAlerts: number;
  points: FloorPoint[];
};

export type FloorArea = {
  id: number;
  slug: string;
  name: string;
  rhMinPct: number;
  rhMaxPct: number;
  tempSetpointC: number;
  rhLimit: RhLimit;
  logger: { deviceId: number; code: string; lastSeenTs: number | null } | null;
  /** open alerts of the hall itself (humidity), not of its lines */
  openAlerts: number;
  lines: FloorLine[];
};

export type FloorSnapshot = {
  nowTs: number;
  settings: PlantSettings;
  areas: FloorArea[];
  /** last `trendMs` of every sensor: bucket means plus the exact newest reading */
  series: RecentSeries[];
  trendMs: number;
};

/** An alert drawn on a line's time axis. */
export type TimelineAlert = {
  id: number;
  kind: RuleKind;
  severity: Severity;
  state: AlertState;
  message: string;
  startTs: number;
  endTs: number | null;
  pointId: number | null;
  lineId: number | null;
  areaId: number | null;
  peakValue: number | null;
  shelvedUntilTs: number | null;
};
