/**
 * The words of survey actions, without zod, so client components can import them (zod 4 probes
 * for eval when it builds an object schema, which the page's Content Security Policy forbids).
 */
export const ACTION_KINDS = ["clean_bar", "move_bar", "replace_bar", "add_bar", "check_earthing", "raise_humidity", "other"] as const;
export type SurveyActionKind = (typeof ACTION_KINDS)[number];
export const ACTION_KIND_LABELS: Record<SurveyActionKind, string> = {
  clean_bar: "Clean the bar",
  move_bar: "Move the bar",
  replace_bar: "Replace the bar",
  add_bar: "Add a bar",
  check_earthing: "Check earthing",
  raise_humidity: "Raise humidity",
  other: "Other",
};
