/** The cautions every survey screen and report carries (the safety notes in README.md). Pure text. */
export const SURVEY_CAUTIONS: readonly string[] = [
  "Stillfield is a monitoring and record-keeping aid, not a safety system.",
  "Solvent areas: a handheld meter, a phone or a camera taken into a classified (hazardous) area must be approved for it; the area and its static hazards are assessed by a qualified person under NFPA 77, IEC TS 60079-32-1 and local codes.",
  "High voltage: neutralizer power units carry several kilovolts. Keep the meter and your hands clear of emitters, and isolate the power unit and follow the plant's lockout procedure before cleaning, moving or touching a bar.",
  "Keep clear of running webs, nips and rolls; take readings only where the machine's guarding allows.",
];
