import type { Metadata, Viewport } from "next";
import localFont from "next/font/local";
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

export default function RootLayout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en" className={sans.variable}>
      <body className="min-h-screen font-sans">{children}</body>
    </html>
  );
}
