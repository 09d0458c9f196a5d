/**
 * The shapes that cross a boundary in walk-down surveys, validated with zod: a plan's spots,
 * a round sent from the phone (idempotent by its client-made id), an action from a finding and
 * its closing. Pure, no I/O; the server and the round page both use them.
 */
import { z } from "zod";
import { METER_UNITS } from "./judge";
import { ACTION_KINDS } from "./vocabulary";

export { ACTION_KINDS, ACTION_KIND_LABELS, type SurveyActionKind } from "./vocabulary";

export const SPOT_KEY = /^[a-z0-9][a-z0-9-]{0,39}$/;

export const spotSchema = z.object({
  key: z.string().regex(SPOT_KEY, "Letters, digits and dashes"),
  name: z.string().trim().min(1, "Give the spot a name").max(120),
  /** an existing measuring point of the line, or null for a survey-only spot */
  pointId: z.number().int().positive().nullable(),
  /** the neutralizer just upstream of this spot; the previous spot is the reading before it */
  afterNeutralizer: z.string().trim().max(80).nullable(),
});
export type PlanSpot = z.infer<typeof spotSchema>;

export const planSpotsSchema = z
  .array(spotSchema)
  .min(1, "A plan needs at least one spot")
  .max(60, "At most 60 spots")
  .refine((s) => new Set(s.map((x) => x.key)).size === s.length, "Each spot needs its own key");

export const savePlanSchema = z.object({
  planId: z.coerce.number().int().positive().optional(),
  lineId: z.coerce.number().int().positive(),
  name: z.string().trim().min(1, "Name the plan").max(120),
  comment: z.string().trim().max(300).optional().default(""),
  spots: z.preprocess((v) => (typeof v === "string" ? safeJson(v) : v), planSpotsSchema),
});

function safeJson(v: string): unknown {
  try {
    return JSON.parse(v);
  } catch {
    return null;
  }
}

/** A client-made survey id: a v4 UUID, so a round sent twice is stored once. */
export const clientIdSchema = z.string().regex(/^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/, "Not a survey id");

const epochMs = z.number().int().min(1_500_000_000_000).max(4_100_000_000_000);

export const roundReadingSchema = z.object({
  spotKey: z.string().regex(SPOT_KEY),
  ts: epochMs,
  value: z.number().finite().min(-1_000_000).max(1_000_000),
  unit: z.enum(METER_UNITS),
  distanceMm: z.number().finite().max(2000),
  running: z.boolean(),
  speedMpm: z.number().finite().min(0).max(5000).nullable(),
  note: z.string().trim().max(500).nullable(),
});
export type RoundReading = z.infer<typeof roundReadingSchema>;

export const roundSchema = z.object({
  clientId: clientIdSchema,
  planId: z.number().int().positive(),
  planVersion: z.number().int().positive(),
  startedTs: epochMs,
  finishedTs: epochMs.nullable(),
  meterLabel: z.string().trim().min(1, "Name the meter").max(120),
  meterCalibratedOn: z.string().regex(/^\d{4}-\d{2}-\d{2}$/).nullable(),
  calibratedDistanceMm: z.number().finite().positive().max(500),
  note: z.string().trim().max(1000).nullable(),
  /** the action this round re-surveys (closes it when finished) */
  resurveyOfActionId: z.number().int().positive().nullable().default(null),
  readings: z.array(roundReadingSchema).max(60),
});
export type RoundPayload = z.infer<typeof roundSchema>;

export const createActionSchema = z.object({
  surveyId: z.coerce.number().int().positive(),
  findingId: z.coerce.number().int().positive().optional(),
  kind: z.enum(ACTION_KINDS),
  text: z.string().trim().min(1, "Say what is to be done").max(500),
  ownerId: z.coerce.number().int().positive({ message: "Pick an owner" }),
  dueDate: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, "Pick a due date"),
});

export const closeActionSchema = z.object({
  actionId: z.coerce.number().int().positive(),
  note: z.string().trim().min(1, "Say what was done").max(500),
});
