// Device actions. Admins add devices and issue or rotate their secrets: the plain secret is
// returned once, in the action's result, and only its salted hash is stored. Engineers edit a
// device's placement, distances and calibration date.
import "server-only";
import { z } from "zod";
import { getDb } from "@/db/client";
import { writeAudit } from "@/db/queries/audit";
import { createDevice, deviceCodeTaken, getDevice, resolvePlacement, rotateDeviceSecret, setDeviceEnabled, updateDevice } from "@/db/queries/equipment";
import { DEVICE_KINDS } from "@/db/schema/plant";
import { DEVICE_CODE_PATTERN } from "@/lib/contract/topics";
import { generateDeviceSecret, hashDeviceSecret } from "@/lib/device-secrets";
import { AppError, badInput, notFound } from "@/lib/errors";
import { deviceWarnings } from "@/lib/equipment-warnings";
import { isReservedAccountName, SERVICE_ACCOUNT_PREFIX } from "@/lib/settings";
import { defineAction } from "../action";
import { idField, optionalDate, optionalNumber } from "./equipment";

const optionalId = z.preprocess((v) => (v === "" || v === undefined ? null : v), z.coerce.number().int().positive().nullable());

const placementAndData = {
  label: z.string().trim().min(1, "Give it a name people recognise").max(120, "At most 120 characters"),
  pointId: optionalId,
  lineId: optionalId,
  areaId: optionalId,
  calibratedDistanceMm: optionalNumber(1, 1000, "Distance in mm, 1–1000"),
  mountingDistanceMm: optionalNumber(1, 5000, "Distance in mm, 1–5000"),
  calibrationDue: optionalDate,
};

async function placement(input: { pointId: number | null; lineId: number | null; areaId: number | null }) {
  const p = await resolvePlacement(getDb(), input);
  if (!p) throw badInput("Please correct the marked fields.", { pointId: ["No such place"] });
  return p;
}

const todayIso = () => new Date().toISOString().slice(0, 10);

export const createDeviceAction = defineAction(
  "devices.manage",
  z.object({
    code: z
      .string()
      .trim()
      .regex(DEVICE_CODE_PATTERN, "Letters, digits and - _ . only, starting with a letter or digit (at most 64)")
      .refine((code) => !isReservedAccountName(code), `Names starting with "${SERVICE_ACCOUNT_PREFIX}" are reserved for Stillfield's own services`),
    kind: z.enum(DEVICE_KINDS, { message: "Choose a kind" }),
    ...placementAndData,
  }),
  async (input, session) => {
    const db = getDb();
    if (await deviceCodeTaken(db, input.code)) throw new AppError("conflict", "A device with this code exists already.", { code: ["This code is taken"] });
    const place = await placement(input);
    const secret = generateDeviceSecret();
    let id: number;
    try {
      id = await createDevice(db, { ...input, ...place, secretHash: hashDeviceSecret(secret) }, session.personId);
    } catch (err) {
      const e = err as { code?: string; cause?: { code?: string } };
      if (e?.code === "ER_DUP_ENTRY" || e?.cause?.code === "ER_DUP_ENTRY") throw new AppError("conflict", "A device with this code exists already.", { code: ["This code is taken"] });
      throw err;
    }
    await writeAudit(db, { personId: session.personId, action: "device.add", subjectType: "device", subjectId: id, summary: `Added device ${input.code} (${input.kind}) and issued its secret` });
    return { id, code: input.code, secret, warnings: deviceWarnings({ ...input, ...place }, todayIso()) };
  },
);

export const rotateDeviceSecretAction = defineAction("devices.manage", z.object({ id: idField }), async ({ id }, session) => {
  const db = getDb();
  const d = await getDevice(db, id);
  if (!d) throw notFound("No such device.");
  const secret = generateDeviceSecret();
  await rotateDeviceSecret(db, id, hashDeviceSecret(secret), session.personId);
  await writeAudit(db, { personId: session.personId, action: "device.secret_rotate", subjectType: "device", subjectId: id, summary: `Issued a new secret for ${d.code}` });
  return { id, code: d.code, secret };
});

export const setDeviceEnabledAction = defineAction(
  "devices.manage",
  z.object({ id: idField, enabled: z.enum(["true", "false"]).transform((v) => v === "true") }),
  async ({ id, enabled }, session) => {
    const db = getDb();
    const d = await getDevice(db, id);
    if (!d) throw notFound("No such device.");
    await setDeviceEnabled(db, id, enabled, session.personId);
    await writeAudit(db, { personId: session.personId, action: enabled ? "device.enable" : "device.disable", subjectType: "device", subjectId: id, summary: `${enabled ? "Enabled" : "Disabled"} ${d.code}` });
    return { id, enabled };
  },
);

export const updateDeviceAction = defineAction("equipment.edit", z.object({ id: idField, ...placementAndData }), async ({ id, ...input }, session) => {
  const db = getDb();
  const d = await getDevice(db, id);
  if (!d) throw notFound("No such device.");
  const place = await placement(input);
  const { changed } = await updateDevice(db, id, { ...input, ...place }, session.personId);
  if (changed.length) {
    await writeAudit(db, { personId: session.personId, action: "device.edit", subjectType: "device", subjectId: id, summary: `Edited device ${d.code}: ${changed.join(", ")}`, detail: { changed } });
  }
  return { id, changed, warnings: deviceWarnings({ kind: d.kind, ...input, ...place }, todayIso()) };
});
