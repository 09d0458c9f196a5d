/**
 * Kinds of neutralizer and what each is expected to do: the mounting range (distance from the
 * web or target) in which it is normally used, and the default charged-plate decay-time limit
 * a plant starts from. One home for the words; the schema's enum, the forms, the warnings, the
 * checks and the reports import them from here.
 *
 * None of these figures is set by a standard: ANSI/ESD STM3.1 and IEC 61340-4-7 say how to
 * measure decay time and offset but leave acceptance limits to the user, and makers give
 * mounting ranges per product. The ranges and defaults are rules of thumb of static-control
 * practice (common practice, from memory); every one can be overridden by the plant.
 * Pure, no I/O.
 */

export const NEUTRALIZER_KINDS = [
  "ac_bar",
  "pulsed_dc_bar",
  "steady_dc_bar",
  "air_assisted_bar",
  "blower",
  "nozzle",
  "passive_cord",
  "other",
] as const;

export type NeutralizerKind = (typeof NEUTRALIZER_KINDS)[number];

/** Kinds stored before the bars were told apart, and what each became (db migration 0002). */
export const LEGACY_NEUTRALIZER_KIND_MAP = {
  /** An unspecified bar without air: AC is the kind with the shortest range and fastest decay, so nothing that was warned about before goes quiet. */
  ionizing_bar: "ac_bar",
  /** An unspecified bar recorded with air assistance. */
  ionizing_bar_air: "air_assisted_bar",
  ionized_air_blower: "blower",
  ionizing_nozzle: "nozzle",
  other: "other",
} as const satisfies Record<string, NeutralizerKind>;

export type NeutralizerKindSpec = {
  label: string;
  /** one line that tells the kinds apart */
  description: string;
  /** usual mounting distance from the web or target, mm; null where no rule of thumb applies */
  mountingMinMm: number | null;
  mountingMaxMm: number | null;
  /** default decay-time limit (±1000 V → ±100 V on the charged plate at the test distance), s */
  defaultMaxDecayS: number;
  /** decay time a clean unit usually shows at its normal distance, s (for the words only) */
  typicalDecayS: string;
  /** where the range and the default come from */
  source: string;
  /** said beside the kind's check limits when a charged-plate test needs reading with care */
  checkNote?: string;
};

const COMMON = "common practice, from memory";

/**
 * Decay defaults are set at about two to three times what a clean unit of that kind shows at its
 * usual distance, so a unit that has slowed several-fold fails instead of passing under one
 * generous plant-wide limit (the old 20 s let a 1–2 s bar slow tenfold and still pass).
 */
export const NEUTRALIZER_KIND_SPECS: Record<NeutralizerKind, NeutralizerKindSpec> = {
  ac_bar: {
    label: "AC ionizing bar",
    description: "Mains-frequency AC bar without air: short range, close to the web.",
    mountingMinMm: 10,
    mountingMaxMm: 50,
    defaultMaxDecayS: 2,
    typicalDecayS: "under 1 s",
    source: `${COMMON}: AC bars without air are mounted about 10–50 mm (½–2 in) from the web; ions recombine farther away.`,
  },
  pulsed_dc_bar: {
    label: "Pulsed-DC bar",
    description: "Bar with alternating positive and negative DC pulses: long range.",
    mountingMinMm: 100,
    mountingMaxMm: 600,
    defaultMaxDecayS: 5,
    typicalDecayS: "1–2 s",
    source: `${COMMON}: pulsed-DC bars are normally mounted about 100–600 mm from the web, the pulse rate set for the distance.`,
  },
  steady_dc_bar: {
    label: "Steady-DC bar",
    description: "Bar with separate steady positive and negative emitters.",
    mountingMinMm: 25,
    mountingMaxMm: 300,
    defaultMaxDecayS: 5,
    typicalDecayS: "1–2 s",
    source: `${COMMON}: steady-DC bars work from about 25 mm to about 300 mm.`,
  },
  air_assisted_bar: {
    label: "Air-assisted bar",
    description: "Bar whose ions are carried to the target by compressed air.",
    mountingMinMm: 25,
    mountingMaxMm: 300,
    defaultMaxDecayS: 5,
    typicalDecayS: "1–2 s",
    source: `${COMMON}: air carries the ions to about 300 mm; about 0.3 bar (5 psig) of clean, dry air.`,
  },
  blower: {
    label: "Ionized-air blower",
    description: "Fan-driven ionizer for a work area or a stacker.",
    mountingMinMm: 150,
    mountingMaxMm: 1000,
    defaultMaxDecayS: 10,
    typicalDecayS: "2–5 s at 300 mm",
    source: `${COMMON}: blowers reach some hundreds of mm; past about 1 m little is left.`,
  },
  nozzle: {
    label: "Ionizing nozzle",
    description: "Compressed-air nozzle or gun with an emitter: spot neutralizing and blow-off.",
    mountingMinMm: 25,
    mountingMaxMm: 300,
    defaultMaxDecayS: 5,
    typicalDecayS: "1–2 s",
    source: `${COMMON}: nozzles work at short range, usually within about 300 mm.`,
  },
  passive_cord: {
    label: "Passive (induction) cord",
    description: "Earthed tinsel, brush or cord without power: works only on high charge.",
    mountingMinMm: 5,
    mountingMaxMm: 25,
    defaultMaxDecayS: 30,
    typicalDecayS: "slow below a few kV",
    source: `${COMMON}: induction devices must sit within about 25 mm and leave a residual charge of a few kV.`,
    checkNote:
      "A passive cord only works while the field exceeds its onset, a few kV: on a plate charged to 1000 V it removes little, so its decay time says more about cleanliness and earthing than about its effect. Check it is clean, unbroken and earthed.",
  },
  other: {
    label: "Other",
    description: "Anything else; no range is assumed.",
    mountingMinMm: null,
    mountingMaxMm: null,
    defaultMaxDecayS: 20,
    typicalDecayS: "unknown",
    source: "Stillfield's starting value for a kind it does not know: set a limit that suits the unit.",
  },
};

export const NEUTRALIZER_KIND_LABELS: Record<NeutralizerKind, string> = Object.fromEntries(
  NEUTRALIZER_KINDS.map((k) => [k, NEUTRALIZER_KIND_SPECS[k].label]),
) as Record<NeutralizerKind, string>;

/** Kinds that are bars (a length along the web; the power unit matters). */
export const BAR_KINDS: readonly NeutralizerKind[] = ["ac_bar", "pulsed_dc_bar", "steady_dc_bar", "air_assisted_bar", "passive_cord"];

/** Kinds that need no high-voltage power unit. */
export const UNPOWERED_KINDS: readonly NeutralizerKind[] = ["passive_cord"];

/**
 * The mounting range that applies to a unit: its kind's, widened to the air-assisted bar's reach
 * when a bar of another kind is recorded with air assistance.
 */
export function mountingRangeMm(kind: NeutralizerKind, airAssisted: boolean): { minMm: number | null; maxMm: number | null } {
  const spec = NEUTRALIZER_KIND_SPECS[kind];
  let maxMm = spec.mountingMaxMm;
  if (airAssisted && maxMm !== null && (kind === "ac_bar" || kind === "steady_dc_bar")) {
    maxMm = Math.max(maxMm, NEUTRALIZER_KIND_SPECS.air_assisted_bar.mountingMaxMm ?? maxMm);
  }
  return { minMm: spec.mountingMinMm, maxMm };
}
