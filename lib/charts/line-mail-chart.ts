// A small chart per line for e-mails (pure): the charge of the line's points over a span (the
// shift of a handover), drawn as one band, with the line's charge limit. Stored on an outbox mail
// beside, or in a list with, alert chart specs (lib/charts/alert-chart.ts); the mailer draws each
// as its own inline PNG (ingest/mail-chart.ts).
import { z } from "zod";
import { alertChartSpecSchema, type AlertChartSpec } from "./alert-chart";
import type { SvgChartPoint } from "./svg-chart";

export type LineMailChartSpec = {
  kind: "line";
  lineId: number;
  /** the field meters on the line's points */
  deviceIds: number[];
  fromTs: number;
  toTs: number;
  /** the strictest charge limit of the line's points, when there is one */
  limitKv: number | null;
  title: string;
};

export const lineMailChartSpecSchema = z.object({
  kind: z.literal("line"),
  lineId: z.number().int(),
  deviceIds: z.array(z.number().int()).min(1).max(12),
  fromTs: z.number().int(),
  toTs: z.number().int(),
  limitKv: z.number().nullable(),
  title: z.string().max(120),
});

const oneChart = z.union([lineMailChartSpecSchema, alertChartSpecSchema]);

/** The outbox `chart` value: one spec (as alert mails have always stored) or a list of them. */
export const mailChartValueSchema = z.union([oneChart, z.array(oneChart).max(24)]);

export type MailChartSpec = LineMailChartSpec | AlertChartSpec;

/** The specs of an outbox `chart` value, in order; nothing when it does not parse. */
export function mailChartSpecs(value: unknown): MailChartSpec[] {
  const parsed = mailChartValueSchema.safeParse(value);
  if (!parsed.success) return [];
  return Array.isArray(parsed.data) ? parsed.data : [parsed.data];
}

export function isLineChartSpec(spec: MailChartSpec): spec is LineMailChartSpec {
  return "kind" in spec && spec.kind === "line";
}

/** The content id of a line's chart image in a mail. */
export function lineChartCid(lineId: number): string {
  return `line-${lineId}-chart@stillfield`;
}

/** The words that stand in for a line's chart where the image is not shown. */
export function lineChartAlt(spec: Pick<LineMailChartSpec, "title" | "limitKv">): string {
  const limit = spec.limitKv === null ? "no charge limit set" : `limit ±${spec.limitKv} kV`;
  return `Charge of the points on ${spec.title} over the shift (kV, ${limit})`;
}

/**
 * The points of several meters as one series: per time bucket the lowest minimum, the highest
 * maximum and the mean furthest from zero (either polarity), so the band covers every point.
 */
export function mergeSeries(series: readonly (readonly SvgChartPoint[])[]): SvgChartPoint[] {
  const byTs = new Map<number, SvgChartPoint>();
  for (const s of series) {
    for (const p of s) {
      const cur = byTs.get(p.ts);
      if (!cur) byTs.set(p.ts, { ...p });
      else byTs.set(p.ts, { ts: p.ts, min: Math.min(cur.min, p.min), max: Math.max(cur.max, p.max), mean: Math.abs(p.mean) > Math.abs(cur.mean) ? p.mean : cur.mean });
    }
  }
  return [...byTs.values()].sort((a, b) => a.ts - b.ts);
}
