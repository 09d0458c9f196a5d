// Facts of the trade shown beside the calculators. Common practice (from memory), not values
// from a standard; the unit tests hold them against their inch/psi originals and lib/physics.

/** Fixed sensors and handheld survey meters read at about 25 mm (1 in) from the surface. */
export const SENSOR_DISTANCE_MM = 25;
/** People begin to feel a static discharge at about 2–3 kV. */
export const PERCEPTION_ONSET_KV = { from: 2, to: 3 } as const;
/** A discharge is heard from about 5 kV … */
export const PERCEPTION_HEARD_KV = 5;
/** … and the spark seen from about 8–10 kV. */
export const PERCEPTION_SEEN_KV = { from: 8, to: 10 } as const;
/** An AC ionizing bar without air assistance works only within about 50 mm (2 in) of the surface. */
export const PASSIVE_BAR_REACH_MM = 50;
/** Air-assisted neutralizers run on about 0.3 bar (5 psig) of compressed air. */
export const AIR_ASSIST_PRESSURE_BAR = 0.3;
/** A rubbed plastic sheet can read above 10 kV … */
export const RUBBED_SHEET_KV = 10;
/** … while an untouched one reads a few hundred volts. */
export const UNTOUCHED_SHEET_KV = 0.3;

export const TRADE_FACTS: readonly string[] = [
  `Fixed sensors and survey meters read at about ${SENSOR_DISTANCE_MM} mm (1 in) from the surface; read at another distance, the figure is not comparable.`,
  `A discharge from a charged person is felt from about ${PERCEPTION_ONSET_KV.from}–${PERCEPTION_ONSET_KV.to} kV, heard from about ${PERCEPTION_HEARD_KV} kV and seen from about ${PERCEPTION_SEEN_KV.from}–${PERCEPTION_SEEN_KV.to} kV (common practice; people differ widely).`,
  `A rubbed plastic sheet can read above ${RUBBED_SHEET_KV} kV; an untouched one a few hundred volts.`,
  `An AC ionizing bar without air assistance works only within about ${PASSIVE_BAR_REACH_MM} mm (2 in) of the surface; farther away, use a pulsed-DC or an air-assisted bar.`,
  `Air-assisted neutralizers run on about ${AIR_ASSIST_PRESSURE_BAR} bar (5 psig) of clean, dry compressed air.`,
];
