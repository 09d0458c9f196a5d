// People management (admin only): add, change role, deactivate/reactivate, reset password.
import "server-only";
import { z } from "zod";
import { getDb } from "@/db/client";
import { writeAudit } from "@/db/queries/audit";
import { countActiveAdmins, createPerson, getPerson, setPassword, updatePerson } from "@/db/queries/people";
import { AppError } from "@/lib/errors";
import { ROLE_NAMES } from "@/lib/permissions";
import { defineAction } from "../action";
import { forgetCheckedSessions } from "../session";

const password = z.string().min(10, "At least 10 characters").max(200, "At most 200 characters");
const idField = z.coerce.number().int().positive();

export const addPersonAction = defineAction(
  "people.manage",
  z.object({
    name: z.string().trim().min(1, "Enter a name").max(120),
    email: z.string().trim().toLowerCase().email("Enter a valid e-mail address").max(254),
    role: z.enum(ROLE_NAMES, { message: "Choose a role" }),
    password,
  }),
  async (input, session) => {
    const db = getDb();
    try {
      const id = await createPerson(db, input);
      await writeAudit(db, { personId: session.personId, action: "person.add", subjectType: "person", subjectId: id, summary: `Added ${input.name} <${input.email}> as ${input.role}` });
      return { id };
    } catch (err) {
      if ((err as { code?: string }).code === "ER_DUP_ENTRY" || String((err as { cause?: { code?: string } }).cause?.code) === "ER_DUP_ENTRY") {
        throw new AppError("conflict", "Someone with this e-mail already exists.", { email: ["Someone with this e-mail already exists."] });
      }
      throw err;
    }
  },
);

async function guardLastAdmin(id: number, becomesNonAdmin: boolean) {
  const db = getDb();
  const person = await getPerson(db, id);
  if (!person) throw new AppError("not_found", "No such person.");
  if (becomesNonAdmin && person.role === "admin" && person.active && (await countActiveAdmins(db)) <= 1) {
    throw new AppError("conflict", "This is the last active admin; make someone else an admin first.");
  }
  return person;
}

export const setRoleAction = defineAction(
  "people.manage",
  z.object({ id: idField, role: z.enum(ROLE_NAMES, { message: "Choose a role" }) }),
  async ({ id, role }, session) => {
    const person = await guardLastAdmin(id, role !== "admin");
    await updatePerson(getDb(), id, { role });
    forgetCheckedSessions();
    await writeAudit(getDb(), { personId: session.personId, action: "person.role", subjectType: "person", subjectId: id, summary: `Role of ${person.name}: ${person.role} → ${role}` });
    return { id };
  },
);

export const setActiveAction = defineAction(
  "people.manage",
  z.object({ id: idField, active: z.enum(["true", "false"]).transform((v) => v === "true") }),
  async ({ id, active }, session) => {
    if (!active && id === session.personId) throw new AppError("conflict", "You cannot deactivate yourself.");
    const person = await guardLastAdmin(id, !active);
    await updatePerson(getDb(), id, { active });
    forgetCheckedSessions();
    await writeAudit(getDb(), { personId: session.personId, action: active ? "person.reactivate" : "person.deactivate", subjectType: "person", subjectId: id, summary: `${active ? "Reactivated" : "Deactivated"} ${person.name}` });
    return { id };
  },
);

export const resetPasswordAction = defineAction(
  "people.manage",
  z.object({ id: idField, password }),
  async ({ id, password: pw }, session) => {
    const person = await getPerson(getDb(), id);
    if (!person) throw new AppError("not_found", "No such person.");
    await setPassword(getDb(), id, pw);
    forgetCheckedSessions();
    await writeAudit(getDb(), { personId: session.personId, action: "person.password", subjectType: "person", subjectId: id, summary: `Reset the password of ${person.name}` });
    return { id };
  },
);
