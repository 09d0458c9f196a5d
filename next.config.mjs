// Next.js configuration. Telemetry is switched off by the scripts (NEXT_TELEMETRY_DISABLED=1);
// nothing here fetches from the internet at build or run time.
/** @type {import('next').NextConfig} */
const nextConfig = {
  // several stacks (demo, tests, parallel work) can build side by side in their own folders
  distDir: process.env.NEXT_DIST_DIR || ".next",
  reactStrictMode: true,
  poweredByHeader: false,
  // Plain Node packages used by route handlers and server code; keep them out of the bundle.
  serverExternalPackages: ["mysql2", "mqtt", "bcryptjs", "sharp", "nodemailer", "psychrolib"],
  devIndicators: false,
  typedRoutes: false,
};
export default nextConfig;
