// Request checks shared by proxy.ts, the route wrapper and the sign-in page (lib/http-security.ts).
import { describe, expect, it } from "vitest";
import { buildCsp, checkSameOrigin, clientAddress, safeCallbackPath } from "@/lib/http-security";
import { signInMessage, waitCode } from "@/lib/sign-in-errors";

const headers = (h: Record<string, string>) => (name: string) => h[name] ?? null;

describe("after sign-in, only paths on this site", () => {
  it("a backslash, a protocol-relative or a foreign URL lands on the Floor", () => {
    for (const raw of ["/\\evil.example", "//evil", "//evil.example/floor", "https://evil.example/", "http:evil.example", "/\t/evil.example", "javascript:alert(1)", "", undefined, ["/floor"]]) {
      expect(safeCallbackPath(raw), JSON.stringify(raw)).toBe("/floor");
    }
  });
  it("our own paths, with their query, are kept", () => {
    expect(safeCallbackPath("/lines/3?range=24h")).toBe("/lines/3?range=24h");
    expect(safeCallbackPath("/wallboard")).toBe("/wallboard");
  });
});

describe("same-origin check for state-changing requests", () => {
  const hosts = ["127.0.0.1:3000"];
  it("refuses a POST from a foreign Origin, from another port and a same-site fetch", () => {
    expect(checkSameOrigin("POST", headers({ origin: "http://evil.example" }), hosts).ok).toBe(false);
    expect(checkSameOrigin("POST", headers({ origin: "http://127.0.0.1:8080" }), hosts).ok).toBe(false);
    expect(checkSameOrigin("DELETE", headers({ origin: "null" }), hosts).ok).toBe(false);
    expect(checkSameOrigin("PUT", headers({ "sec-fetch-site": "same-site", origin: "http://127.0.0.1:3000" }), hosts).ok).toBe(false);
    expect(checkSameOrigin("PATCH", headers({ "sec-fetch-site": "cross-site" }), hosts).ok).toBe(false);
  });
  it("accepts our own pages, safe methods and non-browser clients", () => {
    expect(checkSameOrigin("POST", headers({ origin: "http://127.0.0.1:3000", "sec-fetch-site": "same-origin" }), hosts).ok).toBe(true);
    expect(checkSameOrigin("GET", headers({ origin: "http://evil.example" }), hosts).ok).toBe(true);
    expect(checkSameOrigin("POST", headers({}), hosts).ok).toBe(true);
  });
});

describe("client address", () => {
  it("ignores X-Forwarded-For unless proxies are trusted, then takes the trusted hop", () => {
    expect(clientAddress("::ffff:127.0.0.1", "6.6.6.6", 0)).toBe("127.0.0.1");
    expect(clientAddress("10.0.0.2", "6.6.6.6, 198.51.100.4", 1)).toBe("198.51.100.4");
    // fewer hops than trusted proxies: the farthest one written
    expect(clientAddress("10.0.0.2", "", 1)).toBe("10.0.0.2");
  });
});

describe("CSP", () => {
  it("allows scripts by nonce only and forbids framing", () => {
    const csp = buildCsp("abc123");
    expect(csp).toContain("script-src 'self' 'nonce-abc123' 'strict-dynamic'");
    expect(csp).not.toMatch(/script-src[^;]*'unsafe-inline'/);
    expect(csp).not.toContain("unsafe-eval");
    expect(csp).toContain("frame-ancestors 'none'");
    expect(csp).toContain("object-src 'none'");
  });
});

describe("sign-in messages", () => {
  it("shows only known words, never server text", () => {
    expect(signInMessage("wrong")).toBe("Wrong e-mail or password.");
    expect(signInMessage("connect ECONNREFUSED 127.0.0.1:3407")).toBe("Wrong e-mail or password.");
    expect(signInMessage(waitCode(4_100))).toBe("Too many failed sign-ins. Try again in 5 seconds.");
    expect(signInMessage("unavailable")).toMatch(/not available right now/);
  });
});
