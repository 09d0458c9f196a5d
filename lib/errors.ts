// Typed errors with codes: internals are logged, the user gets a clear message and the right status.

export type ErrorCode = "bad_input" | "unauthenticated" | "forbidden" | "not_found" | "conflict" | "unprocessable" | "too_large" | "rate_limited" | "internal";

const STATUS: Record<ErrorCode, number> = {
  bad_input: 400,
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  unprocessable: 422,
  too_large: 413,
  rate_limited: 429,
  internal: 500,
};

export class AppError extends Error {
  readonly code: ErrorCode;
  readonly status: number;
  readonly fieldErrors?: Record<string, string[]>;
  constructor(code: ErrorCode, message: string, fieldErrors?: Record<string, string[]>) {
    super(message);
    this.name = "AppError";
    this.code = code;
    this.status = STATUS[code];
    this.fieldErrors = fieldErrors;
  }
}

/** The code of an HTTP error status ("internal" for one without its own code). */
export function errorCodeOfStatus(status: number): ErrorCode {
  const hit = (Object.keys(STATUS) as ErrorCode[]).find((c) => STATUS[c] === status);
  return hit ?? "internal";
}

export const forbidden = (what = "You do not have permission to do this.") => new AppError("forbidden", what);
export const notFound = (what = "Not found.") => new AppError("not_found", what);
export const badInput = (message: string, fieldErrors?: Record<string, string[]>) => new AppError("bad_input", message, fieldErrors);

/** zod issues → { field: [messages] } for forms and 400 bodies. */
export function fieldErrorsFromIssues(issues: ReadonlyArray<{ path: ReadonlyArray<PropertyKey>; message: string }>): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const issue of issues) {
    const key = issue.path.map(String).join(".") || "_";
    (out[key] ??= []).push(issue.message);
  }
  return out;
}
