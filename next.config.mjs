// Next.js configuration. Telemetry is switched off by the scripts (NEXT_TELEMETRY_DISABLED=1);
// nothing here fetches from the internet at build or run time.
// Security headers on every response (pages, route handlers, files, Next's own assets); the
// Content-Security-Policy with its per-request nonce is added by proxy.ts.
const securityHeaders = [
  { key: "X-Content-Type-Options", value: "nosniff" },
  { key: "Referrer-Policy", value: "same-origin" },
  // for browsers without CSP frame-ancestors: no page of ours may be framed (clickjacking)
  { key: "X-Frame-Options", value: "DENY" },
  { key: "Permissions-Policy", value: "camera=(), microphone=(), geolocation=(), payment=(), usb=(), serial=(), bluetooth=()" },
  { key: "Cross-Origin-Opener-Policy", value: "same-origin" },
];

/** @type {import('next').NextConfig} */
const nextConfig = {
  // several stacks (demo, tests, parallel work) can build side by side in their own folders
  distDir: process.env.NEXT_DIST_DIR || ".next",
  reactStrictMode: true,
  poweredByHeader: false,
  // Plain Node packages used by route handlers and server code; keep them out of the bundle.
  serverExternalPackages: ["mysql2", "mqtt", "bcryptjs", "sharp", "nodemailer", "psychrolib", "pdfkit"],
  devIndicators: false,
  typedRoutes: false,
  async headers() {
    return [
      { source: "/:path*", headers: securityHeaders },
      // JSON, files and streams: nothing in them may run or be framed (pages get theirs from proxy.ts;
      // the file route sets a stricter one of its own)
      { source: "/api/:path*", headers: [{ key: "Content-Security-Policy", value: "default-src 'none'; frame-ancestors 'none'; sandbox" }] },
      { source: "/_next/:path*", headers: [{ key: "Content-Security-Policy", value: "default-src 'none'; frame-ancestors 'none'" }] },
    ];
  },
};
export default nextConfig;
