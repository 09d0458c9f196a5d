import type { Metadata, Viewport } from "next";
import localFont from "next/font/local";
import { connection } from "next/server";
import "./globals.css";

// Inter (variable) shipped from the @fontsource-variable/inter npm package: nothing is fetched.
const sans = localFont({
  src: "../node_modules/@fontsource-variable/inter/files/inter-latin-wght-normal.woff2",
  variable: "--font-sans",
  display: "swap",
  weight: "100 900",
});

export const metadata: Metadata = {
  title: { default: "Stillfield", template: "%s · Stillfield" },
  description: "Static charge and humidity on every line, live; alerts; neutralizer records.",
};

export const viewport: Viewport = { themeColor: "#35566f" };

export default async function RootLayout({ children }: { children: React.ReactNode }) {
  // every page (the not-found page too) is rendered per request, so that Next puts this
  // request's CSP nonce (proxy.ts) on its scripts; a page built ahead of time would have none
  await connection();
  return (
    <html lang="en" className={sans.variable}>
      <body className="min-h-screen font-sans">{children}</body>
    </html>
  );
}
