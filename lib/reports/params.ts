/**
 * Query parameters of the reports (pages, JSON and CSV route handlers share them), parsed with
 * zod, and the defaults a report opens with: the last completed shift, the current week, the
 * last 90 days. Pure.
 */
import { z } from "zod";
import { addDaysToDate, isValidDate, lastCompletedShift, localDateOf, type ShiftSpec } from "../plant-time";
import { COMPLIANCE_TABLES, HANDOVER_TABLES, WEEKLY_TABLES } from "./csv-tables";

const dateField = (what: string) =>
  z
    .string({ message: `Choose the ${what}` })
    .trim()
    .regex(/^\d{4}-\d{2}-\d{2}$/, { message: `Enter the ${what} as a date (YYYY-MM-DD)` })
    .refine(isValidDate, { message: `There is no such ${what}` });

const optional = <T extends z.ZodType>(schema: T) => z.preprocess((v) => (v === "" || v === null ? undefined : v), schema.optional());

export const handoverParamsSchema = z.object({
  date: optional(dateField("shift date")),
  shift: optional(z.string().trim().min(1).max(40)),
});

export const weeklyParamsSchema = z.object({
  line: optional(z.coerce.number({ message: "Choose a line" }).int().positive({ message: "Choose a line" })),
  week: optional(dateField("week")),
});

export const complianceParamsSchema = z
  .object({
    from: optional(dateField("first day")),
    to: optional(dateField("last day")),
  })
  .refine((p) => !p.from || !p.to || p.from <= p.to, { message: "The last day must not be before the first day", path: ["to"] });

export const handoverCsvParamsSchema = handoverParamsSchema.extend({ table: z.enum(HANDOVER_TABLES, { message: `Choose a table: ${HANDOVER_TABLES.join(", ")}` }) });
export const weeklyCsvParamsSchema = weeklyParamsSchema.extend({ table: z.enum(WEEKLY_TABLES, { message: `Choose a table: ${WEEKLY_TABLES.join(", ")}` }) });
export const complianceCsvParamsSchema = z.object({
  from: optional(dateField("first day")),
  to: optional(dateField("last day")),
  table: z.enum(COMPLIANCE_TABLES, { message: `Choose a table: ${COMPLIANCE_TABLES.join(", ")}` }),
});

/** The handover asked for, or the last completed shift. */
export function resolveHandoverParams(p: { date?: string; shift?: string }, settings: ShiftSpec, nowTs: number): { date: string; shift: string } {
  if (p.date && p.shift) return { date: p.date, shift: p.shift };
  const last = lastCompletedShift(nowTs, settings);
  if (p.date) return { date: p.date, shift: settings.shifts[0]?.name ?? last.name };
  return { date: last.date, shift: last.name };
}

/** Default compliance period: the 90 days up to today. */
export const DEFAULT_COMPLIANCE_DAYS = 90;

export function resolveComplianceParams(p: { from?: string; to?: string }, timeZone: string, nowTs: number): { from: string; to: string } {
  const to = p.to ?? localDateOf(nowTs, timeZone);
  const from = p.from ?? addDaysToDate(to, -(DEFAULT_COMPLIANCE_DAYS - 1));
  return from <= to ? { from, to } : { from: to, to };
}

export function resolveWeek(p: { week?: string }, timeZone: string, nowTs: number): string {
  return p.week ?? localDateOf(nowTs, timeZone);
}
