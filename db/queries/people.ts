// Read models and writes for people. Explicit column selections: the password hash never
// leaves this module except to verifyPassword().
import bcrypt from "bcryptjs";
import { and, asc, eq, sql } from "drizzle-orm";
import type { Db } from "../client";
import { people, signInFailures } from "../schema";
import type { Role } from "../../lib/permissions";

export const publicPersonColumns = {
  id: people.id,
  email: people.email,
  name: people.name,
  role: people.role,
  active: people.active,
  wantsDailyDigest: people.wantsDailyDigest,
  onMaintenanceList: people.onMaintenanceList,
};

export type PublicPerson = {
  id: number;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  wantsDailyDigest: boolean;
  onMaintenanceList: boolean;
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
  await db.update(people).set({ ...patch, updatedAt: Date.now() }).where(eq(people.id, id));
}

export async function setPassword(db: Db, id: number, password: string): Promise<void> {
  await db
    .update(people)
    .set({ passwordHash: await hashPassword(password), updatedAt: Date.now() })
    .where(eq(people.id, id));
}

export async function countActiveAdmins(db: Db): Promise<number> {
  const rows = await db
    .select({ n: sql<number>`count(*)` })
    .from(people)
    .where(and(eq(people.role, "admin"), eq(people.active, true)));
  return Number(rows[0]?.n ?? 0);
}

// ---- sign-in rate limiting -------------------------------------------------------------

export const SIGN_IN_LIMITS = {
  windowMs: 15 * 60_000,
  // per account: 5 failures in 15 minutes block that account for 5 minutes
  account: { maxFailures: 5, blockMs: 5 * 60_000 },
  // per address: more generous (several people may share one floor PC)
  address: { maxFailures: 30, blockMs: 5 * 60_000 },
};

export type LimitKey = { kind: "account" | "address"; value: string };

const keyOf = (k: LimitKey) => `${k.kind}:${k.value.toLowerCase()}`.slice(0, 300);

/** Milliseconds until the first of these keys is unblocked, or 0 when none is blocked. */
export async function signInBlockedForMs(db: Db, keys: LimitKey[], nowMs = Date.now()): Promise<number> {
  let wait = 0;
  for (const k of keys) {
    const rows = await db
      .select({ blockedUntil: signInFailures.blockedUntil })
      .from(signInFailures)
      .where(eq(signInFailures.key, keyOf(k)))
      .limit(1);
    const until = rows[0]?.blockedUntil ?? 0;
    if (until > nowMs) wait = Math.max(wait, until - nowMs);
  }
  return wait;
}

export async function recordSignInFailure(db: Db, keys: LimitKey[], nowMs = Date.now()): Promise<void> {
  for (const k of keys) {
    const limits = SIGN_IN_LIMITS[k.kind];
    const key = keyOf(k);
    // one statement: start a new window when the old one has passed, else count up, and
    // block once the count reaches the limit
    await db.execute(sql`
      INSERT INTO sign_in_failures (\`key\`, window_start, failures, blocked_until)
      VALUES (${key}, ${nowMs}, 1, ${limits.maxFailures <= 1 ? nowMs + limits.blockMs : 0})
      ON DUPLICATE KEY UPDATE
        failures = IF(window_start < ${nowMs - SIGN_IN_LIMITS.windowMs}, 1, failures + 1),
        window_start = IF(window_start < ${nowMs - SIGN_IN_LIMITS.windowMs}, ${nowMs}, window_start),
        blocked_until = IF(failures >= ${limits.maxFailures}, ${nowMs + limits.blockMs}, blocked_until)`);
  }
}

export async function clearSignInFailures(db: Db, key: LimitKey): Promise<void> {
  await db.delete(signInFailures).where(eq(signInFailures.key, keyOf(key)));
}
