// A proposed rule as the limits editor sends it (zod, at the boundary of the save and replay
// use cases), and its check against the engine's own schema. Pure.
import { z } from "zod";
import { badInput, fieldErrorsFromIssues } from "../errors";
import { RULE_KINDS, RULE_KIND_WORDS, SEVERITIES } from "../vocabulary";
import { ruleDefinitionSchema, type RuleDefinition, type RuleKind, type RuleScope } from "./types";

export const ruleScopeInputSchema = z.object({
  pointId: z.number().int().positive().nullable().default(null),
  lineId: z.number().int().positive().nullable().default(null),
  areaId: z.number().int().positive().nullable().default(null),
});

export const saveRuleInputSchema = z.object({
  /** absent: a new rule at this scope (an override of the inherited one) */
  ruleId: z.number().int().positive().optional(),
  /** the version the editor started from: a save over a newer one is refused (409) */
  baseVersion: z.number().int().positive().optional(),
  kind: z.enum(RULE_KINDS),
  scope: ruleScopeInputSchema,
  severity: z.enum(SEVERITIES),
  onDelayS: z.number(),
  offDelayS: z.number(),
  onlyWhileRunning: z.boolean(),
  enabled: z.boolean().default(true),
  params: z.record(z.string(), z.unknown()),
  comment: z.string().trim().max(300).optional(),
});
export type SaveRuleInput = z.input<typeof saveRuleInputSchema>;

/**
 * Checks a proposed rule with the engine's own schema ("clear level on the safe side", "delays
 * ≥ 0", …). Returns the parsed definition or throws a 400 with field errors keyed like the form
 * ("params.clearKv", "onDelayS").
 */
export function checkProposedRule(input: z.output<typeof saveRuleInputSchema>, id = 1, version = 1): RuleDefinition {
  const scope: RuleScope = {};
  if (input.scope.pointId !== null) scope.pointId = input.scope.pointId;
  if (input.scope.lineId !== null) scope.lineId = input.scope.lineId;
  if (input.scope.areaId !== null) scope.areaId = input.scope.areaId;
  const parsed = ruleDefinitionSchema.safeParse({
    id,
    version,
    kind: input.kind,
    severity: input.severity,
    scope,
    onDelayS: input.onDelayS,
    offDelayS: input.offDelayS,
    onlyWhileRunning: input.onlyWhileRunning,
    enabled: input.enabled,
    params: input.params,
  });
  if (!parsed.success) {
    const fieldErrors = fieldErrorsFromIssues(parsed.error.issues);
    const first = Object.entries(fieldErrors)[0];
    throw badInput(first ? `Check ${first[0]}: ${first[1][0]}` : "The rule is not valid.", fieldErrors);
  }
  return parsed.data;
}

export function defaultRuleName(kind: RuleKind, where: string | null): string {
  const base = RULE_KIND_WORDS[kind];
  return (where ? `${base} — ${where}` : base).slice(0, 160);
}

export const replayInputSchema = saveRuleInputSchema.extend({
  fromTs: z.number().int().optional(),
  toTs: z.number().int().optional(),
  /** force a source (tests); default: raw when within budget and retention, else 1-minute rollups */
  source: z.enum(["raw", "1m"]).optional(),
});
export type ReplayInput = z.input<typeof replayInputSchema>;
