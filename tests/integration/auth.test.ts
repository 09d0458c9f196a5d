// Sign-in, throttling, client addresses and people actions against the real test database
// (stillfield_test*). One file, so that no other file clears the failure counts mid-test.
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { eq, like } from "drizzle-orm";
import { drizzle } from "drizzle-orm/mysql2";
import mysql from "mysql2/promise";
import { closeDb, getDb, type Db } from "@/db/client";
import * as schema from "@/db/schema";
import { people, signInFailures } from "@/db/schema";
import { listPeople } from "@/db/queries/people";
import { delayAfterFailures, pruneSignInFailures, recordSignInFailure, SIGN_IN_THROTTLE } from "@/db/queries/sign-in-throttle";
import { authorizeSignIn, sessionStillValid } from "@/app/_server/auth";
import { addressOf } from "@/app/_server/client-address";
import { SIGN_IN_CODES } from "@/lib/sign-in-errors";
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
    await expect(authorizeSignIn({ email: demo("viewer").email, password: "nope" }, "10.0.0.2")).rejects.toThrow(SIGN_IN_CODES.wrong);
    await expect(authorizeSignIn({ email: "nobody@harrowfen.example", password: "nope" }, "10.0.0.2")).rejects.toThrow(SIGN_IN_CODES.wrong);
  });

  it("makes an address that keeps failing across many accounts wait", async () => {
    const addr = "10.9.9.9";
    for (let i = 0; i < SIGN_IN_THROTTLE.policies.address.freeFailures; i++) {
      await authorizeSignIn({ email: `guess${i}@harrowfen.example`, password: "x" }, addr).catch(() => undefined);
    }
    await expect(authorizeSignIn({ email: demo("admin").email, password: demo("admin").password }, addr)).rejects.toThrow(/^wait:\d+$/);
    // the same person from their own address is not held up by the guesser's address
    expect((await authorizeSignIn({ email: demo("admin").email, password: demo("admin").password }, "10.9.9.10")).role).toBe("admin");
    await getDb().delete(signInFailures);
  });

  it("refuses a deactivated person", async () => {
    const admin = await sessionOf("admin");
    const added = await addPersonAction.run(admin, { name: "Temp Person", email: "temp@harrowfen.example", role: "viewer", password: "temporary-pass-1" });
    expect(added.ok).toBe(true);
    const id = (added.ok && (added.data as { id: number }).id) as number;
    expect((await authorizeSignIn({ email: "temp@harrowfen.example", password: "temporary-pass-1" }, "10.0.2.1")).role).toBe("viewer");
    expect((await setActiveAction.run(admin, { id: String(id), active: "false" })).ok).toBe(true);
    await expect(authorizeSignIn({ email: "temp@harrowfen.example", password: "temporary-pass-1" }, "10.0.2.1")).rejects.toThrow(SIGN_IN_CODES.wrong);
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

const lead = DEMO_PEOPLE.find((p) => p.role === "shift_lead")!;
const T0 = Date.UTC(2026, 0, 12, 6, 0, 0);

const waitSeconds = async (p: Promise<unknown>): Promise<number> => {
  const err = await p.then(
    () => null,
    (e: Error) => e,
  );
  expect(err?.message, "expected a wait").toMatch(/^wait:\d+$/);
  return Number(err!.message.split(":")[1]);
};


describe("the throttle cannot be used to lock someone out", () => {
  beforeEach(async () => {
    await getDb().delete(signInFailures);
  });
  it("five bad passwords from an attacker do not stop the real person signing in with the right one", async () => {
    for (let i = 0; i < 5; i++) {
      await expect(authorizeSignIn({ email: lead.email, password: `guess-${i}` }, "203.0.113.5", { nowMs: T0 + i })).rejects.toThrow(SIGN_IN_CODES.wrong);
    }
    const user = await authorizeSignIn({ email: lead.email, password: lead.password }, "198.51.100.7", { nowMs: T0 + 10 });
    expect(user.role).toBe("shift_lead");
  });

  it("the attacker's own further guesses wait a delay that doubles", async () => {
    const attacker = "203.0.113.9";
    let now = T0;
    for (let i = 0; i < SIGN_IN_THROTTLE.policies.pair.freeFailures; i++) {
      await expect(authorizeSignIn({ email: lead.email, password: `guess-${i}` }, attacker, { nowMs: now++ })).rejects.toThrow(SIGN_IN_CODES.wrong);
    }
    const waits: number[] = [];
    for (let round = 0; round < 3; round++) {
      // refused without the password being tried, even the right one
      const s = await waitSeconds(authorizeSignIn({ email: lead.email, password: lead.password }, attacker, { nowMs: now }));
      waits.push(s);
      now += s * 1000 + 1;
      await expect(authorizeSignIn({ email: lead.email, password: "another-guess" }, attacker, { nowMs: now })).rejects.toThrow(SIGN_IN_CODES.wrong);
    }
    // 2 s, 4 s, 8 s (SIGN_IN_THROTTLE.policies.pair: first delay 2 s, doubling)
    expect(waits).toEqual([2, 4, 8]);
  });

  it("a guess spread over many addresses slows the account by 30 s at most", async () => {
    let now = T0;
    for (let i = 0; i < 40; i++) {
      await authorizeSignIn({ email: lead.email, password: `spread-${i}` }, `192.0.2.${i + 1}`, { nowMs: now }).catch(() => undefined);
      now += 31_000; // each guess after the previous delay has passed
    }
    expect(delayAfterFailures("account", 40)).toBe(30_000);
    const s = await waitSeconds(authorizeSignIn({ email: lead.email, password: lead.password }, "198.51.100.7", { nowMs: now - 31_000 + 1 }));
    expect(s).toBeLessThanOrEqual(30);
    expect((await authorizeSignIn({ email: lead.email, password: lead.password }, "198.51.100.7", { nowMs: now })).role).toBe("shift_lead");
  });
});

describe("client address", () => {
  beforeEach(async () => {
    await getDb().delete(signInFailures);
  });
  const env = { STILLFIELD_PEER_HEADER: "x-stillfield-peer-test", TRUSTED_PROXIES: "0" };

  it("a forged X-Forwarded-For does not get past the limit", async () => {
    let now = T0;
    // one attacker at 127.0.0.1 sprays many accounts, each request claiming a new address
    for (let i = 0; i < SIGN_IN_THROTTLE.policies.address.freeFailures; i++) {
      const address = addressOf({ "x-stillfield-peer-test": "127.0.0.1", "x-forwarded-for": `10.66.${i}.1` }, env);
      await expect(authorizeSignIn({ email: `spray${i}@harrowfen.example`, password: "x" }, address, { nowMs: now++ })).rejects.toThrow(SIGN_IN_CODES.wrong);
    }
    const address = addressOf({ "x-stillfield-peer-test": "127.0.0.1", "x-forwarded-for": "10.66.250.1" }, env);
    expect(address).toBe("127.0.0.1");
    await waitSeconds(authorizeSignIn({ email: "spray-last@harrowfen.example", password: "x" }, address, { nowMs: now }));
  });

  it("behind trusted proxies, the address is the hop the nearest trusted proxy saw", () => {
    const headers = { "x-stillfield-peer-test": "::ffff:10.0.0.2", "x-forwarded-for": "6.6.6.6, 198.51.100.20" };
    expect(addressOf(headers, env)).toBe("10.0.0.2");
    expect(addressOf(headers, { ...env, TRUSTED_PROXIES: "1" })).toBe("198.51.100.20");
    expect(addressOf(headers, { ...env, TRUSTED_PROXIES: "2" })).toBe("6.6.6.6");
    // a client's own header of the peer family is dropped by scripts/app-server.mjs; a name it
    // cannot know is what makes that safe: without it the socket address is unknown
    expect(addressOf({ "x-forwarded-for": "6.6.6.6" }, { TRUSTED_PROXIES: "0" })).toBe("unknown");
  });
});

describe("what the visitor is told", () => {
  it("with the database down, sign-in answers a generic code and the driver's text goes only to the log", async () => {
    const pool = mysql.createPool({ host: "127.0.0.1", port: 1, user: "nobody", password: "x", database: "none", connectTimeout: 2000 });
    const downDb: Db = drizzle(pool, { schema, mode: "default" });
    const logged: unknown[] = [];
    const original = console.error;
    console.error = (...args: unknown[]) => void logged.push(args);
    try {
      const err = await authorizeSignIn({ email: lead.email, password: lead.password }, "198.51.100.7", { db: downDb }).catch((e: Error) => e);
      expect(err).toBeInstanceOf(Error);
      expect((err as Error).message).toBe(SIGN_IN_CODES.unavailable);
      expect(JSON.stringify(logged)).toMatch(/ECONNREFUSED|connect/i);
    } finally {
      console.error = original;
      await pool.end();
    }
  });
});

describe("the failed sign-in table is pruned", () => {
  beforeEach(async () => {
    await getDb().delete(signInFailures);
  });
  it("rows of runs that ended a window ago are deleted when a failure is recorded", async () => {
    const db = getDb();
    const old = T0 - 2 * SIGN_IN_THROTTLE.windowMs;
    await recordSignInFailure(db, [{ kind: "address", value: "203.0.113.77" }], old);
    await recordSignInFailure(db, [{ kind: "address", value: "203.0.113.78" }], T0);
    const keys = (await db.select({ key: signInFailures.key }).from(signInFailures).where(like(signInFailures.key, "address:203.0.113.7%"))).map((r) => r.key);
    expect(keys).toEqual(["address:203.0.113.78"]);
    expect(await pruneSignInFailures(db, T0 + 2 * SIGN_IN_THROTTLE.windowMs)).toBeGreaterThanOrEqual(1);
    expect(await db.select().from(signInFailures).where(eq(signInFailures.key, "address:203.0.113.78"))).toHaveLength(0);
  });
});

describe("sessions end when the person changes", () => {
  it("a password reset, a role change and a deactivation each end the open sessions", async () => {
    const admin = await sessionOf("admin");
    const email = `session-${Date.now()}@harrowfen.example`;
    const added = await addPersonAction.run(admin, { name: "Sam Session", email, role: "viewer", password: "session-pass-1" });
    const id = (added.ok && (added.data as { id: number }).id) as number;
    const signIn = () => authorizeSignIn({ email, password: "session-pass-1" }, "10.0.3.1");

    let token = await signIn();
    expect(await sessionStillValid(Number(token.id), token.sessionVersion)).toBe(true);
    expect((await resetPasswordAction.run(admin, { id, password: "session-pass-1" })).ok).toBe(true);
    expect(await sessionStillValid(Number(token.id), token.sessionVersion)).toBe(false);

    token = await signIn();
    expect(await sessionStillValid(Number(token.id), token.sessionVersion)).toBe(true);
    expect((await setRoleAction.run(admin, { id, role: "shift_lead" })).ok).toBe(true);
    expect(await sessionStillValid(Number(token.id), token.sessionVersion)).toBe(false);

    token = await signIn();
    expect((await setActiveAction.run(admin, { id: String(id), active: "false" })).ok).toBe(true);
    expect(await sessionStillValid(Number(token.id), token.sessionVersion)).toBe(false);
  });
});
