// Sign-in throttling: failures are counted per account, per (account, address) pair and per
// address; past a few free failures each key must wait a delay that doubles with every further
// failure, up to a cap. Nothing is ever locked for long: the per-account delay — the only one
// a stranger elsewhere can cause — is capped at 30 s, so five (or five hundred) bad passwords
// from an attacker cannot keep the real person out, while the attacker's own address and
// (account, address) pair wait up to 15 minutes between guesses.
//
// A key's run of failures ends when it has been quiet for the window; rows whose run has ended
// are deleted whenever a failure is recorded, so the table holds only current attacks.
import { inArray, lt, sql } from "drizzle-orm";
import type { Db } from "../client";
import { signInFailures } from "../schema";

export type LimitKind = "account" | "pair" | "address";
export type LimitKey = { kind: LimitKind; value: string };

type Policy = { freeFailures: number; firstDelayMs: number; maxDelayMs: number };

export const SIGN_IN_THROTTLE = {
  /** a run of failures ends after this long without one */
  windowMs: 15 * 60_000,
  policies: {
    // any address: a distributed guesser is slowed to ~2 tries a minute, the real person waits ≤ 30 s
    account: { freeFailures: 10, firstDelayMs: 1_000, maxDelayMs: 30_000 },
    // one address on one account: the common guesser
    pair: { freeFailures: 5, firstDelayMs: 2_000, maxDelayMs: 15 * 60_000 },
    // one address on many accounts (several people may share a floor PC)
    address: { freeFailures: 30, firstDelayMs: 2_000, maxDelayMs: 15 * 60_000 },
  } satisfies Record<LimitKind, Policy>,
};

/** Delay after the n-th failure of a run (0 while the failures are free). */
export function delayAfterFailures(kind: LimitKind, failures: number): number {
  const p = SIGN_IN_THROTTLE.policies[kind];
  const over = failures - p.freeFailures;
  if (over < 0) return 0;
  return Math.min(p.maxDelayMs, p.firstDelayMs * 2 ** Math.min(over, 30));
}

export function keysFor(email: string, address: string): LimitKey[] {
  return [
    { kind: "account", value: email },
    { kind: "pair", value: `${email}|${address}` },
    { kind: "address", value: address },
  ];
}

const keyOf = (k: LimitKey) => `${k.kind}:${k.value.toLowerCase()}`.slice(0, 300);

/** Milliseconds until every one of these keys may try again (0: go ahead). */
export async function signInWaitMs(db: Db, keys: LimitKey[], nowMs = Date.now()): Promise<number> {
  const rows = await db
    .select({ blockedUntil: signInFailures.blockedUntil })
    .from(signInFailures)
    .where(inArray(signInFailures.key, keys.map(keyOf)));
  return rows.reduce((wait, r) => Math.max(wait, r.blockedUntil - nowMs), 0);
}

/**
 * Counts one failure on each key and sets its next allowed time. `window_start` is when the
 * run began; `blocked_until` is never earlier than the failure itself, so it also marks the
 * latest failure and a run ends once it lies a window in the past.
 */
export async function recordSignInFailure(db: Db, keys: LimitKey[], nowMs = Date.now()): Promise<void> {
  const quietSince = nowMs - SIGN_IN_THROTTLE.windowMs;
  for (const k of keys) {
    const p = SIGN_IN_THROTTLE.policies[k.kind];
    const key = keyOf(k);
    // MariaDB applies these assignments left to right, each seeing the ones before it:
    // window_start and failures read the old blocked_until; blocked_until reads the new failures
    const delay = sql`IF(failures < ${p.freeFailures}, 0, LEAST(${p.maxDelayMs}, ${p.firstDelayMs} * POW(2, LEAST(failures - ${p.freeFailures}, 30))))`;
    await db.execute(sql`
      INSERT INTO sign_in_failures (\`key\`, window_start, failures, blocked_until)
      VALUES (${key}, ${nowMs}, 1, ${nowMs + delayAfterFailures(k.kind, 1)})
      ON DUPLICATE KEY UPDATE
        window_start = IF(blocked_until < ${quietSince}, ${nowMs}, window_start),
        failures = IF(blocked_until < ${quietSince}, 1, failures + 1),
        blocked_until = ${nowMs} + ${delay}`);
  }
  await pruneSignInFailures(db, nowMs);
}

/** Forgets failures of runs that have ended. */
export async function pruneSignInFailures(db: Db, nowMs = Date.now()): Promise<number> {
  const [res] = await db.delete(signInFailures).where(lt(signInFailures.blockedUntil, nowMs - SIGN_IN_THROTTLE.windowMs));
  return res.affectedRows;
}

/** After a right password: the person's own account and pair start afresh (the address does not). */
export async function clearSignInFailures(db: Db, keys: LimitKey[]): Promise<void> {
  const own = keys.filter((k) => k.kind !== "address").map(keyOf);
  if (own.length) await db.delete(signInFailures).where(inArray(signInFailures.key, own));
}
