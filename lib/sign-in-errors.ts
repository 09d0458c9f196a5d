// What the sign-in form may say. The server answers with one of these codes (never its own
// error text: with the database down, driver messages must not reach an anonymous visitor);
// the form turns the code into words and shows the generic "wrong" text for anything else.

export const SIGN_IN_CODES = { wrong: "wrong", unavailable: "unavailable", waitPrefix: "wait:" } as const;

export function waitCode(waitMs: number): string {
  return `${SIGN_IN_CODES.waitPrefix}${Math.max(1, Math.ceil(waitMs / 1000))}`;
}

export function signInMessage(code: string | null | undefined): string {
  if (code === SIGN_IN_CODES.unavailable) return "Sign-in is not available right now. Try again in a minute; if it persists, tell your admin.";
  const wait = code?.startsWith(SIGN_IN_CODES.waitPrefix) ? Number(code.slice(SIGN_IN_CODES.waitPrefix.length)) : NaN;
  if (Number.isInteger(wait) && wait > 0 && wait <= 24 * 3600) {
    const words = wait < 90 ? `${wait} second${wait === 1 ? "" : "s"}` : `${Math.ceil(wait / 60)} minutes`;
    return `Too many failed sign-ins. Try again in ${words}.`;
  }
  return "Wrong e-mail or password.";
}
