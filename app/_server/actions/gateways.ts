// Gateway actions. Engineers map a gateway's metric to a Stillfield device and channel (with a
// unit conversion) and choose whether a device's readings keep device time or arrival time;
// admins register edge nodes and get their secret once (only its salted hash is stored).
import "server-only";
import { z } from "zod";
import { getDb } from "@/db/client";
import { createEdgeNode, edgeNodeCodeTaken, MappingError, saveMapping, setDeviceTimeSource } from "@/db/queries/gateways";
import { DEVICE_CODE_PATTERN } from "@/lib/contract/topics";
import { generateDeviceSecret, hashDeviceSecret } from "@/lib/device-secrets";
import { AppError, badInput } from "@/lib/errors";
import { isReservedAccountName } from "@/lib/settings";
import { TIME_SOURCES } from "@/lib/clock-skew";
import { mappingInputSchema } from "@/lib/sparkplug/metrics";
import { SPB_ID_PATTERN } from "@/lib/sparkplug/topics";
import { defineAction } from "../action";

const emptyToNull = (v: unknown) => (v === "" || v === undefined ? null : v);

export const saveMappingAction = defineAction(
  "gateways.map",
  z.preprocess((raw) => {
    if (typeof raw !== "object" || raw === null) return raw;
    const r = raw as Record<string, unknown>;
    return { ...r, targetDeviceId: emptyToNull(r.targetDeviceId), channel: emptyToNull(r.channel), conversion: r.conversion ?? "none" };
  }, mappingInputSchema),
  async (input, session) => {
    try {
      await saveMapping(getDb(), input, session.personId);
    } catch (err) {
      if (err instanceof MappingError) throw new AppError(err.status === 404 ? "not_found" : "unprocessable", err.message, { [err.field]: [err.message] });
      throw err;
    }
    return { metricId: input.metricId };
  },
);

export const setTimeSourceAction = defineAction(
  "gateways.map",
  z.object({ deviceId: z.coerce.number().int().positive(), timeSource: z.enum(TIME_SOURCES) }),
  async (input, session) => {
    await setDeviceTimeSource(getDb(), input.deviceId, input.timeSource, session.personId);
    return input;
  },
);

const idText = (what: string) => z.string().trim().regex(SPB_ID_PATTERN, `${what}: no spaces, "/", "+" or "#" (at most 64)`);

export const createEdgeNodeAction = defineAction(
  "devices.manage",
  z.object({
    code: z
      .string()
      .trim()
      .regex(DEVICE_CODE_PATTERN, "Letters, digits and - _ . only, starting with a letter or digit (at most 64)")
      .refine((c) => !isReservedAccountName(c), "That name is reserved for Stillfield's own services"),
    groupId: idText("Group id"),
    nodeId: idText("Edge node id"),
    label: z.string().trim().min(1, "Give it a name people recognise").max(120),
  }),
  async (input, session) => {
    const db = getDb();
    if (await edgeNodeCodeTaken(db, input.code)) throw badInput("Please correct the marked fields.", { code: ["A device or edge node already signs in with this name"] });
    const secret = generateDeviceSecret();
    try {
      await createEdgeNode(db, { ...input, secretHash: hashDeviceSecret(secret) }, session.personId);
    } catch (err) {
      if (typeof err === "object" && err !== null && "errno" in err && err.errno === 1062) {
        throw badInput("Please correct the marked fields.", { nodeId: ["This group already has an edge node with this id"] });
      }
      throw err;
    }
    return { code: input.code, secret };
  },
);
