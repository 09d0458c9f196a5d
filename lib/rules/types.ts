/**
 * Rules engine vocabulary: readings, rule definitions (with the zod schemas the limits editor
 * and the database boundary use), plant topology and the alert transitions the engine emits.
 *
 * Rule definitions are stored as JSON and edited in a form, so every rule kind has a schema
 * that enforces "clear level on the safe side of the limit", "delays >= 0" and so on. The
 * engine itself parses rules and topology again when it is created, so an invalid definition
 * can never reach the evaluation loop.
 */
import { z } from "zod";
import { RULE_KINDS, SEVERITIES, type RuleKind, type Severity } from "../vocabulary/rule-kinds";

// ---------------------------------------------------------------------------------------------
// Readings
// ---------------------------------------------------------------------------------------------

export const CHANNELS = ["charge_kv", "temp_c", "rh_pct", "speed_mpm", "running"] as const;
export const channelSchema = z.enum(CHANNELS);
export type Channel = z.infer<typeof channelSchema>;

/** Unit shown beside a channel's values in messages. */
export const CHANNEL_UNITS: Record<Channel, string> = {
  charge_kv: "kV",
  temp_c: "°C",
  rh_pct: "%",
  speed_mpm: "m/min",
  running: "",
};

export const readingSchema = z.object({
  /** Device code of the sensor, e.g. "fm-gp-unwind". */
  sensorKey: z.string().min(1),
  channel: channelSchema,
  /** Reading time, epoch milliseconds. */
  ts: z.number().int(),
  value: z.number(),
});
export type Reading = z.infer<typeof readingSchema>;

// ---------------------------------------------------------------------------------------------
// Rule definitions
// ---------------------------------------------------------------------------------------------

// The value lists live in lib/vocabulary/rule-kinds.ts (the schema's enums use them too).
export { RULE_KINDS, SEVERITIES };
export type { RuleKind, Severity };
export const severitySchema = z.enum(SEVERITIES);
export const ruleKindSchema = z.enum(RULE_KINDS);

const positiveIdSchema = z.number().int().positive();

/**
 * Where a rule applies. Every key given must match the subject; the most specific key present
 * decides the rule's precedence (point > line > area > plant-wide when empty). See scope.ts.
 */
export const ruleScopeSchema = z.object({
  pointId: positiveIdSchema.optional(),
  lineId: positiveIdSchema.optional(),
  areaId: positiveIdSchema.optional(),
});
export type RuleScope = z.infer<typeof ruleScopeSchema>;

/** One day: longer delays would hide an excursion for a whole production day. */
const MAX_DELAY_S = 86_400;
const delaySchema = z
  .number()
  .min(0, { message: "A delay cannot be negative" })
  .max(MAX_DELAY_S, { message: "A delay cannot be longer than one day (86400 s)" });

const windowSecondsSchema = z
  .number()
  .int({ message: "Window must be a whole number of seconds" })
  .min(10, { message: "Window must be at least 10 s" })
  .max(86_400, { message: "Window cannot be longer than one day" });

const percentSchema = z.number().min(0).max(100);

export const chargeHighParamsSchema = z
  .object({
    /** Raise when |charge_kv| is above this. */
    limitKv: z.number().positive({ message: "The limit must be above 0 kV" }).max(1000),
    /** Clear when |charge_kv| is back below this; below limitKv (the deadband). */
    clearKv: z.number().min(0, { message: "The clear level cannot be negative" }).max(1000),
  })
  .refine((p) => p.clearKv < p.limitKv, {
    message: "The clear level must be below the limit (on the safe side)",
    path: ["clearKv"],
  });

export const chargeRateParamsSchema = z
  .object({
    /** Raise when |charge| grows faster than this (least-squares slope over the window). */
    rateKvPerMin: z.number().positive({ message: "The rate limit must be above 0 kV/min" }),
    /** Clear when it grows slower than this (or shrinks). */
    clearRateKvPerMin: z.number(),
    windowS: windowSecondsSchema,
  })
  .refine((p) => p.clearRateKvPerMin < p.rateKvPerMin, {
    message: "The clear rate must be below the rate limit (on the safe side)",
    path: ["clearRateKvPerMin"],
  });

export const rhLowParamsSchema = z
  .object({
    /** Raise when rh_pct is below this. */
    limitPct: percentSchema,
    /** Clear when rh_pct is back above this; above limitPct (the deadband). */
    clearPct: percentSchema,
  })
  .refine((p) => p.clearPct > p.limitPct, {
    message: "The clear level must be above the limit (on the safe side)",
    path: ["clearPct"],
  });

export const rhForecastParamsSchema = z.object({
  /** The humidity limit the trend is projected against. */
  limitPct: percentSchema,
  /** How far ahead the projected line is checked, minutes. */
  horizonMin: z.number().positive().max(7 * 24 * 60),
  /** Length of the trend window, minutes. */
  windowMin: z.number().min(2, { message: "Trend window must be at least 2 min" }).max(24 * 60),
  /**
   * Clear only when the projection at the horizon is at least this far above the limit
   * (the forecast's deadband). 0 clears as soon as the projection no longer reaches the limit.
   */
  clearMarginPct: z.number().min(0).max(50).default(0),
});

export const sensorSilentParamsSchema = z.object({
  /** Silent when no reading of any channel has arrived for this long. */
  silentS: z.number().min(1, { message: "Silent time must be at least 1 s" }).max(7 * 86_400),
});

/** Channels a flat check makes sense on ("running" is legitimately constant for hours). */
export const FLAT_CHANNELS = ["charge_kv", "temp_c", "rh_pct", "speed_mpm"] as const;

export const sensorFlatParamsSchema = z
  .object({
    channel: z.enum(FLAT_CHANNELS).default("charge_kv"),
    windowS: windowSecondsSchema,
    /** Flat when max − min over a full window is at most this, in the channel's unit. */
    tolerance: z.number().min(0),
    /** Clear when max − min is above this (defaults to tolerance, i.e. no deadband). */
    clearTolerance: z.number().min(0).optional(),
  })
  .refine((p) => p.clearTolerance === undefined || p.clearTolerance >= p.tolerance, {
    message: "The clear tolerance must be at least the flat tolerance",
    path: ["clearTolerance"],
  });

export const effectLossParamsSchema = z
  .object({
    /** Required reduction of mean |charge| from the point before to the point after (0.5 = 50 %). */
    minReductionFraction: z.number().gt(0).max(1),
    /** Clear when the reduction is back to at least this (defaults to minReductionFraction). */
    clearReductionFraction: z.number().gt(0).max(1).optional(),
    windowS: windowSecondsSchema,
    /**
     * Below this mean |charge| before the neutralizer there is too little charge to judge its
     * effect: the rule neither raises nor clears. Common practice floor, from memory: 1 kV.
     */
    minBeforeKv: z.number().min(0).default(1),
  })
  .refine(
    (p) => p.clearReductionFraction === undefined || p.clearReductionFraction >= p.minReductionFraction,
    {
      message: "The clear reduction must be at least the required reduction (on the safe side)",
      path: ["clearReductionFraction"],
    },
  );

const ruleBaseShape = {
  id: positiveIdSchema,
  version: positiveIdSchema,
  severity: severitySchema,
  scope: ruleScopeSchema,
  onDelayS: delaySchema,
  offDelayS: delaySchema,
  /**
   * A disabled rule raises nothing, but still takes precedence over less specific rules of the
   * same kind and severity: this is how a point is exempted from a line or area default.
   */
  enabled: z.boolean().default(true),
};

const onlyWhileRunningSchema = z.boolean();
const notLineGatedSchema = z.literal(false, {
  message: "This kind of rule does not depend on a line running; set onlyWhileRunning to false",
});

export const chargeHighRuleSchema = z.object({
  ...ruleBaseShape,
  kind: z.literal("charge_high"),
  onlyWhileRunning: onlyWhileRunningSchema,
  params: chargeHighParamsSchema,
});
export const chargeRateRuleSchema = z.object({
  ...ruleBaseShape,
  kind: z.literal("charge_rate"),
  onlyWhileRunning: onlyWhileRunningSchema,
  params: chargeRateParamsSchema,
});
export const rhLowRuleSchema = z.object({
  ...ruleBaseShape,
  kind: z.literal("rh_low"),
  onlyWhileRunning: notLineGatedSchema,
  params: rhLowParamsSchema,
});
export const rhForecastRuleSchema = z.object({
  ...ruleBaseShape,
  kind: z.literal("rh_forecast"),
  onlyWhileRunning: notLineGatedSchema,
  params: rhForecastParamsSchema,
});
export const sensorSilentRuleSchema = z.object({
  ...ruleBaseShape,
  kind: z.literal("sensor_silent"),
  onlyWhileRunning: notLineGatedSchema,
  params: sensorSilentParamsSchema,
});
export const sensorFlatRuleSchema = z.object({
  ...ruleBaseShape,
  kind: z.literal("sensor_flat"),
  onlyWhileRunning: onlyWhileRunningSchema,
  params: sensorFlatParamsSchema,
});
export const effectLossRuleSchema = z.object({
  ...ruleBaseShape,
  kind: z.literal("effect_loss"),
  onlyWhileRunning: onlyWhileRunningSchema,
  params: effectLossParamsSchema,
});

export const ruleDefinitionSchema = z.discriminatedUnion("kind", [
  chargeHighRuleSchema,
  chargeRateRuleSchema,
  rhLowRuleSchema,
  rhForecastRuleSchema,
  sensorSilentRuleSchema,
  sensorFlatRuleSchema,
  effectLossRuleSchema,
]);

/** A list of rules as the engine takes them: ids must be unique. */
export const ruleListSchema = z.array(ruleDefinitionSchema).superRefine((rules, ctx) => {
  const seen = new Set<number>();
  rules.forEach((rule, index) => {
    if (seen.has(rule.id)) {
      ctx.addIssue({ code: "custom", message: `Rule id ${rule.id} appears twice`, path: [index, "id"] });
    }
    seen.add(rule.id);
  });
});

/** A parsed rule (defaults filled in). */
export type RuleDefinition = z.output<typeof ruleDefinitionSchema>;
/** A rule as written in a form or stored JSON (fields with defaults may be left out). */
export type RuleDefinitionInput = z.input<typeof ruleDefinitionSchema>;
export type RuleOfKind<K extends RuleKind> = Extract<RuleDefinition, { kind: K }>;
export type ChargeHighRule = RuleOfKind<"charge_high">;
export type ChargeRateRule = RuleOfKind<"charge_rate">;
export type RhLowRule = RuleOfKind<"rh_low">;
export type RhForecastRule = RuleOfKind<"rh_forecast">;
export type SensorSilentRule = RuleOfKind<"sensor_silent">;
export type SensorFlatRule = RuleOfKind<"sensor_flat">;
export type EffectLossRule = RuleOfKind<"effect_loss">;

// ---------------------------------------------------------------------------------------------
// Topology
// ---------------------------------------------------------------------------------------------

const sensorKeySchema = z.string().min(1);

export const topologyAreaSchema = z.object({
  areaId: positiveIdSchema,
  name: z.string().min(1),
  /** Temperature/humidity logger whose rh_pct stands for the whole area (hall). */
  climateSensorKey: sensorKeySchema.nullable(),
});
export const topologyLineSchema = z.object({
  lineId: positiveIdSchema,
  areaId: positiveIdSchema,
  name: z.string().min(1),
  /** The line's measuring points in web-path order (unwind first). */
  pointIds: z.array(positiveIdSchema),
  /** Sensor whose `running` channel (0/1) says whether the line runs; null: treated as running. */
  runningSensorKey: sensorKeySchema.nullable(),
  /** Sensor giving the line's speed_mpm (only used by sensor rules). */
  speedSensorKey: sensorKeySchema.nullable(),
});
export const topologyPointSchema = z.object({
  pointId: positiveIdSchema,
  name: z.string().min(1),
  /** The fixed field meter aimed at the web at this point (its charge_kv channel). */
  fieldMeterSensorKey: sensorKeySchema.nullable(),
});
export const topologyNeutralizerSchema = z.object({
  neutralizerId: positiveIdSchema,
  name: z.string().min(1),
  /** Measuring point just upstream of the neutralizer on the web path. */
  beforePointId: positiveIdSchema,
  /** Measuring point just downstream of it, on the same line. */
  afterPointId: positiveIdSchema,
});

/**
 * The plant as the engine needs it. Lines own their points (in web-path order); a point's line
 * and area are derived from that, so they cannot disagree.
 */
export const topologySchema = z
  .object({
    areas: z.array(topologyAreaSchema),
    lines: z.array(topologyLineSchema),
    points: z.array(topologyPointSchema),
    neutralizers: z.array(topologyNeutralizerSchema),
  })
  .superRefine((topology, ctx) => {
    const areaIds = new Set<number>();
    topology.areas.forEach((area, i) => {
      if (areaIds.has(area.areaId)) ctx.addIssue({ code: "custom", message: `Area ${area.areaId} appears twice`, path: ["areas", i] });
      areaIds.add(area.areaId);
    });
    const pointIds = new Set<number>();
    const fieldMeters = new Map<string, number>();
    topology.points.forEach((point, i) => {
      if (pointIds.has(point.pointId)) ctx.addIssue({ code: "custom", message: `Point ${point.pointId} appears twice`, path: ["points", i] });
      pointIds.add(point.pointId);
      if (point.fieldMeterSensorKey !== null) {
        const other = fieldMeters.get(point.fieldMeterSensorKey);
        if (other !== undefined) {
          ctx.addIssue({
            code: "custom",
            message: `Field meter ${point.fieldMeterSensorKey} is assigned to points ${other} and ${point.pointId}`,
            path: ["points", i, "fieldMeterSensorKey"],
          });
        }
        fieldMeters.set(point.fieldMeterSensorKey, point.pointId);
      }
    });
    const lineIds = new Set<number>();
    const lineOfPoint = new Map<number, { lineId: number; index: number }>();
    topology.lines.forEach((line, i) => {
      if (lineIds.has(line.lineId)) ctx.addIssue({ code: "custom", message: `Line ${line.lineId} appears twice`, path: ["lines", i] });
      lineIds.add(line.lineId);
      if (!areaIds.has(line.areaId)) {
        ctx.addIssue({ code: "custom", message: `Line ${line.lineId} refers to unknown area ${line.areaId}`, path: ["lines", i, "areaId"] });
      }
      line.pointIds.forEach((pointId, j) => {
        if (!pointIds.has(pointId)) {
          ctx.addIssue({ code: "custom", message: `Line ${line.lineId} lists unknown point ${pointId}`, path: ["lines", i, "pointIds", j] });
        }
        if (lineOfPoint.has(pointId)) {
          ctx.addIssue({ code: "custom", message: `Point ${pointId} is on more than one line`, path: ["lines", i, "pointIds", j] });
        }
        lineOfPoint.set(pointId, { lineId: line.lineId, index: j });
      });
    });
    topology.points.forEach((point, i) => {
      if (!lineOfPoint.has(point.pointId)) {
        ctx.addIssue({ code: "custom", message: `Point ${point.pointId} is on no line`, path: ["points", i] });
      }
    });
    const neutralizerIds = new Set<number>();
    topology.neutralizers.forEach((n, i) => {
      if (neutralizerIds.has(n.neutralizerId)) {
        ctx.addIssue({ code: "custom", message: `Neutralizer ${n.neutralizerId} appears twice`, path: ["neutralizers", i] });
      }
      neutralizerIds.add(n.neutralizerId);
      const before = lineOfPoint.get(n.beforePointId);
      const after = lineOfPoint.get(n.afterPointId);
      if (before === undefined || after === undefined) {
        ctx.addIssue({ code: "custom", message: `Neutralizer ${n.neutralizerId} refers to an unknown point`, path: ["neutralizers", i] });
        return;
      }
      if (before.lineId !== after.lineId || before.index >= after.index) {
        ctx.addIssue({
          code: "custom",
          message: `Neutralizer ${n.neutralizerId}: the point before it must precede the point after it on the same line`,
          path: ["neutralizers", i],
        });
      }
    });
  });
export type Topology = z.infer<typeof topologySchema>;
export type TopologyArea = z.infer<typeof topologyAreaSchema>;
export type TopologyLine = z.infer<typeof topologyLineSchema>;
export type TopologyPoint = z.infer<typeof topologyPointSchema>;
export type TopologyNeutralizer = z.infer<typeof topologyNeutralizerSchema>;

// ---------------------------------------------------------------------------------------------
// Output
// ---------------------------------------------------------------------------------------------

export type TransitionType = "raise" | "clear" | "update";

/**
 * One change of an alert, as the worker stores it and the backtest counts it.
 *
 * - `ruleVersion` is the version that raised the alert (a clear after a rule edit still names
 *   the version that raised it).
 * - `value` is the kind's measure at `ts` (see `unit`); `peakValue` the worst value since the
 *   condition began (largest |charge|, fastest rate, lowest RH, smallest flat range, smallest
 *   neutralizer reduction, longest silence).
 * - `update` is emitted at most once per minute of reading time while an alert is active, and
 *   only when its peak changed or its expected crossing time moved by a minute or more since
 *   the last transition.
 * - `chattering` is true on a raise that comes within 60 s of the previous clear of the same
 *   rule and subject.
 */
export type AlertTransition = {
  ruleId: number;
  ruleVersion: number;
  /** "point:12" | "area:3" | "sensor:fm-gp-unwind" | "neutralizer:7" */
  subjectKey: string;
  kind: RuleKind;
  severity: Severity;
  type: TransitionType;
  ts: number;
  /** When the alert was raised (equals ts on the raise itself): pairs a clear with its raise. */
  raisedTs: number;
  /** On a raise: when the condition began (raise ts minus the on-delay, roughly). */
  conditionSinceTs?: number;
  value: number;
  peakValue: number;
  unit: string;
  message: string;
  chattering: boolean;
  /** rh_forecast only: when the projected RH reaches the limit (null when no longer falling). */
  expectedCrossingTs?: number | null;
};

/** An alert the engine currently holds active. */
export type ActiveAlert = {
  ruleId: number;
  ruleVersion: number;
  subjectKey: string;
  kind: RuleKind;
  severity: Severity;
  raisedTs: number;
  conditionSinceTs: number;
  value: number;
  peakValue: number;
  unit: string;
  message: string;
  expectedCrossingTs: number | null;
};
