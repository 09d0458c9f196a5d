// Check actions: record a charged-plate (or periodic) verification judged against the limits of
// the neutralizer's kind; save those limits; send the due list now.
import "server-only";
import { z } from "zod";
import { getDb } from "@/db/client";
import { writeAudit } from "@/db/queries/audit";
import { getCheckLimits, listChecks, projectDecay, recordCheck, saveCheckLimits, type NeutralizerKind } from "@/db/queries/checks";
import { queueWeeklyDueListEmail } from "@/db/use-cases/due-list-email";
import { getNeutralizer, getPlantSettings } from "@/db/queries/equipment";
import { NEUTRALIZER_KINDS } from "@/db/schema/plant";
import { badInput } from "@/lib/errors";
import { STANDARD_PLATE, type CheckLimits, type DecaySlowdown } from "@/lib/physics/neutralizer";
import { defineAction } from "../action";
import { localDateTimeToMs, optionalDate, optionalNumber, optionalText, requiredNumber } from "./equipment";

// decay times: a charged-plate test is stopped after a few minutes; offsets past ±1000 V mean a
// miswired plate (plausibility bounds, from memory)
const recordCheckSchema = z.object({
  neutralizerId: z.coerce.number({ message: "Choose the neutralizer" }).int().positive("Choose the neutralizer"),
  checkedAt: z.string().trim().min(1, "When was it checked?"),
  method: z.enum(["charged_plate", "periodic"]).default("charged_plate"),
  plateDistanceMm: optionalNumber(1, 2000, "Test distance in mm, 1–2000"),
  // a charged-plate monitor's plate: 20 pF on 150 × 150 mm is the standard one; small fixtures
  // of a few pF and 25 mm exist (plausibility bounds, from memory)
  plateCapacitancePf: optionalNumber(1, 1000, "Plate capacitance in pF, 1–1000"),
  plateWidthMm: optionalNumber(5, 1000, "Plate width in mm, 5–1000"),
  plateLengthMm: optionalNumber(5, 1000, "Plate length in mm, 5–1000"),
  decayPosS: requiredNumber(0, 600, "Decay time in seconds, 0–600"),
  decayNegS: requiredNumber(0, 600, "Decay time in seconds, 0–600"),
  offsetV: requiredNumber(-1000, 1000, "Offset in volts, −1000 to 1000"),
  instrument: optionalText(120),
  instrumentCalibratedOn: optionalDate,
  notes: optionalText(2000),
});

export type RecordCheckResult = {
  id: number;
  tag: string;
  passed: boolean;
  parts: { label: string; pass: boolean; reason: string }[];
  limits: CheckLimits & { source: "default" | "plant" };
  stateChanged: boolean;
  instrumentCalibrationOld: boolean;
  /** the unit's decay now against its own baseline (checks since cleaning, or of the past year) */
  slowdown: DecaySlowdown | null;
  /** a plate other than 20 pF on 150 × 150 mm was recorded */
  plateNonStandard: boolean;
};

export const recordCheckAction = defineAction("check.record", recordCheckSchema, async (input, session): Promise<RecordCheckResult> => {
  const db = getDb();
  const n = await getNeutralizer(db, input.neutralizerId);
  if (!n) throw badInput("Please correct the marked fields.", { neutralizerId: ["No such neutralizer"] });
  const plant = await getPlantSettings(db);
  const ts = localDateTimeToMs(input.checkedAt, plant.timeZone);
  const now = Date.now();
  if (ts === null) throw badInput("Please correct the marked fields.", { checkedAt: ["Use a date and time"] });
  if (ts > now + 5 * 60_000) throw badInput("Please correct the marked fields.", { checkedAt: ["The check cannot be in the future"] });
  const res = await recordCheck(db, {
    neutralizerId: n.id,
    ts,
    method: input.method,
    plateDistanceMm: input.plateDistanceMm,
    plateCapacitancePf: input.plateCapacitancePf,
    plateWidthMm: input.plateWidthMm,
    plateLengthMm: input.plateLengthMm,
    decayPosS: input.decayPosS,
    decayNegS: input.decayNegS,
    offsetV: input.offsetV,
    instrument: input.instrument,
    instrumentCalibratedOn: input.instrumentCalibratedOn,
    notes: input.notes,
    personId: session.personId,
  });
  if (res.id === null) throw new Error("unreachable: a hand-entered check has no import key");
  await writeAudit(db, {
    personId: session.personId,
    action: "check.record",
    subjectType: "neutralizer",
    subjectId: n.id,
    summary: `${res.judgement.pass ? "Passed" : "Failed"} check of ${n.tag}`,
    detail: { checkId: res.id, decayPosS: input.decayPosS, decayNegS: input.decayNegS, offsetV: input.offsetV, limits: res.limits },
  });
  // instrument calibration older than a year (a common recalibration interval, common practice)
  const calMs = input.instrumentCalibratedOn ? Date.parse(`${input.instrumentCalibratedOn}T00:00:00Z`) : null;
  return {
    id: res.id,
    tag: n.tag,
    passed: res.judgement.pass,
    parts: [
      { label: "Decay +", ...res.judgement.positive },
      { label: "Decay −", ...res.judgement.negative },
      { label: "Offset", ...res.judgement.offset },
    ],
    limits: res.limits,
    stateChanged: res.stateChanged,
    instrumentCalibrationOld: calMs !== null && ts - calMs > 365 * 86_400_000,
    slowdown: await checkSlowdown(db, n.id, res.limits.maxDecayS, n.lastCleanedTs, now),
    plateNonStandard:
      (input.plateCapacitancePf !== null && input.plateCapacitancePf !== STANDARD_PLATE.capacitancePf) ||
      (input.plateWidthMm !== null && input.plateWidthMm !== STANDARD_PLATE.widthMm) ||
      (input.plateLengthMm !== null && input.plateLengthMm !== STANDARD_PLATE.lengthMm),
  };
});

/** The slowdown the unit's page shows, from the same trend (projectDecay in db/queries/checks.ts). */
async function checkSlowdown(db: ReturnType<typeof getDb>, neutralizerId: number, limitS: number, lastCleanedTs: number | null, nowMs: number): Promise<DecaySlowdown | null> {
  const rows = await listChecks(db, { neutralizerId, limit: 50 });
  return projectDecay(rows, limitS, lastCleanedTs, nowMs).slowdown;
}

const limitField = (label: string, min: number, max: number) => requiredNumber(min, max, `${label}: ${min}–${max}`);
const limitsFormSchema = z.object(
  Object.fromEntries(
    NEUTRALIZER_KINDS.flatMap((k) => [
      [`${k}.maxDecayS`, limitField("Decay time limit, s", 0.1, 600)],
      [`${k}.maxOffsetAbsV`, limitField("Offset limit, V", 0, 1000)],
    ]),
  ) as Record<`${NeutralizerKind}.${"maxDecayS" | "maxOffsetAbsV"}`, ReturnType<typeof limitField>>,
);

export const saveCheckLimitsAction = defineAction("equipment.edit", limitsFormSchema, async (input, session) => {
  const db = getDb();
  const before = await getCheckLimits(db);
  const byKind = Object.fromEntries(
    NEUTRALIZER_KINDS.map((k) => [k, { maxDecayS: input[`${k}.maxDecayS`], maxOffsetAbsV: input[`${k}.maxOffsetAbsV`] }]),
  ) as Record<NeutralizerKind, CheckLimits>;
  await saveCheckLimits(db, byKind, session.personId);
  const changes = NEUTRALIZER_KINDS.filter((k) => before.byKind[k].maxDecayS !== byKind[k].maxDecayS || before.byKind[k].maxOffsetAbsV !== byKind[k].maxOffsetAbsV).map(
    (k) => `${k}: ${before.byKind[k].maxDecayS} s/±${before.byKind[k].maxOffsetAbsV} V → ${byKind[k].maxDecayS} s/±${byKind[k].maxOffsetAbsV} V`,
  );
  await writeAudit(db, { personId: session.personId, action: "check_limits.edit", subjectType: "settings", subjectId: "check_limits", summary: changes.length ? `Check limits: ${changes.join("; ")}` : "Check limits saved unchanged", detail: byKind });
  return { byKind };
});

export const sendDueListNowAction = defineAction("equipment.edit", z.object({}).passthrough(), async (_input, session) => {
  const db = getDb();
  const res = await queueWeeklyDueListEmail(db, Date.now(), { manual: true });
  await writeAudit(db, { personId: session.personId, action: "due_list.send", subjectType: "settings", subjectId: "due_list", summary: `Queued the due list for ${res.queued} of ${res.recipients} people on the maintenance list` });
  return res;
});
