// Read models and writes for people. Explicit column selections: the password hash never
// leaves this module except to verifyPassword().
import bcrypt from "bcryptjs";
import { and, asc, eq, sql } from "drizzle-orm";
import type { Db } from "../client";
import { people } from "../schema";
import type { Role } from "../../lib/permissions";

export const publicPersonColumns = {
  id: people.id,
  email: people.email,
  name: people.name,
  role: people.role,
  active: people.active,
  wantsDailyDigest: people.wantsDailyDigest,
  onMaintenanceList: people.onMaintenanceList,
  sessionVersion: people.sessionVersion,
};

export type PublicPerson = {
  id: number;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  wantsDailyDigest: boolean;
  onMaintenanceList: boolean;
  /** sessions signed with another version are refused (app/_server/auth.ts) */
  sessionVersion: number;
};

export const BCRYPT_ROUNDS = 10;

export async function hashPassword(plain: string): Promise<string> {
  return bcrypt.hash(plain, BCRYPT_ROUNDS);
}

export async function listPeople(db: Db): Promise<PublicPerson[]> {
  return db.select(publicPersonColumns).from(people).orderBy(asc(people.name));
}

export async function getPerson(db: Db, id: number): Promise<PublicPerson | null> {
  const rows = await db.select(publicPersonColumns).from(people).where(eq(people.id, id)).limit(1);
  return rows[0] ?? null;
}

// A fixed hash compared against when the account does not exist, so a wrong e-mail costs the
// same time as a wrong password (no account enumeration by timing).
let dummyHash: string | undefined;
const getDummyHash = () => (dummyHash ??= bcrypt.hashSync("no-such-account", BCRYPT_ROUNDS));

/** Returns the active person when the e-mail and password match, else null. */
export async function verifyPassword(db: Db, email: string, password: string): Promise<PublicPerson | null> {
  const rows = await db
    .select({ ...publicPersonColumns, passwordHash: people.passwordHash })
    .from(people)
    .where(eq(people.email, email.trim().toLowerCase()))
    .limit(1);
  const row = rows[0];
  const ok = await bcrypt.compare(password, row?.passwordHash ?? getDummyHash());
  if (!row || !ok || !row.active) return null;
  const { passwordHash: _hash, ...person } = row;
  return person;
}

export async function createPerson(
  db: Db,
  input: { email: string; name: string; role: Role; password: string },
): Promise<number> {
  const now = Date.now();
  const [res] = await db.insert(people).values({
    email: input.email.trim().toLowerCase(),
    name: input.name.trim(),
    role: input.role,
    passwordHash: await hashPassword(input.password),
    active: true,
    createdAt: now,
    updatedAt: now,
  });
  return res.insertId;
}

export async function updatePerson(
  db: Db,
  id: number,
  patch: Partial<{ name: string; role: Role; active: boolean; wantsDailyDigest: boolean; onMaintenanceList: boolean }>,
): Promise<void> {
  // a new role or a deactivation ends the person's open sessions
  const endsSessions = patch.role !== undefined || patch.active === false;
  await db
    .update(people)
    .set({ ...patch, updatedAt: Date.now(), ...(endsSessions ? { sessionVersion: sql`${people.sessionVersion} + 1` } : {}) })
    .where(eq(people.id, id));
}

export async function setPassword(db: Db, id: number, password: string): Promise<void> {
  await db
    .update(people)
    // a new password ends every session signed in with the old one
    .set({ passwordHash: await hashPassword(password), updatedAt: Date.now(), sessionVersion: sql`${people.sessionVersion} + 1` })
    .where(eq(people.id, id));
}

export async function countActiveAdmins(db: Db): Promise<number> {
  const rows = await db
    .select({ n: sql<number>`count(*)` })
    .from(people)
    .where(and(eq(people.role, "admin"), eq(people.active, true)));
  return Number(rows[0]?.n ?? 0);
}
