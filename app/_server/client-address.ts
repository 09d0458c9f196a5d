// The address a request came from, for the sign-in throttle. scripts/app-server.mjs hands the
// socket's peer address to the app in a header whose name is random per process (in
// STILLFIELD_PEER_HEADER); behind TRUSTED_PROXIES proxies the address is read from
// X-Forwarded-For that many hops from the right (lib/http-security.ts). Under plain `next start`
// or `next dev` there is no socket address: every client then shares one throttle address.
import "server-only";
import { clientAddress, parseTrustedProxies } from "@/lib/http-security";
import { getSettings } from "@/lib/settings";

export type HeaderBag = Record<string, string | string[] | undefined> | Headers | undefined;

let warned = false;

export function addressOf(headers: HeaderBag, env: { STILLFIELD_PEER_HEADER?: string; TRUSTED_PROXIES?: string } = getSettings()): string {
  const get = (name: string): string | undefined => {
    if (!headers) return undefined;
    if (headers instanceof Headers) return headers.get(name) ?? undefined;
    const v = headers[name.toLowerCase()];
    return Array.isArray(v) ? v.join(",") : v;
  };
  const peerHeader = env.STILLFIELD_PEER_HEADER;
  const socket = peerHeader ? get(peerHeader) : undefined;
  if (!peerHeader && !warned) {
    warned = true;
    console.warn("sign-in throttle: no socket address (the app was not started by scripts/app-server.mjs); all clients share one address limit");
  }
  return clientAddress(socket, get("x-forwarded-for"), parseTrustedProxies(env.TRUSTED_PROXIES));
}
