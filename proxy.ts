// Runs before every request (Next 16's proxy file): gives each page a fresh CSP nonce, which
// Next puts on its own inline scripts, and refuses state-changing requests (route handlers,
// server actions, sign-in) that a browser sent from another origin. The other security headers
// come from next.config.mjs so that they are on every response, this one's included.
// (Route handlers are not matched: see `config` below.)
import { NextResponse, type NextRequest } from "next/server";
import { allowedHostsOf, buildCsp, checkSameOrigin, parseTrustedProxies } from "./lib/http-security";

const trustedProxies = parseTrustedProxies(process.env.TRUSTED_PROXIES);
const dev = process.env.NODE_ENV === "development";

export function proxy(request: NextRequest) {
  const get = (name: string) => request.headers.get(name);
  const verdict = checkSameOrigin(request.method, get, allowedHostsOf(get, trustedProxies));
  if (!verdict.ok) {
    console.warn(`refused ${request.method} ${request.nextUrl.pathname}: ${verdict.reason}`);
    return NextResponse.json({ error: "This request did not come from a Stillfield page.", code: "forbidden" }, { status: 403 });
  }

  const nonce = Buffer.from(crypto.getRandomValues(new Uint8Array(18))).toString("base64");
  const csp = buildCsp(nonce, { dev });
  const requestHeaders = new Headers(request.headers);
  // Next reads the nonce from the request's CSP header and puts it on its inline scripts
  requestHeaders.set("content-security-policy", csp);
  requestHeaders.set("x-nonce", nonce);
  const response = NextResponse.next({ request: { headers: requestHeaders } });
  response.headers.set("Content-Security-Policy", csp);
  return response;
}

export const config = {
  // Pages and server actions. Route handlers (/api/…) check the origin themselves
  // (app/_server/route.ts): Next buffers, and past 10 MB truncates, the body of any request the
  // proxy sees, which would defeat the streaming size limits of uploads and imports. Next's
  // hashed static files need no nonce; next.config.mjs gives both their headers.
  matcher: "/((?!api/|_next/static/|_next/image).*)",
};
