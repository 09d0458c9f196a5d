// Pure request checks shared by proxy.ts (every request), the route-handler wrapper and the
// sign-in page: the Content Security Policy, the same-origin check for state-changing requests,
// the client's address behind a known number of proxies, and the after-sign-in destination.
// No I/O: callers pass in the headers and settings.

/** Methods that never change state; every other method must come from our own pages. */
const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

export type HeaderGetter = (name: string) => string | null | undefined;

/**
 * The page CSP. Scripts: only ours and Next's inline ones carrying this request's nonce
 * ('strict-dynamic' lets those load the chunks they need). Styles: our stylesheets and <style>
 * elements with the nonce; style *attributes* stay allowed (style-src-attr) because React renders
 * `style={{…}}` as attributes (chart heights, bar widths, colour swatches) and uPlot positions its
 * cursor and legend with inline styles; attributes cannot carry a nonce, and without selectors
 * they cannot read the page. `dev` adds what React's development build needs ('unsafe-eval').
 */
export function buildCsp(nonce: string, opts: { dev?: boolean } = {}): string {
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic'${opts.dev ? " 'unsafe-eval'" : ""}`,
    `style-src 'self' 'nonce-${nonce}'`,
    "style-src-attr 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    "connect-src 'self'",
    "media-src 'self'",
    "worker-src 'self' blob:",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join("; ");
}

export type OriginVerdict = { ok: true } | { ok: false; reason: string };

/**
 * Refuses a state-changing request that a browser sent from another origin. Browsers send
 * `Sec-Fetch-Site` (and `Origin` on every POST); "same-site" is refused too, since any page on
 * another port of the same host is the same site. A request with neither header did not come
 * from a browser page (curl, scripts, tests) and cannot carry a victim's cookies by accident.
 * `allowedHosts` are the host[:port] values this app answers on (the Host header, plus
 * X-Forwarded-Host when a trusted proxy sets it).
 */
export function checkSameOrigin(method: string, get: HeaderGetter, allowedHosts: string[]): OriginVerdict {
  if (SAFE_METHODS.has(method.toUpperCase())) return { ok: true };
  const site = get("sec-fetch-site")?.trim().toLowerCase();
  if (site && site !== "same-origin" && site !== "none") return { ok: false, reason: `Sec-Fetch-Site: ${site}` };
  const origin = get("origin")?.trim();
  if (!origin) return { ok: true };
  if (origin === "null") return { ok: false, reason: "Origin: null" };
  let host: string;
  try {
    host = new URL(origin).host.toLowerCase();
  } catch {
    return { ok: false, reason: "unreadable Origin" };
  }
  const hosts = allowedHosts.map((h) => h.trim().toLowerCase()).filter(Boolean);
  return hosts.includes(host) ? { ok: true } : { ok: false, reason: `Origin ${origin.slice(0, 100)} is not this app` };
}

/**
 * The client's address: the socket's peer, or — behind `trustedProxies` proxies that each append
 * the address they saw to X-Forwarded-For — the entry that many hops from the right. Entries a
 * client wrote itself sit further left and are never used (Express's "trust proxy = N" rule).
 */
export function clientAddress(socketAddress: string | null | undefined, forwardedFor: string | null | undefined, trustedProxies: number): string {
  const peer = normalizeAddress(socketAddress) ?? "unknown";
  if (trustedProxies <= 0) return peer;
  const hops = (forwardedFor ?? "")
    .split(",")
    .map((s) => normalizeAddress(s))
    .filter((s): s is string => !!s);
  // [peer, nearest hop, …, farthest hop]: the Nth entry is what the Nth trusted proxy saw
  const chain = [peer, ...hops.reverse()];
  return chain[Math.min(trustedProxies, chain.length - 1)];
}

function normalizeAddress(raw: string | null | undefined): string | null {
  const s = raw?.trim();
  if (!s) return null;
  // "::ffff:10.0.0.1" is the IPv4 address 10.0.0.1 on a dual-stack socket
  const v4 = /^::ffff:(\d{1,3}(?:\.\d{1,3}){3})$/i.exec(s);
  return (v4 ? v4[1] : s).toLowerCase().slice(0, 64);
}

export const DEFAULT_AFTER_SIGN_IN = "/floor";

/**
 * Where to go after signing in: a path on this site, or the Floor. Resolved against a dummy
 * origin the way a browser would ("/\evil.example" and "//evil" both leave the site), then
 * kept only when it stays on that origin.
 */
export function safeCallbackPath(raw: unknown): string {
  if (typeof raw !== "string" || raw.length === 0 || raw.length > 2000) return DEFAULT_AFTER_SIGN_IN;
  // control characters and backslashes are never part of our own links
  if (!raw.startsWith("/") || /[\\\u0000-\u001f\u007f]/.test(raw)) return DEFAULT_AFTER_SIGN_IN;
  const base = "http://stillfield.invalid";
  let url: URL;
  try {
    url = new URL(raw, base);
  } catch {
    return DEFAULT_AFTER_SIGN_IN;
  }
  if (url.origin !== base) return DEFAULT_AFTER_SIGN_IN;
  const path = `${url.pathname}${url.search}${url.hash}`;
  if (path.startsWith("//") || path.startsWith("/sign-in") || path.startsWith("/api/")) return DEFAULT_AFTER_SIGN_IN;
  return path;
}

/** TRUSTED_PROXIES: how many proxies in front of the app append to X-Forwarded-For (default 0). */
export function parseTrustedProxies(raw: string | undefined): number {
  if (raw === undefined || raw.trim() === "") return 0;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 0 || n > 10) throw new Error(`TRUSTED_PROXIES must be a whole number 0–10, not ${JSON.stringify(raw).slice(0, 40)}`);
  return n;
}

/** The host[:port] values a same-origin request may name: Host, and X-Forwarded-Host behind a trusted proxy. */
export function allowedHostsOf(get: HeaderGetter, trustedProxies: number): string[] {
  const hosts = [get("host") ?? ""];
  if (trustedProxies > 0) hosts.push(...(get("x-forwarded-host") ?? "").split(",").map((h) => h.trim()));
  return hosts.filter(Boolean);
}
