// The due list as the checks page and the weekly e-mail show it (db/queries/due-list.ts reads
// it): what is overdue or due within the horizon, by hall.

export type DueWhat = "cleaning" | "check" | "repair" | "calibration";

export const DUE_WHAT_WORDS: Record<DueWhat, string> = {
  cleaning: "Cleaning",
  check: "Verification (charged plate)",
  repair: "Repair (marked faulty)",
  calibration: "Sensor calibration",
};

export type DueItem = {
  key: string;
  subjectType: "neutralizer" | "device";
  subjectId: number;
  label: string;
  where: string;
  areaId: number | null;
  areaName: string;
  what: DueWhat;
  dueTs: number;
  overdue: boolean;
  /** whole days until due (negative: whole days overdue; 0 with overdue = less than a day late) */
  daysLeft: number;
  reason: string;
  /** never done since installation (or never recorded): due from the installation date */
  neverDone: boolean;
  /** decay-time projection: when the trend reaches the limit ("cleaning likely due around …") */
  projectedTs: number | null;
  /** effect over the last 24 h (1 − |after|/|before|), null when unknown */
  effectDay: number | null;
};

export type DueList = {
  generatedTs: number;
  horizonDays: number;
  halls: { areaId: number | null; areaName: string; items: DueItem[] }[];
  overdueCount: number;
  dueSoonCount: number;
};
