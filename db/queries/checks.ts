// Charged-plate checks: the per-kind verification limits (plant settings, with where each
// default comes from), recording a check judged against them, listing checks and the decay-time
// trend with its projected "cleaning likely due" date. The judgement and the regression are the
// physics library's (lib/physics/neutralizer.ts); this module only feeds them.
import { and, desc, eq, gte, inArray, sql } from "drizzle-orm";
import { z } from "zod";
import type { Db } from "../client";
import { checks, equipmentEvents, lines, neutralizers, people, points, settings } from "../schema";
import { NEUTRALIZER_KIND_LABELS, NEUTRALIZER_KINDS, type NeutralizerKind } from "../../lib/physics/neutralizer-kinds";
import {
  CHECK_STANDARD_EDITIONS,
  decaySlowdown,
  defaultCheckLimits,
  fitDecayTrend,
  judgeCheck,
  projectDecayDueDate,
  type CheckJudgement,
  type CheckLimits,
  type DecaySlowdown,
} from "../../lib/physics/neutralizer";
import { notFound } from "../../lib/errors";

export { NEUTRALIZER_KIND_LABELS, type NeutralizerKind };

export const CHECK_LIMITS_KEY = "check_limits";

const { testMethodAnsi, testMethodIec, program } = CHECK_STANDARD_EDITIONS;

/** Where each default limit comes from, with the editions cited; shown beside the limits on the Checks page. */
export const CHECK_LIMIT_SOURCES = {
  maxDecayS: `Decay-time limits are user-defined: ${testMethodAnsi} and ${testMethodIec} say how to measure the decay from 1000 V to 100 V on a 20 pF, 150 × 150 mm charged plate but leave the acceptance limit to the user (${program} also leaves discharge time user-defined). Each kind's default is a starting value of about two to three times what a clean unit of that kind shows at its usual distance (common practice, from memory), so a bar that normally decays in 1–2 s fails once it has slowed several-fold.`,
  maxOffsetAbsV: `±35 V is the ionizer offset limit of ${program} (measured per ${testMethodAnsi}; from memory). S20.20 was written for handling electrostatic-discharge-sensitive electronic parts, not for web lines: a converting line can usually live with more, so treat ±35 V as a strict starting value.`,
  plate: `The test plate: 20 pF on a 150 × 150 mm plate (${testMethodAnsi}, ${testMethodIec}). Record the plate and the test distance: decay times from another plate or distance are not comparable.`,
} as const;

const limitsSchema = z.object({
  maxDecayS: z.number().positive().max(600),
  maxOffsetAbsV: z.number().min(0).max(1000),
});

// Each kind is read on its own: an entry of a kind that no longer exists, or a null left by the
// kind migration, is ignored instead of throwing away every limit the plant set.
const storedSchema = z.object({
  byKind: z.record(z.string(), z.unknown()),
  updatedBy: z.number().int().nullable().optional(),
});

export type KindLimits = CheckLimits & { source: "default" | "plant" };
export type CheckLimitsSetting = { byKind: Record<NeutralizerKind, KindLimits>; updatedAt: number | null; updatedByName: string | null };

/** The limits for every neutralizer kind: the plant's setting where there is one, else the default. */
export async function getCheckLimits(db: Db): Promise<CheckLimitsSetting> {
  const rows = await db
    .select({ value: settings.value, updatedAt: settings.updatedAt })
    .from(settings)
    .where(eq(settings.key, CHECK_LIMITS_KEY))
    .limit(1);
  const parsed = rows[0] ? storedSchema.safeParse(rows[0].value) : null;
  const stored = parsed?.success ? parsed.data : null;
  const byKind = Object.fromEntries(
    NEUTRALIZER_KINDS.map((k) => {
      const parsedKind = limitsSchema.safeParse(stored?.byKind[k]);
      return [k, parsedKind.success ? { ...parsedKind.data, source: "plant" as const } : { ...defaultCheckLimits(k), source: "default" as const }];
    }),
  ) as Record<NeutralizerKind, KindLimits>;
  let updatedByName: string | null = null;
  if (stored?.updatedBy) {
    const p = await db.select({ name: people.name }).from(people).where(eq(people.id, stored.updatedBy)).limit(1);
    updatedByName = p[0]?.name ?? null;
  }
  return { byKind, updatedAt: rows[0]?.updatedAt ?? null, updatedByName };
}

export async function saveCheckLimits(db: Db, byKind: Record<NeutralizerKind, CheckLimits>, personId: number, nowMs = Date.now()): Promise<void> {
  const value = { byKind, updatedBy: personId };
  await db
    .insert(settings)
    .values({ key: CHECK_LIMITS_KEY, value, updatedAt: nowMs })
    .onDuplicateKeyUpdate({ set: { value, updatedAt: nowMs } });
}

export type RecordCheckInput = {
  neutralizerId: number;
  ts: number;
  method: "charged_plate" | "periodic";
  /** test distance from the neutralizer to the plate, mm */
  plateDistanceMm: number | null;
  plateCapacitancePf?: number | null;
  plateWidthMm?: number | null;
  plateLengthMm?: number | null;
  decayPosS: number | null;
  decayNegS: number | null;
  offsetV: number | null;
  instrument: string | null;
  instrumentCalibratedOn: string | null;
  notes: string | null;
  personId: number | null;
  /** rows from an instrument's CSV log carry a key so a re-import adds nothing twice */
  importKey?: string | null;
};

export type RecordedCheck = { id: number; judgement: CheckJudgement; limits: KindLimits; stateChanged: boolean } | { id: null; duplicate: true };

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

/**
 * Judges the check against the limits of the neutralizer's kind and stores it with its history
 * event. A failed check of a neutralizer in service, newer than its last cleaning, marks it
 * "needs cleaning". With an
 * importKey already stored the check is skipped (returns duplicate).
 */
export async function recordCheck(db: Db, input: RecordCheckInput, limitsSetting?: CheckLimitsSetting, tx?: Tx): Promise<RecordedCheck> {
  const limitsAll = limitsSetting ?? (await getCheckLimits(db));
  const run = async (t: Tx): Promise<RecordedCheck> => {
    const n = (await t.select({ id: neutralizers.id, kind: neutralizers.kind, state: neutralizers.state, tag: neutralizers.tag, lastCleanedTs: neutralizers.lastCleanedTs }).from(neutralizers).where(eq(neutralizers.id, input.neutralizerId)).limit(1))[0];
    if (!n) throw notFound(`No neutralizer ${input.neutralizerId}.`);
    const limits = limitsAll.byKind[n.kind];
    const judgement = judgeCheck({ decayPosS: input.decayPosS, decayNegS: input.decayNegS, offsetV: input.offsetV }, limits);
    const values = {
      neutralizerId: n.id,
      ts: input.ts,
      method: input.method,
      plateDistanceMm: input.plateDistanceMm,
      plateCapacitancePf: input.plateCapacitancePf ?? null,
      plateWidthMm: input.plateWidthMm ?? null,
      plateLengthMm: input.plateLengthMm ?? null,
      decayPosS: input.decayPosS,
      decayNegS: input.decayNegS,
      offsetV: input.offsetV,
      instrument: input.instrument,
      instrumentCalibratedOn: input.instrumentCalibratedOn,
      passed: judgement.pass,
      failReasons: judgement.failures.join(" ").slice(0, 300) || null,
      limitsUsed: JSON.stringify({ maxDecayS: limits.maxDecayS, maxOffsetAbsV: limits.maxOffsetAbsV, source: limits.source }),
      personId: input.personId,
      notes: input.notes,
      importKey: input.importKey ?? null,
    };
    let id: number;
    if (input.importKey) {
      const [res] = await t.insert(checks).ignore().values(values);
      if (res.affectedRows === 0) return { id: null, duplicate: true };
      id = res.insertId;
    } else {
      const [res] = await t.insert(checks).values(values);
      id = res.insertId;
    }
    await t.insert(equipmentEvents).values({
      subjectType: "neutralizer",
      subjectId: n.id,
      ts: input.ts,
      kind: "check",
      personId: input.personId,
      text: `${judgement.pass ? "Passed" : "Failed"} ${input.method === "periodic" ? "periodic check" : "charged-plate check"}${input.importKey ? " (imported)" : ""}. ${judgement.pass ? "" : judgement.failures.join(" ")}`.trim(),
      checkId: id,
    });
    let stateChanged = false;
    // an old failed check (e.g. imported history) says nothing about a bar cleaned since
    if (!judgement.pass && n.state === "in_service" && input.ts > (n.lastCleanedTs ?? 0)) {
      await t.update(neutralizers).set({ state: "needs_cleaning" }).where(eq(neutralizers.id, n.id));
      await t.insert(equipmentEvents).values({
        subjectType: "neutralizer",
        subjectId: n.id,
        ts: input.ts,
        kind: "state_changed",
        personId: input.personId,
        text: "In service → needs cleaning (failed check).",
        checkId: id,
      });
      stateChanged = true;
    }
    return { id, judgement, limits, stateChanged };
  };
  return tx ? run(tx) : db.transaction(run);
}

export type CheckRow = {
  id: number;
  neutralizerId: number;
  tag: string;
  kind: NeutralizerKind;
  lineName: string | null;
  pointName: string | null;
  ts: number;
  method: "charged_plate" | "periodic";
  plateDistanceMm: number | null;
  plateCapacitancePf: number | null;
  plateWidthMm: number | null;
  plateLengthMm: number | null;
  decayPosS: number | null;
  decayNegS: number | null;
  offsetV: number | null;
  instrument: string | null;
  instrumentCalibratedOn: string | null;
  passed: boolean;
  failReasons: string | null;
  limitsUsed: string | null;
  personName: string | null;
  notes: string | null;
  imported: boolean;
};

export async function listChecks(db: Db, opts: { neutralizerId?: number; sinceTs?: number; limit?: number } = {}): Promise<CheckRow[]> {
  const where = [];
  if (opts.neutralizerId !== undefined) where.push(eq(checks.neutralizerId, opts.neutralizerId));
  if (opts.sinceTs !== undefined) where.push(gte(checks.ts, opts.sinceTs));
  const rows = await db
    .select({
      id: checks.id,
      neutralizerId: checks.neutralizerId,
      tag: neutralizers.tag,
      kind: neutralizers.kind,
      lineName: lines.name,
      pointName: points.name,
      ts: checks.ts,
      method: checks.method,
      plateDistanceMm: checks.plateDistanceMm,
      plateCapacitancePf: checks.plateCapacitancePf,
      plateWidthMm: checks.plateWidthMm,
      plateLengthMm: checks.plateLengthMm,
      decayPosS: checks.decayPosS,
      decayNegS: checks.decayNegS,
      offsetV: checks.offsetV,
      instrument: checks.instrument,
      instrumentCalibratedOn: checks.instrumentCalibratedOn,
      passed: checks.passed,
      failReasons: checks.failReasons,
      limitsUsed: checks.limitsUsed,
      personName: people.name,
      notes: checks.notes,
      importKey: checks.importKey,
    })
    .from(checks)
    .innerJoin(neutralizers, eq(neutralizers.id, checks.neutralizerId))
    .leftJoin(points, eq(points.id, neutralizers.pointId))
    .leftJoin(lines, eq(lines.id, points.lineId))
    .leftJoin(people, eq(people.id, checks.personId))
    .where(where.length ? and(...where) : undefined)
    .orderBy(desc(checks.ts), desc(checks.id))
    .limit(Math.min(opts.limit ?? 50, 500));
  return rows.map(({ importKey, ...r }) => ({ ...r, imported: importKey !== null }));
}

export async function getCheck(db: Db, id: number): Promise<CheckRow | null> {
  const rows = await db.select({ neutralizerId: checks.neutralizerId }).from(checks).where(eq(checks.id, id)).limit(1);
  if (!rows[0]) return null;
  const list = await listChecks(db, { neutralizerId: rows[0].neutralizerId, limit: 500 });
  return list.find((c) => c.id === id) ?? null;
}

/** Latest check time per neutralizer. */
export async function lastCheckTimes(db: Db, neutralizerIds?: number[]): Promise<Map<number, { ts: number; passed: boolean }>> {
  const latest = db
    .select({ neutralizerId: checks.neutralizerId, ts: sql<number>`max(${checks.ts})`.as("max_ts") })
    .from(checks)
    .where(neutralizerIds?.length ? inArray(checks.neutralizerId, neutralizerIds) : undefined)
    .groupBy(checks.neutralizerId)
    .as("latest");
  const rows = await db
    .select({ neutralizerId: checks.neutralizerId, ts: checks.ts, passed: checks.passed, id: checks.id })
    .from(checks)
    .innerJoin(latest, and(eq(latest.neutralizerId, checks.neutralizerId), eq(latest.ts, checks.ts)))
    .orderBy(checks.id);
  const out = new Map<number, { ts: number; passed: boolean }>();
  for (const r of rows) out.set(r.neutralizerId, { ts: Number(r.ts), passed: Boolean(r.passed) });
  return out;
}

export type DecayProjection = {
  /** checks the line was fitted to (the longer of the two decay times of each) */
  points: { ts: number; decayS: number }[];
  slopeSPerDay: number | null;
  interceptS: number | null;
  originTs: number | null;
  limitS: number;
  /** when the fitted line reaches the limit; null when it is not rising or too few checks */
  dueTs: number | null;
  basis: "since_cleaning" | "recent";
  /** latest check against the unit's own baseline (the first checks of the same series) */
  slowdown: DecaySlowdown | null;
};

const PROJECTION_WINDOW_MS = 365 * 86_400_000;
const PROJECTION_MAX_CHECKS = 10;

/**
 * Trend of decay time across checks and the projected date it reaches the limit. A cleaning
 * resets the decay time, so when there are two or more checks since the last cleaning only
 * those are fitted; otherwise the last checks of the past year.
 */
export function projectDecay(
  checkRows: ReadonlyArray<{ ts: number; decayPosS: number | null; decayNegS: number | null; method?: string }>,
  limitS: number,
  lastCleanedTs: number | null,
  nowMs: number,
): DecayProjection {
  const usable = checkRows
    .filter((c) => c.decayPosS !== null && c.decayNegS !== null && c.ts >= nowMs - PROJECTION_WINDOW_MS)
    .map((c) => ({ ts: c.ts, decayS: Math.max(c.decayPosS as number, c.decayNegS as number) }))
    .sort((a, b) => a.ts - b.ts);
  const since = lastCleanedTs !== null ? usable.filter((c) => c.ts >= lastCleanedTs) : [];
  const basis: DecayProjection["basis"] = since.length >= 2 ? "since_cleaning" : "recent";
  const pts = (basis === "since_cleaning" ? since : usable).slice(-PROJECTION_MAX_CHECKS);
  const trend = fitDecayTrend(pts);
  const dueTs = trend ? projectDecayDueDate(pts, limitS) : null;
  return {
    points: pts,
    slopeSPerDay: trend?.slopeSPerDay ?? null,
    interceptS: trend?.interceptS ?? null,
    originTs: trend?.originTs ?? null,
    limitS,
    dueTs,
    basis,
    slowdown: decaySlowdown(pts),
  };
}
