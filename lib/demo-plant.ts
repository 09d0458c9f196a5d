// The invented demo plant, "Harrow Fen Packaging", a flexible-packaging converter.
// Pure data: the seed writes it to the database and the simulators play it. All names invented.
import type { NeutralizerKind } from "./physics/neutralizer-kinds";

export type DemoPoint = {
  slug: string;
  name: string;
  // simulator hints: how strongly the web charges here and with which polarity
  polarity: 1 | -1;
  baseKv: number; // charge at 20 % RH, nominal speed, no neutralizer
};

export type DemoLine = {
  slug: string;
  name: string;
  areaSlug: string;
  kind: "gravure_press" | "flexo_press" | "laminator" | "slitter_rewinder" | "bag_machine" | "labeller";
  nominalSpeedMpm: number;
  material: string;
  solventName: string | null;
  solventMieMj: number | null;
  conductorCapacitancePf: number | null;
  points: DemoPoint[];
};

export type DemoArea = {
  slug: string;
  name: string;
  rhMinPct: number;
  rhMaxPct: number;
  tempSetpointC: number;
  humidifierKgPerH: number;
  airflowM3PerH: number;
};

export const DEMO_PLANT_NAME = "Harrow Fen Packaging";
/** An invented site in the fens, for the outdoor forecast (the weather fake scripts its weather). */
export const DEMO_PLANT_LOCATION = { latitude: 52.6, longitude: 0.4 } as const;

export const DEMO_AREAS: DemoArea[] = [
  { slug: "press-hall", name: "Press Hall", rhMinPct: 40, rhMaxPct: 60, tempSetpointC: 22, humidifierKgPerH: 12, airflowM3PerH: 9000 },
  { slug: "converting-hall", name: "Converting Hall", rhMinPct: 40, rhMaxPct: 60, tempSetpointC: 21, humidifierKgPerH: 6, airflowM3PerH: 7000 },
  { slug: "labelling-room", name: "Labelling Room", rhMinPct: 40, rhMaxPct: 60, tempSetpointC: 21, humidifierKgPerH: 3, airflowM3PerH: 2000 },
];

// MIE values: vapour in air at the most easily ignited concentration (NFPA 77 Annex, from memory).
export const DEMO_LINES: DemoLine[] = [
  {
    slug: "gravure-1",
    name: "Gravure Press 1",
    areaSlug: "press-hall",
    kind: "gravure_press",
    nominalSpeedMpm: 250,
    material: "BOPP film 30 µm",
    solventName: "Ethyl acetate",
    solventMieMj: 0.46,
    conductorCapacitancePf: 100,
    points: [
      { slug: "unwind", name: "Unwind", polarity: -1, baseKv: 35 },
      { slug: "infeed", name: "Infeed idlers", polarity: -1, baseKv: 22 },
      { slug: "dryer-exit", name: "Dryer exit", polarity: 1, baseKv: 18 },
      { slug: "rewind", name: "Rewind", polarity: 1, baseKv: 28 },
    ],
  },
  {
    slug: "flexo-2",
    name: "Flexo Press 2",
    areaSlug: "press-hall",
    kind: "flexo_press",
    nominalSpeedMpm: 300,
    material: "PE film 50 µm",
    solventName: "Ethanol",
    solventMieMj: 0.23,
    conductorCapacitancePf: 50,
    points: [
      { slug: "unwind", name: "Unwind", polarity: 1, baseKv: 30 },
      { slug: "print-exit", name: "Print exit", polarity: 1, baseKv: 16 },
      { slug: "rewind", name: "Rewind", polarity: -1, baseKv: 24 },
    ],
  },
  {
    slug: "laminator-1",
    name: "Laminator L1",
    areaSlug: "converting-hall",
    kind: "laminator",
    nominalSpeedMpm: 200,
    material: "PET / PE laminate, solvent-free adhesive",
    solventName: null,
    solventMieMj: null,
    conductorCapacitancePf: null,
    points: [
      { slug: "primary-unwind", name: "Primary unwind", polarity: -1, baseKv: 26 },
      { slug: "secondary-unwind", name: "Secondary unwind", polarity: 1, baseKv: 20 },
      { slug: "rewind", name: "Rewind", polarity: -1, baseKv: 22 },
    ],
  },
  {
    slug: "slitter-1",
    name: "Slitter-Rewinder S1",
    areaSlug: "converting-hall",
    kind: "slitter_rewinder",
    nominalSpeedMpm: 500,
    material: "Printed BOPP",
    solventName: null,
    solventMieMj: null,
    conductorCapacitancePf: null,
    points: [
      { slug: "unwind", name: "Unwind", polarity: -1, baseKv: 32 },
      { slug: "knife-exit", name: "Knife exit", polarity: 1, baseKv: 14 },
      { slug: "rewind", name: "Rewind shafts", polarity: 1, baseKv: 26 },
    ],
  },
  {
    slug: "bagger-1",
    name: "Bag Machine B1",
    areaSlug: "converting-hall",
    kind: "bag_machine",
    nominalSpeedMpm: 120,
    material: "LDPE tube",
    solventName: null,
    solventMieMj: null,
    conductorCapacitancePf: null,
    points: [
      { slug: "unwind", name: "Unwind", polarity: 1, baseKv: 18 },
      { slug: "seal-exit", name: "Seal exit / stacker", polarity: 1, baseKv: 12 },
    ],
  },
  {
    slug: "labeller-1",
    name: "Labeller LB1",
    areaSlug: "labelling-room",
    kind: "labeller",
    nominalSpeedMpm: 60,
    material: "PP labels on glassine liner",
    solventName: null,
    solventMieMj: null,
    conductorCapacitancePf: null,
    points: [
      { slug: "liner-unwind", name: "Liner unwind", polarity: -1, baseKv: 16 },
      { slug: "dispense", name: "Label dispense edge", polarity: -1, baseKv: 10 },
    ],
  },
];

export const fieldMeterCode = (lineSlug: string, pointSlug: string) => `fm-${lineSlug}-${pointSlug}`;
export const loggerCode = (areaSlug: string) => `th-${areaSlug}`;
export const speedGatewayCode = (lineSlug: string) => `sg-${lineSlug}`;
export const neutralizerTag = (lineSlug: string, pointSlug: string) => `N-${lineSlug}-${pointSlug}`.toUpperCase();

export const DEMO_PEOPLE = [
  { email: "viewer@harrowfen.example", name: "Robin Ashby", role: "viewer", password: "view-demo-2026" },
  { email: "lead@harrowfen.example", name: "Sam Okafor", role: "shift_lead", password: "lead-demo-2026" },
  { email: "engineer@harrowfen.example", name: "Priya Lund", role: "engineer", password: "engineer-demo-2026" },
  { email: "admin@harrowfen.example", name: "Jo Whitlock", role: "admin", password: "admin-demo-2026" },
  { email: "oncall@harrowfen.example", name: "Dana Fairweather", role: "engineer", password: "oncall-demo-2026" },
] as const;

// ---------------------------------------------------------------------------------------------
// Demo neutralizers and charged-plate checks (invented). Kinds and distances follow each kind's
// usual range (lib/physics/neutralizer-kinds.ts): long-range pulsed-DC bars at the big unwinds
// and rewinds, AC bars close in along the web, a blower at the bag stacker, a passive cord on
// the bag machine's unwind and a nozzle at the label dispense edge.

export type DemoNeutralizer = {
  kind: NeutralizerKind;
  mountingDistanceMm: number;
  airAssisted: boolean;
  lengthMm: number | null;
  powerUnit: string | null;
  outputKv: number | null;
};

const DEMO_NEUTRALIZER_OVERRIDES: Record<string, Omit<DemoNeutralizer, "lengthMm"> & { lengthMm?: number | null }> = {
  "gravure-1/unwind": { kind: "pulsed_dc_bar", mountingDistanceMm: 200, airAssisted: false, powerUnit: "Pulsed-DC controller, ±12 kV", outputKv: 12 },
  "gravure-1/rewind": { kind: "pulsed_dc_bar", mountingDistanceMm: 250, airAssisted: false, powerUnit: "Pulsed-DC controller, ±12 kV", outputKv: 12 },
  "flexo-2/unwind": { kind: "air_assisted_bar", mountingDistanceMm: 120, airAssisted: true, powerUnit: "HV power unit, 7 kV AC", outputKv: 7 },
  "flexo-2/rewind": { kind: "steady_dc_bar", mountingDistanceMm: 100, airAssisted: false, powerUnit: "Steady-DC supply, ±10 kV", outputKv: 10 },
  "laminator-1/rewind": { kind: "pulsed_dc_bar", mountingDistanceMm: 300, airAssisted: false, powerUnit: "Pulsed-DC controller, ±12 kV", outputKv: 12 },
  "slitter-1/unwind": { kind: "pulsed_dc_bar", mountingDistanceMm: 180, airAssisted: false, powerUnit: "Pulsed-DC controller, ±12 kV", outputKv: 12 },
  "bagger-1/unwind": { kind: "passive_cord", mountingDistanceMm: 15, airAssisted: false, powerUnit: null, outputKv: null },
  "bagger-1/seal-exit": { kind: "blower", mountingDistanceMm: 300, airAssisted: true, lengthMm: null, powerUnit: "HV power unit, 7 kV AC", outputKv: 7 },
  "labeller-1/dispense": { kind: "nozzle", mountingDistanceMm: 50, airAssisted: true, lengthMm: null, powerUnit: "HV power unit, 7 kV AC", outputKv: 7 },
};

/** The neutralizer just upstream of a demo point: an AC bar at 30 mm unless listed above. */
export function demoNeutralizer(lineSlug: string, pointSlug: string): DemoNeutralizer {
  const o = DEMO_NEUTRALIZER_OVERRIDES[`${lineSlug}/${pointSlug}`];
  if (!o) return { kind: "ac_bar", mountingDistanceMm: 30, airAssisted: false, lengthMm: 1400, powerUnit: "HV power unit, 7 kV AC", outputKv: 7 };
  return { ...o, lengthMm: o.lengthMm === undefined ? 1400 : o.lengthMm };
}

export type DemoCheck = {
  /** days before the seed time */
  daysAgo: number;
  decayPosS: number;
  decayNegS: number;
  offsetV: number;
  /** test distance, mm */
  plateDistanceMm: number;
};

/**
 * Charged-plate checks of a few demo neutralizers, on the standard 20 pF, 150 × 150 mm plate.
 * The laminator's rewind bar has slowed since its last cleaning (1.3 s → 3.6 s): still inside
 * the pulsed-DC default of 5 s, but about ×2.8 slower than its own baseline.
 */
export const DEMO_CHECKS: Record<string, DemoCheck[]> = {
  "gravure-1/unwind": [
    { daysAgo: 95, decayPosS: 1.4, decayNegS: 1.5, offsetV: 6, plateDistanceMm: 200 },
    { daysAgo: 5, decayPosS: 1.6, decayNegS: 1.7, offsetV: -9, plateDistanceMm: 200 },
  ],
  "gravure-1/infeed": [{ daysAgo: 40, decayPosS: 0.6, decayNegS: 0.7, offsetV: 4, plateDistanceMm: 30 }],
  "flexo-2/print-exit": [{ daysAgo: 30, decayPosS: 0.7, decayNegS: 0.8, offsetV: -12, plateDistanceMm: 30 }],
  "laminator-1/rewind": [
    { daysAgo: 9, decayPosS: 1.2, decayNegS: 1.3, offsetV: 8, plateDistanceMm: 300 },
    { daysAgo: 6, decayPosS: 1.5, decayNegS: 1.7, offsetV: 10, plateDistanceMm: 300 },
    { daysAgo: 3, decayPosS: 2.4, decayNegS: 2.7, offsetV: 14, plateDistanceMm: 300 },
    { daysAgo: 1, decayPosS: 3.2, decayNegS: 3.6, offsetV: 18, plateDistanceMm: 300 },
  ],
  "bagger-1/seal-exit": [{ daysAgo: 60, decayPosS: 3.1, decayNegS: 3.4, offsetV: -21, plateDistanceMm: 300 }],
};
