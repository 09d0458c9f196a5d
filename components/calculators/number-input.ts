// Parsing what a technician types into a number field, and the zod field that says what is wrong
// in plain words. Pure (no React), shared by the calculators' models.
import { z } from "zod";

const MINUS = "\u2212";

/**
 * Reads "21", "−10" (true minus), "-10", "0,5" (decimal comma), "1e10", "1E10", "1×10^10",
 * "1x10^10" and "10^10"; anything else (words, superscript powers, two numbers) gives NaN.
 */
export function parseNumberText(text: string): number {
  let t = text.trim().replace(/\s+/g, "").replace(new RegExp(MINUS, "g"), "-");
  if (t === "") return Number.NaN;
  if (/^[-+]?\d+,\d+$/.test(t)) t = t.replace(",", ".");
  const pow = /^([-+]?\d*\.?\d+)?[x×*]?10\^([-+]?\d+)$/i.exec(t);
  if (pow) {
    const mantissa = pow[1] === undefined ? 1 : Number(pow[1]);
    return mantissa * 10 ** Number(pow[2]);
  }
  if (!/^[-+]?(\d+\.?\d*|\.\d+)(e[-+]?\d+)?$/i.test(t)) return Number.NaN;
  return Number(t);
}

/** A number shown the way it would be typed back: "−10", "0.46", "1e+10" as "1e10". */
export function formatLimitText(value: number): string {
  const s = String(value).replace("e+", "e");
  return s.startsWith("-") ? `${MINUS}${s.slice(1)}` : s;
}

export type NumberFieldOptions = {
  /** What the field holds, in the technician's words: "outdoor temperature". */
  what: string;
  /** Unit for messages: "°C", "%", "kV"; empty for none. */
  unit: string;
  min?: number;
  max?: number;
  /** When true the minimum itself is refused ("must be above 0"). */
  exclusiveMin?: boolean;
  example?: string;
};

/** A text field parsed to a number with messages next to the field. */
export function numberField(o: NumberFieldOptions) {
  const u = o.unit ? ` ${o.unit}` : "";
  const range =
    o.min !== undefined && o.exclusiveMin
      ? `above ${formatLimitText(o.min)}${o.max !== undefined ? ` and at most ${formatLimitText(o.max)}` : ""}${u}`
      : o.min !== undefined && o.max !== undefined
        ? `between ${formatLimitText(o.min)} and ${formatLimitText(o.max)}${u}`
        : o.min !== undefined
          ? `at least ${formatLimitText(o.min)}${u}`
          : `at most ${formatLimitText(o.max ?? 0)}${u}`;
  return z
    .string()
    .trim()
    .min(1, { message: `Enter the ${o.what}${o.unit ? ` in ${o.unit}` : ""}` })
    .refine((s) => Number.isFinite(parseNumberText(s)), { message: `Enter the ${o.what} as a number${o.example ? `, e.g. ${o.example}` : ""}` })
    .transform(parseNumberText)
    .refine((n) => (o.min === undefined ? true : o.exclusiveMin ? n > o.min : n >= o.min) && (o.max === undefined || n <= o.max), {
      message: `The ${o.what} must be ${range}`,
    });
}

/** First message per field from a failed parse. */
export function fieldMessages(issues: ReadonlyArray<{ path: ReadonlyArray<PropertyKey>; message: string }>): Record<string, string> {
  const out: Record<string, string> = {};
  for (const i of issues) {
    const key = String(i.path[0] ?? "_");
    out[key] ??= i.message;
  }
  return out;
}
