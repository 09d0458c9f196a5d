// The invented demo plant, "Harrow Fen Packaging", a flexible-packaging converter (PRODUCT.md §10).
// Pure data: the seed writes it to the database and the simulators play it. All names invented.

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

export const DEMO_AREAS: DemoArea[] = [
  { slug: "press-hall", name: "Press Hall", rhMinPct: 40, rhMaxPct: 60, tempSetpointC: 22, humidifierKgPerH: 12, airflowM3PerH: 9000 },
  { slug: "converting-hall", name: "Converting Hall", rhMinPct: 40, rhMaxPct: 60, tempSetpointC: 21, humidifierKgPerH: 6, airflowM3PerH: 7000 },
  { slug: "labelling-room", name: "Labelling Room", rhMinPct: 40, rhMaxPct: 60, tempSetpointC: 21, humidifierKgPerH: 0, airflowM3PerH: 2000 },
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
