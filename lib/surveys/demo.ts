/**
 * The demo plant's survey-only line and its walk-down history (beside lib/demo-plant.ts; all invented):
 * a second slitter-rewinder in the Converting Hall with no fixed meters, a full survey plan and
 * a quick round, and two past surveys — the first with findings and two actions, the second a
 * re-survey of the unwind that closed the bar-cleaning action. Pure data; db/queries/surveys-demo.ts writes it.
 */
import type { PlanSpot } from "./schemas";

export const DEMO_SURVEY_LINE = {
  slug: "slitter-2",
  name: "Slitter-Rewinder S2",
  areaSlug: "converting-hall",
  kind: "slitter_rewinder" as const,
  nominalSpeedMpm: 400,
  material: "Printed PET 12 µm",
};

export const DEMO_FULL_PLAN: { name: string; spots: PlanSpot[] } = {
  name: "Full survey",
  spots: [
    { key: "unwind", name: "Unwind roll", pointId: null, afterNeutralizer: null },
    { key: "after-unwind-bar", name: "After unwind bar", pointId: null, afterNeutralizer: "Bar S2-1" },
    { key: "spreader", name: "Spreader roller", pointId: null, afterNeutralizer: null },
    { key: "knife-exit", name: "Knife exit", pointId: null, afterNeutralizer: null },
    { key: "before-rewind-bar", name: "Before rewind bar", pointId: null, afterNeutralizer: null },
    { key: "after-rewind-bar", name: "After rewind bar", pointId: null, afterNeutralizer: "Bar S2-2" },
    { key: "rewind", name: "Rewind shafts", pointId: null, afterNeutralizer: null },
  ],
};

export const DEMO_QUICK_PLAN: { name: string; spots: PlanSpot[] } = {
  name: "Quick round",
  spots: [
    { key: "unwind", name: "Unwind roll", pointId: null, afterNeutralizer: null },
    { key: "knife-exit", name: "Knife exit", pointId: null, afterNeutralizer: null },
    { key: "rewind", name: "Rewind shafts", pointId: null, afterNeutralizer: null },
  ],
};

export const DEMO_METER = { label: "Handheld field meter HF-07", calibratedOn: "2026-06-15", calibratedDistanceMm: 25 };

/** kV as read, distance mm; first survey 21 days ago, its re-survey 7 days ago. */
export const DEMO_FIRST_SURVEY: { clientId: string; daysAgo: number; readings: [string, number, number][] } = {
  clientId: "5e1f0c2a-0000-4000-8000-000000000001",
  daysAgo: 21,
  readings: [
    ["unwind", -28.4, 25],
    ["after-unwind-bar", -19.1, 25],
    ["spreader", -14.2, 25],
    ["knife-exit", 3.9, 25],
    ["before-rewind-bar", 11.2, 25],
    ["after-rewind-bar", 2.3, 25],
    ["rewind", 2.9, 25],
  ],
};

export const DEMO_RESURVEY: { clientId: string; daysAgo: number; readings: [string, number, number][] } = {
  clientId: "5e1f0c2a-0000-4000-8000-000000000002",
  daysAgo: 7,
  readings: [
    ["unwind", -26.8, 25],
    ["after-unwind-bar", -2.9, 25],
    ["spreader", -3.4, 25],
  ],
};
