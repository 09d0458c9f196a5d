/**
 * The engine's persistent state: plain JSON (no Maps, no NaN/Infinity), with zod schemas so a
 * state loaded back from the database is checked before the engine trusts it.
 */
import { z } from "zod";
import { channelSchema, ruleKindSchema, severitySchema } from "./types";

export const ENGINE_STATE_FORMAT = 1;

const tsSchema = z.number();

export const alertRecordSchema = z.object({
  ruleVersion: z.number().int().positive(),
  raisedTs: tsSchema,
  conditionSinceTs: tsSchema,
  value: z.number(),
  peakValue: z.number(),
  expectedCrossingTs: tsSchema.nullable(),
  lastEmittedTs: tsSchema,
  lastEmittedPeak: z.number(),
  lastEmittedCrossingTs: tsSchema.nullable(),
  message: z.string(),
});
export type AlertRecord = z.infer<typeof alertRecordSchema>;

export const hysteresisStateSchema = z.object({
  phase: z.enum(["normal", "active"]),
  /** normal: when the raise condition began (on-delay running); active: when the clear condition began (off-delay running). */
  sinceTs: tsSchema.nullable(),
  /** Worst value seen while the on-delay runs. */
  pendingPeak: z.number().nullable(),
  alert: alertRecordSchema.nullable(),
  /** When this rule and subject last cleared (for the chattering flag). */
  lastClearTs: tsSchema.nullable(),
});
export type HysteresisState = z.infer<typeof hysteresisStateSchema>;

export function createHysteresisState(): HysteresisState {
  return { phase: "normal", sinceTs: null, pendingPeak: null, alert: null, lastClearTs: null };
}

// Window states, one shape per kind of window.

export const sampleWindowStateSchema = z.object({
  ts: z.array(tsSchema),
  values: z.array(z.number()),
});
export type SampleWindowState = z.infer<typeof sampleWindowStateSchema>;

export const rangeWindowStateSchema = z.object({
  ts: z.array(tsSchema),
  /** Monotonic queues [ts, value]: maxQueue values decreasing, minQueue values increasing. */
  maxQueue: z.array(z.tuple([tsSchema, z.number()])),
  minQueue: z.array(z.tuple([tsSchema, z.number()])),
});
export type RangeWindowState = z.infer<typeof rangeWindowStateSchema>;

export const meanBufferStateSchema = z.object({
  ts: z.array(tsSchema),
  /** Running sum of |value| up to and including each sample. */
  cum: z.array(z.number()),
  /** Running sum before the first kept sample. */
  cumBefore: z.number(),
  lastTs: tsSchema.nullable(),
});
export type MeanBufferState = z.infer<typeof meanBufferStateSchema>;

export const effectWindowStateSchema = z.object({
  before: meanBufferStateSchema,
  after: meanBufferStateSchema,
  /** Reading times of the after-point still waiting for before-point data to catch up. */
  pending: z.array(tsSchema),
});
export type EffectWindowState = z.infer<typeof effectWindowStateSchema>;

export const evaluatorStateSchema = z.object({
  ruleId: z.number().int().positive(),
  ruleVersion: z.number().int().positive(),
  kind: ruleKindSchema,
  severity: severitySchema,
  subjectKey: z.string(),
  unit: z.string(),
  h: hysteresisStateSchema,
  /** Kind-specific window; checked by the evaluator that owns it. */
  w: z.unknown(),
});
export type EvaluatorState = z.infer<typeof evaluatorStateSchema>;

export const sensorStateSchema = z.object({
  sensorKey: z.string(),
  /** Latest reading time over all channels (drives sensor_silent). */
  lastTs: tsSchema.nullable(),
  /** Latest reading time per channel (older or equal readings are ignored). */
  channelLastTs: z.partialRecord(channelSchema, tsSchema),
});
export type SensorState = z.infer<typeof sensorStateSchema>;

export const lineRunningStateSchema = z.object({
  lineId: z.number().int().positive(),
  /** [ts, 1 running | 0 stopped] at each change, oldest first. */
  changes: z.array(z.tuple([tsSchema, z.union([z.literal(0), z.literal(1)])])),
  /** True once older changes have been dropped. */
  trimmed: z.boolean(),
});
export type LineRunningState = z.infer<typeof lineRunningStateSchema>;

export const engineStateSchema = z.object({
  format: z.literal(ENGINE_STATE_FORMAT),
  /** First reading or tick time the engine saw: sensors never heard from are silent since then. */
  startTs: tsSchema.nullable(),
  sensors: z.array(sensorStateSchema),
  lines: z.array(lineRunningStateSchema),
  evaluators: z.array(evaluatorStateSchema),
});
export type EngineState = z.infer<typeof engineStateSchema>;
