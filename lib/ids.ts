// The one parser for record ids from URLs, forms and query strings: a positive whole number
// written plainly ("12", not "1e1", " 12" or "012"), at most ten digits. Pure.
import { badInput } from "./errors";

/** The id, or null when `raw` is not a plain positive whole number. */
export function parseId(raw: unknown): number | null {
  if (typeof raw === "number") return Number.isSafeInteger(raw) && raw > 0 ? raw : null;
  return typeof raw === "string" && /^[1-9]\d{0,9}$/.test(raw) ? Number(raw) : null;
}

/** The id, or a 400 with `message` when `raw` is not one. */
export function requireId(raw: unknown, message = "The id must be a positive whole number."): number {
  const id = parseId(raw);
  if (id === null) throw badInput(message);
  return id;
}
