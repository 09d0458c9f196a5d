// The web-app manifest (App Router file convention, served at /manifest.webmanifest): lets an
// on-call engineer add Stillfield to a phone's home screen. Icons are committed PNGs in
// public/icons (drawn by scripts/make-icons.ts).
import type { MetadataRoute } from "next";

export default function manifest(): MetadataRoute.Manifest {
  return {
    name: "Stillfield",
    short_name: "Stillfield",
    description: "Static charge and humidity on every line; alerts for the people on call.",
    start_url: "/alerts",
    scope: "/",
    display: "standalone",
    background_color: "#f6f5f1",
    theme_color: "#35566f",
    icons: [
      { src: "/icons/icon-192.png", sizes: "192x192", type: "image/png", purpose: "any" },
      { src: "/icons/icon-512.png", sizes: "512x512", type: "image/png", purpose: "any" },
      { src: "/icons/icon-maskable-512.png", sizes: "512x512", type: "image/png", purpose: "maskable" },
    ],
  };
}
