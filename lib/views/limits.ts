// The limit drawn on a chart and used to judge a point's state (db/queries/limits.ts reads it,
// lib/rules/limits-in-force.ts resolves it).
import type { ScopeLevel } from "../rules/scope";

export type ChargeLimit = { limitKv: number; clearKv: number; ruleId: number; level: ScopeLevel };
export type RhLimit = { limitPct: number; clearPct: number | null; ruleId: number | null; level: "area" | "plant" | "hall band" };
