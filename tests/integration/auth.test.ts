// Sign-in, rate limiting and people actions against the real test database (stillfield_test*).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { closeDb, getDb } from "@/db/client";
import { people, signInFailures } from "@/db/schema";
import { listPeople, SIGN_IN_LIMITS } from "@/db/queries/people";
import { authorizeSignIn, SIGN_IN_ERRORS } from "@/app/_server/auth";
import { addPersonAction, resetPasswordAction, setActiveAction, setRoleAction } from "@/app/_server/actions/people";
import type { SessionPerson } from "@/app/_server/session";
import { DEMO_PEOPLE } from "@/lib/demo-plant";

const demo = (role: string) => DEMO_PEOPLE.find((p) => p.role === role)!;

async function sessionOf(role: string): Promise<SessionPerson> {
  const p = demo(role);
  const row = (await getDb().select({ id: people.id }).from(people).where(eq(people.email, p.email)))[0];
  return { personId: row.id, role: p.role, name: p.name, email: p.email };
}

beforeAll(async () => {
  await getDb().delete(signInFailures);
});
afterAll(async () => {
  await closeDb();
});

describe("sign-in", () => {
  it("accepts each demo person with the right password and returns the role", async () => {
    for (const p of DEMO_PEOPLE) {
      const user = await authorizeSignIn({ email: p.email, password: p.password }, "10.0.0.1");
      expect(user.role).toBe(p.role);
      expect(JSON.stringify(user)).not.toMatch(/\$2[aby]\$/);
    }
  });

  it("refuses a wrong password and an unknown account with the same message", async () => {
    await expect(authorizeSignIn({ email: demo("viewer").email, password: "nope" }, "10.0.0.2")).rejects.toThrow(SIGN_IN_ERRORS.wrong);
    await expect(authorizeSignIn({ email: "nobody@harrowfen.example", password: "nope" }, "10.0.0.2")).rejects.toThrow(SIGN_IN_ERRORS.wrong);
  });

  it("blocks an account after repeated failures, even with the right password", async () => {
    const p = demo("shift_lead");
    for (let i = 0; i < SIGN_IN_LIMITS.account.maxFailures; i++) {
      await expect(authorizeSignIn({ email: p.email, password: `wrong-${i}` }, `10.0.1.${i}`)).rejects.toThrow(SIGN_IN_ERRORS.wrong);
    }
    await expect(authorizeSignIn({ email: p.email, password: p.password }, "10.0.1.99")).rejects.toThrow(/Too many failed sign-ins/);
    // unblock for the other tests
    await getDb().delete(signInFailures);
    const ok = await authorizeSignIn({ email: p.email, password: p.password }, "10.0.1.99");
    expect(ok.role).toBe("shift_lead");
  });

  it("blocks an address that keeps failing across many accounts", async () => {
    const addr = "10.9.9.9";
    for (let i = 0; i < SIGN_IN_LIMITS.address.maxFailures; i++) {
      await authorizeSignIn({ email: `guess${i}@harrowfen.example`, password: "x" }, addr).catch(() => undefined);
    }
    await expect(authorizeSignIn({ email: demo("admin").email, password: demo("admin").password }, addr)).rejects.toThrow(/Too many failed sign-ins/);
    await getDb().delete(signInFailures);
  });

  it("refuses a deactivated person", async () => {
    const admin = await sessionOf("admin");
    const added = await addPersonAction.run(admin, { name: "Temp Person", email: "temp@harrowfen.example", role: "viewer", password: "temporary-pass-1" });
    expect(added.ok).toBe(true);
    const id = (added.ok && (added.data as { id: number }).id) as number;
    expect((await authorizeSignIn({ email: "temp@harrowfen.example", password: "temporary-pass-1" }, "10.0.2.1")).role).toBe("viewer");
    expect((await setActiveAction.run(admin, { id: String(id), active: "false" })).ok).toBe(true);
    await expect(authorizeSignIn({ email: "temp@harrowfen.example", password: "temporary-pass-1" }, "10.0.2.1")).rejects.toThrow(SIGN_IN_ERRORS.wrong);
  });
});

describe("people actions check the role on the server", () => {
  for (const role of ["viewer", "shift_lead", "engineer"]) {
    it(`${role} gets 403 from every people action`, async () => {
      const s = await sessionOf(role);
      const target = await sessionOf("viewer");
      const results = [
        await addPersonAction.run(s, { name: "X", email: `x-${role}@harrowfen.example`, role: "admin", password: "0123456789ab" }),
        await setRoleAction.run(s, { id: target.personId, role: "admin" }),
        await setActiveAction.run(s, { id: target.personId, active: "false" }),
        await resetPasswordAction.run(s, { id: target.personId, password: "0123456789ab" }),
      ];
      for (const r of results) expect(r).toMatchObject({ ok: false, status: 403 });
      const after = await listPeople(getDb());
      expect(after.find((p) => p.email === `x-${role}@harrowfen.example`)).toBeUndefined();
      expect(after.find((p) => p.id === target.personId)?.role).toBe("viewer");
    });
  }

  it("no session gets 401", async () => {
    expect(await setRoleAction.run(null, { id: 1, role: "admin" })).toMatchObject({ ok: false, status: 401 });
  });

  it("admin validation: bad e-mail and short password come back as field errors", async () => {
    const r = await addPersonAction.run(await sessionOf("admin"), { name: "", email: "not-an-email", role: "chief", password: "short" });
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.status).toBe(400);
      expect(Object.keys(r.fieldErrors ?? {}).sort()).toEqual(["email", "name", "password", "role"]);
    }
  });

  it("admin can change a role and reset a password; the last admin cannot be demoted", async () => {
    const admin = await sessionOf("admin");
    const eng = await sessionOf("engineer");
    expect((await setRoleAction.run(admin, { id: eng.personId, role: "shift_lead" })).ok).toBe(true);
    expect((await setRoleAction.run(admin, { id: eng.personId, role: "engineer" })).ok).toBe(true);
    expect(await setRoleAction.run(admin, { id: admin.personId, role: "viewer" })).toMatchObject({ ok: false, status: 409 });
    expect((await resetPasswordAction.run(admin, { id: eng.personId, password: demo("engineer").password })).ok).toBe(true);
  });

  it("a duplicate e-mail is a 409 with the field named", async () => {
    const r = await addPersonAction.run(await sessionOf("admin"), { name: "Dup", email: demo("viewer").email, role: "viewer", password: "0123456789ab" });
    expect(r).toMatchObject({ ok: false, status: 409 });
  });

  it("people read model never carries a password hash", async () => {
    const list = await listPeople(getDb());
    expect(list.length).toBeGreaterThanOrEqual(DEMO_PEOPLE.length);
    expect(JSON.stringify(list)).not.toMatch(/password|\$2[aby]\$/i);
  });
});
